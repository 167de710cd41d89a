package logbook

import (
	"math"
	"time"

	"pitcard/internal/stats"
	"pitcard/weather"
)

// GroupStats sums up a group of passes: one day's time trials, say.
type GroupStats struct {
	Day                        time.Time // midnight of the race day's date
	Kind                       SessionKind
	All                        bool    // true: every session kind of the day together
	Passes                     int     // passes in the group
	Clean                      int     // of them with a finish time and no aborted-run note
	Finish                     float64 // the distance the ETs are at, ft
	ETMean, ETSD, ETMin, ETMax float64
	RTN                        int
	RTMean, RTSD               float64
	SixtyN                     int
	SixtySD                    float64
	// CorrectedN and CorrectedSD are the spread of the clean passes' residuals
	// from the calibrated model: the ET scatter with the air and track taken out.
	CorrectedN  int
	CorrectedSD float64
}

// Stats groups passes by race day (day: when one begins, so a race night
// past midnight is one day), and within each day by session kind (time
// trials, eliminations, tests), with a row for the whole day. ET figures use
// each group's clean passes at its most common finish distance. The spreads
// are raw: not corrected for the air, which moves through a day.
//
// residual, when not nil, gives a pass's residual from the calibrated model
// (Fit.Residuals) for the corrected spread; day says which passes are one
// race day; aborts say which notes mark a pass that is left out of the ET
// figures (nil: DefaultAbortWords).
func Stats(passes []Pass, residual map[string]float64, day weather.DayStart, aborts AbortWords) []GroupStats {
	type key struct {
		day  string
		kind SessionKind
		all  bool
	}
	var order []key
	groups := map[key][]Pass{}
	for _, p := range passes {
		d := day.Key(p.Time)
		for _, k := range []key{{d, 0, true}, {d, p.Session.Kind, false}} {
			if _, ok := groups[k]; !ok {
				order = append(order, k)
			}
			groups[k] = append(groups[k], p)
		}
	}
	var out []GroupStats
	for _, k := range order {
		g := groups[k]
		s := GroupStats{Day: day.Day(g[0].Time), Kind: k.kind, All: k.all, Passes: len(g)}
		s.Finish = commonFinish(g)
		var ets, rts, sixties, res []float64
		for _, p := range g {
			if p.RT.Valid && !p.RT.Decimal.IsNegative() {
				rts = append(rts, p.RT.Decimal.InexactFloat64())
			}
			if aborts.Aborted(p.Notes) {
				continue
			}
			if et, ok := p.ETAt(s.Finish); ok {
				ets = append(ets, et)
				if r, ok := residual[p.Key()]; ok {
					res = append(res, r)
				}
			}
			if sf, ok := p.ETAt(60); ok {
				sixties = append(sixties, sf)
			}
		}
		s.Clean = len(ets)
		if len(ets) > 0 {
			s.ETMean, s.ETSD = stats.MeanSD(ets)
			s.ETMin, s.ETMax = minMax(ets)
		}
		s.RTN = len(rts)
		if len(rts) > 0 {
			s.RTMean, s.RTSD = stats.MeanSD(rts)
		}
		s.CorrectedN = len(res)
		if len(res) > 1 {
			_, s.CorrectedSD = stats.MeanSD(res)
		}
		s.SixtyN = len(sixties)
		if len(sixties) > 1 {
			_, s.SixtySD = stats.MeanSD(sixties)
		}
		out = append(out, s)
	}
	return out
}

func commonFinish(g []Pass) float64 {
	count := map[float64]int{}
	best, n := 0.0, 0
	for _, p := range g {
		if _, ft, ok := p.Finish(); ok {
			count[ft]++
			if count[ft] > n || (count[ft] == n && ft > best) {
				best, n = ft, count[ft]
			}
		}
	}
	return best
}

func minMax(v []float64) (float64, float64) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range v {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	return lo, hi
}

// Consistency puts an ET spread (one standard deviation, s) into the words a
// crew uses. The bands are common practice for a bracket car (no source):
// within a couple of hundredths is a car you can dial; a tenth is a car to
// sort out.
func Consistency(sd float64, n int) string {
	switch {
	case n < 3:
		return "too few to judge"
	case sd <= 0.015:
		return "very consistent"
	case sd <= 0.03:
		return "consistent"
	case sd <= 0.06:
		return "some scatter"
	default:
		return "inconsistent"
	}
}

// ConsistencyAdvice says what a crew does about each band of Consistency.
var ConsistencyAdvice = map[string]string{
	"very consistent": "dial it with confidence",
	"consistent":      "a normal bracket car",
	"some scatter":    "check the notes, the tires and the driver's routine",
	"inconsistent":    "look for lifted or spinning runs, or a car problem",
}

// String names a session kind in the plural: "time trials".
func (k SessionKind) String() string {
	switch k {
	case TimeTrial:
		return "time trials"
	case Elimination:
		return "eliminations"
	}
	return "tests"
}
