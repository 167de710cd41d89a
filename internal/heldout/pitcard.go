package heldout

import (
	"strings"

	"pitcard/engine"
	"pitcard/internal/stats"
	"pitcard/internal/truthsim"
	"pitcard/logbook"
)

// Pitcard is pitcard's prediction as the card makes it (engine.Forecast):
// the members blended by their held-out misses on the passes before, in
// the target's conditions. The one place the harness calls the model, so a
// rewrite swaps this function alone. Its held-out predictions are kept in
// one cache for every world (keys are digests of their inputs), so each
// new pass costs one new calibration, as on the card.
func Pitcard(in Input) (et, sd, dialSD float64, ok bool) { return PitcardWithout("")(in) }

// PitcardWithout is Pitcard with one mechanism switched off (a name of
// engine.Mechanisms; "" none), for the ablation table.
func PitcardWithout(mechanism string) DialPredictor {
	ab := engine.AblationNamed(mechanism)
	return func(in Input) (et, sd, dialSD float64, ok bool) {
		return forecast(in, ab)
	}
}

func forecast(in Input, ab engine.Ablation) (et, sd, dialSD float64, ok bool) {
	pr, _, err := engine.Forecast(engine.CalibrateInput{Car: in.Car, Track: in.Track, Tracks: in.Tracks, Passes: in.Before, Now: in.Target.Time, Ablation: ab},
		engine.PredictInput{Air: in.Target.Air, Prep: in.Target.Prep, WeightLb: in.Target.WeightLb, Time: in.Target.Time, Change: in.Target.Change}, pitcardCache)
	if err != nil || len(pr.Timers) == 0 {
		return 0, 0, 0, false
	}
	est := pr.Estimate()
	return est.ET, pr.Finish().SD, est.SD, true
}

// pitcardCache is Pitcard's cache of held-out predictions.
var pitcardCache = engine.NewHeldOutCache()

// PhysicsOnly is the calibrated pass model alone (engine.Calibrate and
// engine.Predict, no blend): the second generation, for comparison.
func PhysicsOnly(in Input) (et, sd float64, ok bool) {
	fit, err := engine.Calibrate(engine.CalibrateInput{Car: in.Car, Track: in.Track, Tracks: in.Tracks, Passes: in.Before, Now: in.Target.Time})
	if err != nil {
		return 0, 0, false
	}
	f := engine.Predict(fit, engine.PredictInput{Air: in.Target.Air, Prep: in.Target.Prep, WeightLb: in.Target.WeightLb, Time: in.Target.Time}).Finish()
	return f.ET, f.SD, true
}

// The rest of the file is the harness's other uses of engine's logbook
// types, kept here so a move of Pass and Timers touches one file.

// Pass is a logged pass as a crew's logbook holds it; Car and Track are
// car.yaml and a track.yaml.
type (
	Pass  = logbook.Pass
	Car   = engine.Car
	Track = engine.Track
)

// finishAt is the pass's elapsed time at ft, if timed.
func finishAt(p Pass, ft float64) (float64, bool) { return p.ETAt(ft) }

// abortedByNote: the crew's notes say the run was not the car's time
// (pitcard's default words).
func abortedByNote(p Pass) bool { return logbook.DefaultAbortWords.Aborted(p.Notes) }

// normalQuantile is the standard normal quantile.
func normalQuantile(p float64) float64 { return stats.NormalQuantile(p) }

// inputs turns a world into what its crew has: the car.yaml, the tracks'
// track.yaml (by lower-case name) and the logged passes.
func inputs(w truthsim.World, passes []truthsim.Pass) (Car, map[string]Track, []Pass) {
	tracks := map[string]Track{}
	for _, t := range w.AllTracks() {
		tracks[strings.ToLower(t.Name)] = t.Engine()
	}
	logged := make([]Pass, len(passes))
	for i, p := range passes {
		logged[i] = p.Logged
	}
	return w.CarYAML(w.Claim), tracks, logged
}
