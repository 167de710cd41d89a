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
}
