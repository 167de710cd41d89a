package engine

import (
	"fmt"
	"math"
	"slices"

	"pitcard/internal/text"
	"pitcard/logbook"
)

// What the crew's setup items are worth for this car: the effect of each
// numeric item on the 60 ft and on the finish, per unit, learned from the
// passes that varied it.

// SetupTimers are the timers a setup effect is fitted at: the 60 ft and
// the finish (SetupEffect's index 0 and 1).
var SetupTimers = [2]string{"et60", "et"}

// SetupPriorSpan is the prior's spread (one SD), s, of what an item swept
// across its whole car.yaml range does to the 60 ft and to the finish: a
// setup item can take a car from a good launch to a bog, a few tenths at
// 60 ft and about half a second at the finish (common practice, no source).
// Per unit it is the span over the range's width, so a crew's range says
// how finely the item is set: rear tire psi over [6, 40] has a prior SD of
// 0.30/34 ≈ 0.009 s per psi at 60 ft.
var SetupPriorSpan = [2]float64{0.30, 0.50}

// SetupMinDistinct is the fewest distinct values of an item among the
// fitted passes that can say what it is worth.
const SetupMinDistinct = 4

// setupSigmaFloor is the least residual scatter, s, a fit of an effect
// assumes (a logbook typed to the thousandth cannot be tighter).
const setupSigmaFloor = 0.002

// SetupEffect is what one numeric setup item is worth, per unit, at the 60
// ft (index 0) and at the finish (index 1).
type SetupEffect struct {
	Item logbook.SetupItem
	// Passes is how many of the fitted passes recorded the item; Distinct
	// how many values they hold; Lo, Hi and Spread (one SD) the values.
	Passes, Distinct int
	Lo, Hi, Spread   float64
	// Enough: the passes say more of the item than the prior does (at least
	// SetupMinDistinct values, and the data's own standard error below the
	// prior's SD). Without it Effect and SE are the prior's: the crew's
	// expect (or 0) and the prior SD.
	Enough bool
	// Effect is the posterior effect, s per unit (+: slower as the value
	// rises), and SE its standard error; Prior and PriorSD the prior's.
	Effect, SE, Prior, PriorSD [2]float64
}

// SetupEffects fits each numeric setup item of the car's setup to the
// fitted passes of f.
//
// The residual of a pass is its logged time minus the calibrated model's
// in the pass's own air and track (Sample.Obs − Sample.Sim: the fit's
// samples carry both, so this costs no simulation; a pass from before a
// change of the car is already carried across it, and the outliers are
// already out). The day offsets the fit takes out (Sample.Nuisance) are
// left in: a setup changed between days would otherwise be taken for the
// day. Each item's effect is the slope of those residuals on its value,
// with a free intercept, under a normal prior (a ridge regression): prior
// mean the crew's expect (0 when not given), prior SD SetupPriorSpan over
// the range's width, the residual scatter estimated from the same passes
// (at least setupSigmaFloor). Items are fitted one at a time: items always
// changed together cannot be told apart, and each is credited with both.
// Only the passes of the fit (at most FitWindow, the latest) are used.
func SetupEffects(f Fit) []SetupEffect {
	var out []SetupEffect
	fin := logbook.TimerIndex(f.Car.DistanceFt)
	timers := [2]int{0, fin}
	for _, it := range f.Car.Setup {
		if !it.Numeric() || len(it.Range) != 2 {
			continue
		}
		e := SetupEffect{Item: it}
		width := it.Range[1] - it.Range[0]
		for k := range 2 {
			e.Prior[k] = it.Expect[SetupTimers[k]]
			e.PriorSD[k] = SetupPriorSpan[k] / width
			e.Effect[k], e.SE[k] = e.Prior[k], e.PriorSD[k]
		}
		var xs []float64
		var rs [2][]float64
		for _, s := range f.Samples {
			x, ok := it.Value(s.Pass)
			if !ok || fin < 0 {
				continue
			}
			var r [2]float64
			for k, ti := range timers {
				r[k] = s.Obs[ti] - s.Sim.ET[ti]
			}
			if math.IsNaN(r[1]) {
				continue
			}
			xs = append(xs, x)
			rs[0], rs[1] = append(rs[0], r[0]), append(rs[1], r[1])
		}
		e.Passes = len(xs)
		if len(xs) == 0 {
			out = append(out, e)
			continue
		}
		e.Lo, e.Hi = slices.Min(xs), slices.Max(xs)
		distinct := slices.Clone(xs)
		slices.Sort(distinct)
		e.Distinct = len(slices.Compact(distinct))
		mx := meanOf(xs)
		var sxx float64
		for _, x := range xs {
			sxx += (x - mx) * (x - mx)
		}
		e.Spread = math.Sqrt(sxx / float64(len(xs)))
		enough := e.Distinct >= SetupMinDistinct && len(xs) >= SetupMinDistinct+1
		for k := range 2 {
			b, se, ok := ridgeSlope(xs, rs[k], e.Prior[k], e.PriorSD[k])
			if !ok {
				enough = false
				break
			}
			e.Effect[k], e.SE[k] = b, se
		}
		// the data's own standard error at the finish against the prior's SD
		if enough {
			_, dataSE, _ := ridgeSlope(xs, rs[1], 0, math.Inf(1))
			enough = dataSE < e.PriorSD[1]
		}
		e.Enough = enough
		if !enough {
			for k := range 2 {
				e.Effect[k], e.SE[k] = e.Prior[k], e.PriorSD[k]
			}
		}
		out = append(out, e)
	}
	return out
}

// ridgeSlope is the posterior slope of y on x, with a free intercept, under
// a normal prior N(m, tau²) on the slope, and its standard error; y's
// scatter is the residual SD of the least-squares line (n−2 degrees of
// freedom, at least setupSigmaFloor). ok is false when the fit has no
// residual degree of freedom or y is not finite.
func ridgeSlope(xs, ys []float64, m, tau float64) (b, se float64, ok bool) {
	n := len(xs)
	if n < 3 {
		return 0, 0, false
	}
	var ok2 = true
	for _, y := range ys {
		if math.IsNaN(y) || math.IsInf(y, 0) {
			ok2 = false
		}
	}
	if !ok2 {
		return 0, 0, false
	}
	mx, my := meanOf(xs), meanOf(ys)
	var sxx, sxy float64
	for i := range xs {
		sxx += (xs[i] - mx) * (xs[i] - mx)
		sxy += (xs[i] - mx) * (ys[i] - my)
	}
	if sxx == 0 {
		return 0, 0, false
	}
	ols := sxy / sxx
	var sse float64
	for i := range xs {
		d := ys[i] - my - ols*(xs[i]-mx)
		sse += d * d
	}
	sigma := math.Max(math.Sqrt(sse/float64(n-2)), setupSigmaFloor)
	prec := sxx / (sigma * sigma)
	num := sxy / (sigma * sigma)
	if !math.IsInf(tau, 1) {
		prec += 1 / (tau * tau)
		num += m / (tau * tau)
	}
	return num / prec, 1 / math.Sqrt(prec), true
}

// Text says the effect in words: "rear_psi: 60 ft +0.010 ± 0.002 s per psi,
// finish +0.015 ± 0.004, from 40 passes with 14–18 psi (SD 1.2)", or why
// there is not enough to say.
func (e SetupEffect) Text() string {
	u := e.Item.Unit
	varied := fmt.Sprintf("%s with %s–%s %s (SD %s)", text.Plural(e.Passes, "pass"), num(e.Lo), num(e.Hi), u, num(e.Spread))
	if !e.Enough {
		why := "no fitted pass recorded it"
		if e.Passes > 0 {
			why = fmt.Sprintf("%s, %d distinct", varied, e.Distinct)
		}
		belief := "the prior: none"
		if e.Prior != [2]float64{} {
			belief = fmt.Sprintf("the crew's belief: 60 ft %+.4f, finish %+.4f s per %s", e.Prior[0], e.Prior[1], u)
		}
		return fmt.Sprintf("%s: not enough variation to say (%s); %s", e.Item.Name, why, belief)
	}
	return fmt.Sprintf("%s: 60 ft %+.4f ± %.4f s per %s, finish %+.4f ± %.4f, from %s",
		e.Item.Name, e.Effect[0], e.SE[0], u, e.Effect[1], e.SE[1], varied)
}

// num prints a setup value as short as it reads.
func num(x float64) string {
	s := fmt.Sprintf("%.2f", x)
	for len(s) > 1 && s[len(s)-1] == '0' {
		s = s[:len(s)-1]
	}
	if s[len(s)-1] == '.' {
		s = s[:len(s)-1]
	}
	return s
}

// MarkSetupChanges gives each pass whose choice item (tire set, converter,
// tune) differs from the last pass that recorded it a change, as the
// change column would ("converter: stock → 5400-stall"), so the fit and
// the blend see a change of the car there. passes is not modified: a copy
// is returned when a change is marked. A pass with a change of its own
// keeps it.
func MarkSetupChanges(passes []logbook.Pass, setup logbook.Setup) []logbook.Pass {
	var choices []logbook.SetupItem
	for _, it := range setup {
		if !it.Numeric() {
			choices = append(choices, it)
		}
	}
	if len(choices) == 0 {
		return passes
	}
	out := passes
	last := make([]string, len(choices))
	for i := range passes {
		what := ""
		for j, it := range choices {
			v := passes[i].Extra[it.Name]
			if v == "" {
				continue
			}
			if last[j] != "" && v != last[j] && what == "" {
				what = fmt.Sprintf("%s: %s → %s", it.Name, last[j], v)
			}
			last[j] = v
		}
		if what == "" || passes[i].Change != "" {
			continue
		}
		if &out[0] == &passes[0] {
			out = slices.Clone(passes)
		}
		out[i].Change = what
	}
	return out
}
