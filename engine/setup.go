package engine

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"pitcard/internal/text"
	"pitcard/logbook"
	"pitcard/weather"
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
	// CarriedPrior: the crew's expect named the 60 ft only, and the
	// finish's prior is it carried down the track by the car's physics
	// (launchCarry).
	CarriedPrior bool
}

// launchGripStep is how much launchCarry lowers the tire's grip to see a
// 60-ft change: small, so the response is the slope at the car's grip.
const launchGripStep = 0.03

// launchCarry is how many seconds at the finish one second at the 60 ft
// is worth for the fitted car: its latest fitted pass (without one, a pass
// in standard air, standardEnv) simulated again with the tire's grip
// launchGripStep lower, the finish's change over the 60 ft's. A car that
// leaves softer is also slower where the grip still limits it past 60 ft
// and carries a lower speed on, so it is above 1 (1.40 for the engine
// tests' car, 1.34 for the demo's, measured). Where the model's grip does
// not limit the launch, 1 (a later start at the same pull). ok is false
// without the car's power.
func launchCarry(f Fit) (carry float64, ok bool) {
	if f.PowerHP <= 0 {
		return 0, false
	}
	env, dist := standardEnv(f), f.Car.DistanceFt
	if len(f.Samples) > 0 {
		env = f.Samples[0].Env
	}
	fin := logbook.TimerIndex(dist)
	if fin < 0 {
		return 0, false
	}
	v := f.Vehicle
	base := Simulate(&v, f.Params, env, dist)
	soft := f.Params
	soft.TractionScale *= 1 - launchGripStep
	v = f.Vehicle
	slow := Simulate(&v, soft, env, dist)
	d60, dFin := slow.ET[0]-base.ET[0], slow.ET[fin]-base.ET[fin]
	switch {
	case math.IsNaN(dFin) || math.IsNaN(d60):
		return 0, false
	case d60 <= 1e-4:
		// The model's launch is not grip-limited: a setup that moves the
		// 60 ft moves when the car gets going, not how hard it pulls after,
		// so it is carried one for one.
		return 1, true
	}
	return dFin / d60, true
}

// standardEnv is the conditions launchCarry runs a car without a fitted
// pass in: the U.S. Standard Atmosphere 1976 at the track's elevation, half
// humidity, the surface at the tire's best, the track's usual prep (full
// when it says none), the car's weight.
func standardEnv(f Fit) Env {
	std := weather.StandardAtmosphere(f.Track.Elevation())
	r := weather.Reading{Temp: std.Temp, Baro: std.Pressure, BaroKind: weather.StationPressure, RH: 0.5,
		TrackTemp: weather.Fahrenheit(TireBestF(f.Car.Tire)), HasTrack: true}
	prep, err := ParsePrep(f.Track.Prep)
	if err != nil || f.Track.Prep == "" {
		prep = 1
	}
	return NewEnv(r, f.Track.HeadingDeg, prep, f.Car.WeightLb*weather.KgPerLb)
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
		// A belief about the 60 ft alone is a belief about the finish too:
		// the launch's gain or loss is carried down the track.
		if _, atFinish := it.Expect[SetupTimers[1]]; !atFinish && e.Prior[0] != 0 {
			if carry, ok := launchCarry(f); ok {
				e.Prior[1], e.Effect[1], e.CarriedPrior = e.Prior[0]*carry, e.Prior[0]*carry, true
			}
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
	if e.Lo == e.Hi {
		varied = fmt.Sprintf("%s, all at %s %s", text.Plural(e.Passes, "pass"), num(e.Lo), u)
	}
	if !e.Enough {
		why := "no fitted pass recorded it"
		if e.Passes > 0 {
			why = varied
			if e.Distinct > 1 {
				why = fmt.Sprintf("%s, %d distinct values", varied, e.Distinct)
			}
		}
		belief := "the prior: none"
		if e.Prior != [2]float64{} {
			belief = fmt.Sprintf("the crew's belief: 60 ft %s, finish %s s per %s", signedN(e.Prior[0], 4), signedN(e.Prior[1], 4), u)
			if e.CarriedPrior {
				belief += " (the finish's carried from the 60 ft by the car's physics)"
			}
		}
		return fmt.Sprintf("%s: not enough variation to say (%s); %s", e.Item.Name, why, belief)
	}
	return fmt.Sprintf("%s: 60 ft %s ± %.4f s per %s, finish %s ± %.4f, from %s",
		e.Item.Name, signedN(e.Effect[0], 4), e.SE[0], u, signedN(e.Effect[1], 4), e.SE[1], varied)
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

// SetupChange is one planned change of a numeric setup item for the next
// pass (card --set), with what the item is worth.
type SetupChange struct {
	Effect        SetupEffect
	Planned, Last float64 // the planned value and the last pass's
}

// Move is what the change moves the 60 ft (0) and the finish (1), s, and
// the SD of that: the effect times the change, its SE times the change.
func (c SetupChange) Move() (shift, sd [2]float64) {
	d := c.Planned - c.Last
	for k := range 2 {
		shift[k], sd[k] = c.Effect.Effect[k]*d, math.Abs(c.Effect.SE[k]*d)
	}
	return shift, sd
}

// Text says the change for the card: "rear_psi 15 psi (was 16): 60 ft
// −0.009 ± 0.001, finish −0.014 ± 0.001, from 60 passes with 12.5–20.5
// psi", or on the crew's belief when the logbook cannot say.
func (c SetupChange) Text() string {
	e := c.Effect
	shift, sd := c.Move()
	from := fmt.Sprintf("from %s with %s–%s %s", text.Plural(e.Passes, "pass"), num(e.Lo), num(e.Hi), e.Item.Unit)
	if !e.Enough {
		from = "not enough variation in the logbook to say: the crew's expect in car.yaml"
		if e.Prior == [2]float64{} {
			from = "not enough variation in the logbook to say: no effect assumed, the interval widened for it"
		}
	}
	return fmt.Sprintf("setup: %s %s %s (was %s): 60 ft %s ± %.3f, finish %s ± %.3f, %s",
		e.Item.Name, num(c.Planned), e.Item.Unit, num(c.Last), signed(shift[0]), sd[0], signed(shift[1]), sd[1], from)
}

// signed prints a shift in s with its sign, a true minus for quicker.
func signed(x float64) string { return signedN(x, 3) }

// signedN prints x with its sign and dec decimals, a true minus.
func signedN(x float64, dec int) string {
	s := fmt.Sprintf("%+.*f", dec, x)
	if s[0] == '-' {
		return "−" + s[1:]
	}
	return s
}

// ApplySetup moves the prediction by the planned changes: the 60 ft by
// their 60-ft moves, the finish by their finish moves, every other timer by
// the finish's in proportion to its time (as the blend moves them); each
// SD widened by the moves' SDs (added in quadrature: the items' effects
// are fitted apart and taken as independent), the dial's spread with the
// finish's. The changes' texts are added to the notes.
func ApplySetup(pr *Prediction, changes []SetupChange) {
	if len(changes) == 0 || len(pr.Timers) == 0 {
		return
	}
	var shift, v [2]float64
	for _, c := range changes {
		s, sd := c.Move()
		for k := range 2 {
			shift[k] += s[k]
			v[k] += sd[k] * sd[k]
		}
		pr.Notes = append(pr.Notes, c.Text())
	}
	fin := pr.Finish()
	for i := range pr.Timers {
		t := &pr.Timers[i]
		var sh, sd float64
		switch {
		case t.DistanceFt == 60:
			sh, sd = shift[0], math.Sqrt(v[0])
		case t.DistanceFt == fin.DistanceFt:
			sh, sd = shift[1], math.Sqrt(v[1])
		default:
			scale := t.ET / fin.ET
			sh, sd = shift[1]*scale, math.Sqrt(v[1])*scale
		}
		t.ET += sh
		t.SD = math.Hypot(t.SD, sd)
		t.Low, t.High = interval(t.ET, t.SD)
	}
	if pr.DialSD > 0 {
		pr.DialSD = math.Hypot(pr.DialSD, math.Sqrt(v[1]))
	}
}

// PlannedSetup are the changes of the planned setup against the last
// pass's (each a name and its cell, as logbook.LastSetup gives them) for
// the numeric items of effs; an item unchanged, or without a last value, is
// no change. A choice item changed is a change of the car, which
// ChoiceChanges says.
func PlannedSetup(effs []SetupEffect, planned, last map[string]string) []SetupChange {
	var out []SetupChange
	for _, e := range effs {
		p, okP := planned[e.Item.Name]
		l, okL := last[e.Item.Name]
		if !okP || !okL || p == l {
			continue
		}
		pv, err1 := strconv.ParseFloat(p, 64)
		lv, err2 := strconv.ParseFloat(l, 64)
		if err1 != nil || err2 != nil || pv == lv {
			continue
		}
		out = append(out, SetupChange{Effect: e, Planned: pv, Last: lv})
	}
	return out
}

// ChoiceChanges says the planned choice items that differ from the last
// pass's, as a change of the car ("converter: stock → 5400-stall"), or "".
func ChoiceChanges(setup logbook.Setup, planned, last map[string]string) string {
	var parts []string
	for _, it := range setup {
		if it.Numeric() {
			continue
		}
		if p, l := planned[it.Name], last[it.Name]; p != "" && p != l {
			if l == "" {
				l = "not recorded"
			}
			parts = append(parts, fmt.Sprintf("%s: %s → %s", it.Name, l, p))
		}
	}
	return strings.Join(parts, "; ")
}
