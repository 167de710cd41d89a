package truthsim

import (
	"math"
	"strconv"
	"testing"
)

// The truth world must itself be a believable drag strip: quarter-mile ET
// and MPH inside the cube-root family of the trade (Huntington 1958: MPH =
// 224·(P/W)^⅓, ET = 6.290·(W/P)^⅓; Fox 1973: 230 and 6.269; a later fit 234
// and 5.825) within 12 % (its cars are not all well hooked), ET·MPH of a
// quarter 1250–1500 and a 60 ft of 1.2–2.2 s (common practice, from memory),
// and the eighth-to-quarter ratio 1.50–1.62 (the trade says 1.55–1.60 for an ordinary car, from memory; a four-speed on nitrous pulls harder at the top).
func TestTheTruthIsADragStrip(t *testing.T) {
	for _, w := range Worlds() {
		passes := w.Season()
		var et, sixty []float64
		for _, p := range passes {
			if p.Aborted {
				continue
			}
			et = append(et, p.Oracle[FinishIndex(w.Car.DistanceFt)])
			sixty = append(sixty, p.Oracle[0])
		}
		lo, hi := minMax(sixty)
		t.Logf("%s: 60 ft %.3f–%.3f, finish ET %s, %d passes", w, lo, hi, rangeText(et, w.Car.DistanceFt), len(passes))
		if lo < 1.2 || hi > 2.2 {
			t.Errorf("%s: 60 ft %.3f–%.3f outside 1.2–2.2 s", w, lo, hi)
		}
		if w.Car.DistanceFt == 1320 {
			p := passes[0]
			q := p.Oracle[4]
			mph := p.Logged.MPH1320.Decimal.InexactFloat64()
			hp := w.Car.PeakHP + w.Car.ShotHP
			fam := 5.825 * math.Cbrt(w.Car.WeightLb/hp)
			if q < fam*0.95 || q > 6.290*math.Cbrt(w.Car.WeightLb/hp)*1.12 {
				t.Errorf("%s: quarter %.3f s outside the cube-root family (%.3f–%.3f)", w, q, fam*0.95, 6.290*math.Cbrt(w.Car.WeightLb/hp)*1.12)
			}
			if q*mph < 1250 || q*mph > 1500 {
				t.Errorf("%s: ET·MPH %.0f", w, q*mph)
			}
			if r := q / p.Oracle[2]; r < 1.50 || r > 1.62 {
				t.Errorf("%s: quarter/eighth %.3f", w, r)
			}
		}
	}
}

func minMax(v []float64) (float64, float64) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range v {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	return lo, hi
}

func rangeText(v []float64, ft float64) string {
	lo, hi := minMax(v)
	return fmtF(lo) + "–" + fmtF(hi) + " at " + fmtF(ft) + " ft"
}

func fmtF(x float64) string { return strconvF(x) }

func strconvF(x float64) string { return strconv.FormatFloat(x, 'f', 3, 64) }
