package engine

// Test helpers only: no computation is checked here, so no source.

// AblationOf is the Ablation that switches the named mechanism off (one of
// Mechanisms); "" is the model as it ships.
func AblationOf(name string) Ablation {
	return Ablation{
		NoDayStructure: name == "day structure",
		OneAirExponent: name == "split air law",
		NoGripBand:     name == "grip band",
		NoNuisance:     name == "day offsets out of the physics fit",
		NoWeightFill:   name == "weight fill",
		NoTodayRecency: name == "today's recency",
		Window40:       name == "60-pass window",
	}
}

// Mechanisms are the names AblationOf knows.
var Mechanisms = []string{"day structure", "split air law", "grip band", "day offsets out of the physics fit", "weight fill", "today's recency", "60-pass window"}
