package engine

// ablation switches the pass model's mechanisms off one at a time, so a
// test can measure what each is worth on a world the model was not built
// from (engine/generalise_test.go, PITCARD_ABLATE=1). Every switch is off
// in pitcard itself: the zero value is the model as it ships.
var ablation struct {
	noDayStructure bool // the residual correction as a recency-weighted mean (6-pass half-life, same day ×2)
	oneAirExponent bool // the temperature exponent tied to half the pressure exponent (one air law)
	noGripBand     bool // the grip band held at the tire's prior, not fitted
	noNuisance     bool // the physics fitted without the day offsets taken out
	noWeightFill   bool // a pass without a weight takes car.yaml's
	noTodayRecency bool // today's passes weigh alike in today's offset
	window40       bool // the 40-pass fit window of the first generation
}
