package engine

import (
	"math"
	"time"
)

// GroupStats sums up a group of passes: one day's time trials, say.
type GroupStats struct {
	Day                        time.Time // midnight of the day
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
}

// Stats groups passes by day, and within each day by session kind (time
// trials, eliminations, tests), with a row for the whole day. ET figures use
// each group's clean passes at its most common finish distance. The spreads
// are raw: not corrected for the air, which moves through a day.
func Stats(passes []Pass) []GroupStats {
	type key struct {
		day  string
		kind SessionKind
		all  bool
	}
	var order []key
	groups := map[key][]Pass{}
	for _, p := range passes {
		day := p.Time.Format("2006-01-02")
		for _, k := range []key{{day, 0, true}, {day, p.Session.Kind, false}} {
			if _, ok := groups[k]; !ok {
				order = append(order, k)
			}
			groups[k] = append(groups[k], p)
		}
	}
	var out []GroupStats
	for _, k := range order {
		g := groups[k]
		y, m, d := g[0].Time.Date()
		s := GroupStats{Day: time.Date(y, m, d, 0, 0, 0, 0, g[0].Time.Location()), Kind: k.kind, All: k.all, Passes: len(g)}
		s.Finish = commonFinish(g)
		var ets, rts, sixties []float64
		for _, p := range g {
			if p.RT.Valid && !p.RT.Decimal.IsNegative() {
				rts = append(rts, p.RT.Decimal.InexactFloat64())
			}
			if Aborted(p.Notes) {
				continue
			}
			if et, ok := p.ETAt(s.Finish); ok {
				ets = append(ets, et)
			}
			if sf, ok := p.ETAt(60); ok {
				sixties = append(sixties, sf)
			}
		}
		s.Clean = len(ets)
		if len(ets) > 0 {
			s.ETMean, s.ETSD = meanSD(ets)
			s.ETMin, s.ETMax = minMax(ets)
		}
		s.RTN = len(rts)
		if len(rts) > 0 {
			s.RTMean, s.RTSD = meanSD(rts)
		}
		s.SixtyN = len(sixties)
		if len(sixties) > 1 {
			_, s.SixtySD = meanSD(sixties)
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

// Consistency puts an ET spread (one standard deviation, s) into words a crew
// uses. The bands are common practice for a bracket car (no source): within
// a few hundredths is a car you can dial; a tenth is a car to sort out.
func Consistency(sd float64, n int) string {
	switch {
	case n < 3:
		return "too few passes to judge"
	case sd <= 0.015:
		return "very consistent: dial it with confidence"
	case sd <= 0.03:
		return "consistent"
	case sd <= 0.06:
		return "some scatter: check the air and the notes"
	default:
		return "inconsistent: look for lifted or spinning runs, or a car problem"
	}
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
