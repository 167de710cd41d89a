package engine_test

import (
	"fmt"
	"math"
	"os"
	"strings"
	"sync"
	"testing"

	"pitcard/engine"
	"pitcard/internal/heldout"
	"pitcard/internal/truthsim"
	"pitcard/logbook"
)

// The acceptance test of the pass model (the standard here is not a
// handbook but a second simulator: its noise floor is computed, no source
// is quoted; its own physics is checked against the trade's published
// relations in internal/truthsim): scored on worlds from another
// simulator (internal/truthsim: other physics, other air laws, day effects,
// rubber, fuel, aborted runs), every pass of the last race days predicted
// from the passes before it, exactly as a race day runs. The yardstick is
// the noise floor: how far the logged times lie from the truth's own
// noiseless run (what a predictor that knew this physics, the car and the
// day would miss), computed, not assumed.

// heldOut is the score of one world.
type heldOut struct {
	world                 string
	n                     int
	mae, floor, last      float64
	strict                float64 // the oracle that knows the day's hidden state too
	covered               int
	firstMAE, laterMAE    float64
	floorFirst, floorLate float64
}

// scoreWorld predicts each clean pass of the last `targets` days of w from
// the passes before it.
func scoreWorld(t testing.TB, w truthsim.World, targetDays int, claimOff float64, ab engine.Ablation) heldOut {
	passes := w.Season()
	car, trk := w.CarYAML(claimOff), w.EngineTrack()
	fin := truthsim.FinishIndex(w.Car.DistanceFt)
	logged := make([]logbook.Pass, len(passes))
	for i, p := range passes {
		logged[i] = p.Logged
	}
	s := heldOut{world: w.String()}
	bayes := heldout.Floors(passes, fin, w.Car.DistanceFt) // the noise floor, as the held-out harness computes it
	cache := engine.NewHeldOutCache()
	var errs, floor, strict, last, first, later, floorFirst, floorLate []float64
	for k, p := range passes {
		if p.Day < w.Days-targetDays || p.Aborted {
			continue
		}
		pr, _, err := engine.Forecast(engine.CalibrateInput{Car: car, Track: trk, Passes: logged[:k], Now: p.Logged.Time, Ablation: ab},
			engine.PredictInput{Air: p.Logged.Air, Prep: 1, WeightLb: p.Logged.WeightLb, Time: p.Logged.Time}, cache)
		if err != nil {
			t.Error(err)
			return s
		}
		f := pr.Finish()
		if os.Getenv("PITCARD_DEBUG_BLEND") != "" {
			var maes []string
			for _, m := range pr.Blend.Members {
				maes = append(maes, fmt.Sprintf("%.3f@%.3f", m.Share, m.MAE))
			}
			t.Logf("%s #%d %s scale %.2f", w.Car.Name, k, strings.Join(maes, " "), pr.Blend.Scale)
		}
		actual, _ := p.Logged.ETAt(w.Car.DistanceFt)
		e := math.Abs(f.ET - actual)
		errs = append(errs, e)
		if p.InDay == 0 {
			first = append(first, e)
		} else {
			later = append(later, e)
		}
		floor = append(floor, math.Abs(bayes[k]-actual))
		strict = append(strict, math.Abs(p.Oracle[fin]-actual))
		if p.InDay == 0 {
			floorFirst = append(floorFirst, math.Abs(bayes[k]-actual))
		} else {
			floorLate = append(floorLate, math.Abs(bayes[k]-actual))
		}
		if f.Low <= actual && actual <= f.High {
			s.covered++
		}
		for j := k - 1; j >= 0; j-- { // the last clean pass, as it ran
			if !passes[j].Aborted {
				prev, _ := passes[j].Logged.ETAt(w.Car.DistanceFt)
				last = append(last, math.Abs(prev-actual))
				break
			}
		}
	}
	s.n, s.mae, s.floor, s.last = len(errs), meanOf(errs), meanOf(floor), meanOf(last)
	s.firstMAE, s.laterMAE = meanOf(first), meanOf(later)
	s.strict, s.floorFirst, s.floorLate = meanOf(strict), meanOf(floorFirst), meanOf(floorLate)
	return s
}

func meanOf(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	var s float64
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}

// claims are how far each crew's car.yaml power is from the truth's: dyno
// sheets flatter, and some crews guess low.
var claims = []float64{0.06, -0.05, 0.10, 0.0, -0.08, 0.04}

// scoreAll scores every world of the season drawn with the seeds shifted
// by shift: the average of the worlds' ratios to their floors, the worst,
// and the interval's coverage; ab switches mechanisms off (zero: none).
func scoreAll(t *testing.T, shift uint64, ab engine.Ablation) (avg, worst float64, covered, n int, lines []string) {
	worlds := truthsim.Worlds()
	for i := range worlds {
		worlds[i].Seed += shift
	}
	scores := make([]heldOut, len(worlds))
	var wg sync.WaitGroup
	for i, w := range worlds { // the worlds are independent: score them side by side
		wg.Add(1)
		go func() {
			defer wg.Done()
			scores[i] = scoreWorld(t, w, 5, claims[i%len(claims)], ab)
		}()
	}
	wg.Wait()
	var ratios []float64
	for _, s := range scores {
		r := s.mae / s.floor
		ratios = append(ratios, r)
		worst = math.Max(worst, r)
		n += s.n
		covered += s.covered
		lines = append(lines, fmt.Sprintf("%-62s n=%2d MAE %.4f floor %.4f (strict %.4f) ratio %.2f | first %.4f/%.4f later %.4f/%.4f | last-pass %.4f | 95%% covers %d/%d",
			s.world, s.n, s.mae, s.floor, s.strict, r, s.firstMAE, s.floorFirst, s.laterMAE, s.floorLate, s.last, s.covered, s.n))
	}
	return meanOf(ratios), worst, covered, n, lines
}

// The bar: over two seasons of every world (seeds as drawn, and shifted by
// 1000), the held-out finish-ET MAE averages at most 1.25× the noise floor,
// no world's exceeds 1.6×, and the 95 % interval covers 93–97 % of the
// held-out passes. (The second generation met 1.2 and 1.4 here, on the
// worlds it was tuned on; the third trades 1.17 → 1.23 on them for the
// drawn family's held-out median 1.94 → 1.55: see internal/heldout.)
func TestModelGeneralisesToAnotherWorld(t *testing.T) {
	if testing.Short() {
		t.Skip("the independent-world score takes a few seconds; run without -short")
	}
	var ratios []float64
	var covered, n int
	var all []string
	for _, shift := range []uint64{0, 1000} {
		// PITCARD_TRUTH_SEED draws other seasons (the same cars and tracks,
		// other days): a check beyond the two the bar is set on.
		if v := os.Getenv("PITCARD_TRUTH_SEED"); v != "" {
			var extra uint64
			fmt.Sscan(v, &extra)
			shift += extra
		}
		avg, worst, c, k, lines := scoreAll(t, shift, engine.Ablation{})
		for _, l := range lines {
			t.Log(l)
		}
		summary := fmt.Sprintf("seeds +%d: average ratio %.2f, worst %.2f; 95 %% interval covered %d of %d", shift, avg, worst, c, k)
		t.Log(summary)
		all = append(append(all, lines...), summary)
		ratios = append(ratios, avg)
		covered, n = covered+c, n+k
		if worst > 1.6 {
			t.Errorf("seeds +%d: a world's held-out MAE is %.2f× its noise floor (at most 1.6)", shift, worst)
		}
	}
	avg, cov := meanOf(ratios), float64(covered)/float64(n)
	summary := fmt.Sprintf("both seasons: average ratio %.2f; 95 %% interval covered %d of %d held-out passes (%.1f %%)", avg, covered, n, 100*cov)
	t.Log(summary)
	if out := os.Getenv("PITCARD_SCORE_OUT"); out != "" {
		_ = os.WriteFile(out, []byte(strings.Join(append(all, summary), "\n")+"\n"), 0o644)
	}
	if avg > 1.25 {
		t.Errorf("held-out MAE averages %.2f× the noise floor (at most 1.25)", avg)
	}
	if cov < 0.93 || cov > 0.97 {
		t.Errorf("the 95 %% interval covered %.1f %% of held-out passes (want 93–97 %%)", 100*cov)
	}
}

// The ablation table: each mechanism off in turn, the rest on, over four
// seasons. PITCARD_ABLATE=1 go test ./engine -run TestAblation -v
func TestAblation(t *testing.T) {
	if os.Getenv("PITCARD_ABLATE") == "" {
		t.Skip("set PITCARD_ABLATE=1 for the ablation table (a few minutes)")
	}
	means := map[string]float64{}
	for _, m := range append([]string{""}, engine.Mechanisms...) {
		ab := engine.AblationOf(m)
		var parts []string
		var sum float64
		var covered, n int
		for _, shift := range []uint64{0, 1000, 2000, 3000} {
			avg, worst, c, k, _ := scoreAll(t, shift, ab)
			sum += avg
			covered, n = covered+c, n+k
			parts = append(parts, fmt.Sprintf("%.2f (worst %.2f)", avg, worst))
		}
		name := m
		if name == "" {
			name = "all on"
		}
		t.Logf("| %s off | %s | mean %.3f | coverage %.1f %% |", name, strings.Join(parts, " | "), sum/4, 100*float64(covered)/float64(n))
		means[m] = sum / 4
	}
	// The bar of TestModelGeneralisesToAnotherWorld holds with all on, and
	// every mechanism pays for itself (DEVELOPERS.md: one that does not
	// goes): switched off, the mean ratio to the floor is no better. The
	// 0.005 allowed lets a tie at the table's third decimal pass (the split
	// air law read 1.178 on and off when this was written).
	if all := means[""]; all > 1.25 {
		t.Errorf("all mechanisms on: mean ratio %.3f (at most 1.25)", all)
	}
	for _, m := range engine.Mechanisms {
		if means[m] < means[""]-0.005 {
			t.Errorf("%s off: mean ratio %.3f, better than all on (%.3f): it does not pay for itself", m, means[m], means[""])
		}
	}
}
