package engine

// Test helpers only: no computation is checked here, so no source.

// SetAblation switches one mechanism of the pass model off, for the
// ablation test; "" switches them all back on.
func SetAblation(name string) {
	ablation.noDayStructure = name == "day structure"
	ablation.oneAirExponent = name == "split air law"
	ablation.noGripBand = name == "grip band"
	ablation.noNuisance = name == "day offsets out of the physics fit"
	ablation.noWeightFill = name == "weight fill"
	ablation.noTodayRecency = name == "today's recency"
	ablation.window40 = name == "60-pass window"
}

// Mechanisms are the names SetAblation knows.
var Mechanisms = []string{"day structure", "split air law", "grip band", "day offsets out of the physics fit", "weight fill", "today's recency", "60-pass window"}
