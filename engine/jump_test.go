package engine_test

import (
	"math"
	"testing"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/engine"
	"pitcard/internal/truthsim"
	"pitcard/logbook"
)

// One more ordinary pass in unchanged conditions moves the prediction by
// what that pass's information warrants, not by tenths: a pass run exactly
// as predicted, in the air of the next, moves the next's prediction by less
// than 0.02 s (pitcard's own bound: a hundredth or two is one pass's worth
// for a consistent bracket car, common practice, no source). Checked at
// twelve points of two seasons of the second simulator (internal/truthsim),
// from a short logbook to a long one.
func TestOnePassDoesNotJumpThePrediction(t *testing.T) {
	if testing.Short() {
		t.Skip("twelve forecasts with their held-out scoring")
	}
	cache := engine.NewHeldOutCache()
	worst := 0.0
	for _, w := range truthsim.Worlds()[:2] {
		season := w.Season()
		var passes []logbook.Pass
		for _, p := range season {
			if !p.Aborted {
				passes = append(passes, p.Logged)
			}
		}
		car, trk := w.CarYAML(0), w.EngineTrack()
		for _, k := range []int{6, 12, 25, 40, 60, 90} {
			if k+1 >= len(passes) {
				continue
			}
			next := passes[k]
			in := engine.PredictInput{Air: next.Air, Prep: 1, WeightLb: next.WeightLb, Time: next.Time}
			forecast := func(before []logbook.Pass, at time.Time) float64 {
				in := in
				in.Time = at
				pr, _, err := engine.Forecast(engine.CalibrateInput{Car: car, Track: trk, Passes: before, Now: at}, in, cache)
				if err != nil {
					t.Fatal(err)
				}
				return pr.Finish().ET
			}
			before := forecast(passes[:k], next.Time)
			// the ordinary pass: the last pass's slip, in the next pass's air,
			// every timer scaled to finish where the prediction said
			ord := passes[k-1]
			ord.Time, ord.Air, ord.Notes, ord.Change = next.Time.Add(-10*time.Minute), next.Air, "", ""
			ord.Air.Time = ord.Time
			last, _ := ord.ETAt(w.Car.DistanceFt)
			var ets [5]decimal.NullDecimal
			for j, v := range ord.ET {
				if v.Valid {
					ets[j] = decimal.NewNullDecimal(decimal.NewFromFloat(v.Decimal.InexactFloat64() * before / last).Round(3))
				}
			}
			ord.ET = ets
			after := forecast(append(append([]logbook.Pass(nil), passes[:k]...), ord), next.Time)
			d := math.Abs(after - before)
			worst = math.Max(worst, d)
			if d > 0.02 {
				t.Errorf("%s, after %d passes: one ordinary pass moved the prediction %.3f s (%.3f → %.3f)", w.Car.Name, k, d, before, after)
			}
		}
	}
	t.Logf("the largest move from one ordinary pass: %.4f s", worst)
}
