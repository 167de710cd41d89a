package engine

// Ablation switches the pass model's mechanisms off one at a time, so a
// test can measure what each is worth on a world the model was not built
// from (engine/generalise_test.go, PITCARD_ABLATE=1). It travels with the
// input (CalibrateInput.Ablation) and the fit (Fit.Ablation), so Predict
// sees what Calibrate saw and no package state changes under a running
// calibration. The zero value is the model as it ships: pitcard never sets
// a field.
type Ablation struct {
	NoDayStructure bool // the residual correction as a recency-weighted mean (6-pass half-life, same day ×2)
	OneAirExponent bool // the temperature exponent tied to half the pressure exponent (one air law)
	NoGripBand     bool // the grip band held at the tire's prior, not fitted
	NoNuisance     bool // the physics fitted without the day offsets taken out
	NoWeightFill   bool // a pass without a weight takes car.yaml's
	NoTodayRecency bool // today's passes weigh alike in today's offset
	Window40       bool // the 40-pass fit window of the first generation
	// The third generation's mechanisms (engine.Forecast):
	NoBlend       bool   // the pass model alone: no members, no conformal scale
	NoMember      string // one member left out, by its Name
	NoConformal   bool   // the interval and the dial at the model's own spread
	NoDialScale   bool   // the dial planned on the interval's spread
	NoChangeCarry bool   // a noted change of the car ignored
	NoGripEdge    bool   // the fitted grip well extrapolated past the logged surface
}

// AblationNamed is the Ablation that switches the named mechanism off (one
// of Mechanisms); "" is the model as it ships. For the ablation table of
// the developers' harness (internal/heldout) and the tests; pitcard itself
// never calls it.
func AblationNamed(name string) Ablation {
	a := Ablation{
		NoDayStructure: name == "day structure",
		OneAirExponent: name == "split air law",
		NoGripBand:     name == "grip band",
		NoNuisance:     name == "day offsets out of the physics fit",
		NoWeightFill:   name == "weight fill",
		NoTodayRecency: name == "today's recency",
		Window40:       name == "60-pass window",
		NoBlend:        name == "blend",
		NoConformal:    name == "conformal scale",
		NoDialScale:    name == "dial's own tail",
		NoChangeCarry:  name == "change carry",
		NoGripEdge:     name == "grip edge",
	}
	for m := range nMembers {
		if name == "member: "+member(m).Name() {
			a.NoMember = member(m).Name()
		}
	}
	return a
}

// Mechanisms are the names AblationNamed knows: the second generation's
// seven (the pass model's fit) and the third's (the blend around it).
var Mechanisms = append([]string{"day structure", "split air law", "grip band", "day offsets out of the physics fit", "weight fill", "today's recency", "60-pass window"},
	BlendMechanisms...)

// BlendMechanisms are the third generation's mechanisms (Forecast and what
// it added to the fit), each member of the blend one of them.
var BlendMechanisms = func() []string {
	names := []string{"blend", "conformal scale", "dial's own tail", "change carry", "grip edge"}
	for m := range nMembers {
		names = append(names, "member: "+member(m).Name())
	}
	return names
}()
