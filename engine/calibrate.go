package engine

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"time"

	"pitcard/internal/stats"
	"pitcard/logbook"
	"pitcard/weather"
)

// Calibration fits the physics model to the car's own logbook: a maximum a
// posteriori fit of six parameters (effective power, traction, how power
// follows the air's pressure and its temperature, the grip band's best
// surface temperature and its width) by weighted least squares of
// simulated against logged timers and traps, with car.yaml, the induction
// type and the tire as the prior. A short logbook leans on the prior; a
// long one on the car's history. Recent passes weigh more, passes at the
// track of the day more than elsewhere; each day's offset and the drift
// through a day are taken out first (dayeffect.go).

// Calibration settings.
const (
	// NuisanceRounds is how many times the day offsets are estimated and the
	// physics refitted around them.
	NuisanceRounds = 1
	// FitWindow is the most clean passes a fit uses (the most recent).
	FitWindow = 60
	// FitHalfLifeDays and FitHalfLifePasses set the recency weights of the
	// fit: a pass's weight halves every 120 days and every 20 passes back,
	// but never falls below FitAgeFloor for age alone, so a winter's break
	// does not hand the whole fit to the first few passes of spring.
	FitHalfLifeDays   = 120.0
	FitHalfLifePasses = 20.0
	FitAgeFloor       = 0.25
	// OtherTrackWeight is the weight of a pass at another track.
	OtherTrackWeight = 0.5
	// OutlierMADs: a finish residual beyond this many robust deviations (and
	// beyond OutlierFloor) is taken for an aborted or pedaled run.
	OutlierMADs  = 4.0
	OutlierFloor = 0.05 // s
	// FewForOutliers: with fewer clean passes than this, a pass is left out
	// only beyond GrossOutlier.
	FewForOutliers = 8
	GrossOutlier   = 0.20 // s
)

// timerSigma is the scatter of a clean pass at each timer (s) and of a trap
// speed (mph): the weights of the least squares (common practice for a
// consistent bracket car, from memory).
var timerSigma = [5]float64{0.012, 0.014, 0.016, 0.019, 0.022}

const trapSigma = 0.6

// priorSD is the prior's spread of each fitted parameter, in the fit's
// terms (theta: logs of the scales and the curvature). A natural engine
// follows the air closely (SAE J607's law is the physics of filling the
// cylinders), so its exponents are held tighter than a boosted engine's,
// whose boost control is unknown.
func priorSD(ind Induction) theta {
	t := theta{0.25, 0.15, 0.15, 0.25, 15, 0.25}
	if ind == Turbo || ind == Supercharged {
		t[2], t[3] = 0.35, 0.3
	}
	return t
}

// Sample is one logged pass prepared for the fit.
type Sample struct {
	Pass   logbook.Pass
	Env    Env
	Obs    [5]float64 // logged ET at each timer, NaN where not timed
	Trap   [2]float64 // logged trap speeds at 660 and 1320, NaN where not timed
	Weight float64    // recency × track weight
	Sim    Run        // the calibrated model's run in this pass's conditions
	// Nuisance is what the fit takes out of the logged times before it
	// compares them with the physics: this pass's day offset and the drift
	// through its day, at each timer and trap (see nuisance).
	Nuisance     [5]float64
	TrapNuisance [2]float64
}

// Outlier is a pass the fit left out, and why.
type Outlier struct {
	Pass   logbook.Pass
	Reason string
}

// Fit is a calibrated model of the car.
type Fit struct {
	Car      Car
	Track    Track // the track of the day
	Vehicle  Vehicle
	Params   Params
	Cov      [NP][NP]float64 // covariance of the parameters, in the fit's terms (theta)
	Samples  []Sample        // the clean passes it fitted, most recent first
	NoAir    []logbook.Pass  // clean passes logged without their weather, most recent first
	Outliers []Outlier
	Notes    []string // what the fit leaned on and assumed, in words
	// PowerEstimated: car.yaml gave no power; it was estimated from the traps.
	PowerEstimated bool
	PowerHP        float64
	// Weight estimates the car's weight where a pass has none logged.
	Weight *weightModel
	// DayStart is the input's: where one race day ends and the next begins.
	DayStart weather.DayStart
	// Change is the latest change of the car among the fitted passes (nil:
	// none): the passes before it are carried across it.
	Change *Change
}

// CalibrateInput is what a fit needs.
type CalibrateInput struct {
	Car    Car
	Track  Track            // the track of the day
	Tracks map[string]Track // other tracks the logbook names, by lower-case name
	Passes []logbook.Pass
	Now    time.Time // the time of the prediction: recency counts back from it
	// DayStart is when a race day begins (setting day_starts): passes
	// either side of midnight on one race night are one day for the day
	// offsets, the drift through the day and the weight burnt. Zero is
	// midnight.
	DayStart weather.DayStart
	// Aborts are the words in notes that leave a pass out of the fit (the
	// crew's setting abort_words); nil: DefaultAbortWords.
	Aborts logbook.AbortWords
	// Changes are the words in notes that say the car was changed (the
	// crew's setting change_words); nil: logbook.DefaultChangeWords. A
	// pass's change column counts whatever the notes say.
	Changes logbook.ChangeWords
}

// Calibrate fits the car to its logbook.
func Calibrate(in CalibrateInput) (Fit, error) {
	f := Fit{Car: in.Car, Track: in.Track, DayStart: in.DayStart}
	dist := in.Car.DistanceFt
	var clean []logbook.Pass
	for i := len(in.Passes) - 1; i >= 0; i-- {
		p := in.Passes[i]
		if p.Time.After(in.Now) {
			continue
		}
		if _, ok := p.ETAt(dist); !ok {
			continue
		}
		if in.Aborts.Aborted(p.Notes) {
			f.Outliers = append(f.Outliers, Outlier{p, "notes say \"" + p.Notes + "\""})
			continue
		}
		if !p.HasAir {
			if len(f.NoAir) < FitWindow {
				f.NoAir = append(f.NoAir, p)
			}
			continue
		}
		clean = append(clean, p)
		if len(clean) == FitWindow || (ablation.window40 && len(clean) == 40) {
			break
		}
	}
	f.PowerHP = in.Car.PowerHP
	if f.PowerHP == 0 {
		hp, note, err := EstimatePower(in.Car, in.Passes, in.Aborts)
		if err != nil {
			return f, err
		}
		f.PowerHP, f.PowerEstimated = hp, true
		f.Notes = append(f.Notes, note)
	}
	f.Vehicle = NewVehicle(in.Car, f.PowerHP)
	var before []logbook.Pass
	for _, p := range in.Passes {
		if !p.Time.After(in.Now) {
			before = append(before, p)
		}
	}
	f.Weight = newWeightModel(in.Car, before, in.DayStart)
	f.Params = DefaultParamsFor(in.Car)
	for k := range f.Cov {
		f.Cov[k][k] = sq(priorSD(in.Car.Induction)[k])
	}
	if len(clean) == 0 {
		f.Notes = append(f.Notes, "no clean passes with their weather at this distance: physics from car.yaml alone")
		return f, nil
	}
	f.Samples = make([]Sample, len(clean))
	for i, p := range clean {
		f.Samples[i] = f.sample(p, in, i)
	}
	f.fit()
	if f.carryAcrossChange(in.Changes) {
		f.fit()
	}
	// Leave out runs far from the rest (aborted, pedaled, a timing fault), refit.
	res := make([]float64, len(f.Samples))
	for i, s := range f.Samples {
		res[i] = s.Obs[logbook.TimerIndex(dist)] - s.Sim.ETAt(dist)
	}
	med := stats.Median(res)
	dev := make([]float64, len(res))
	for i, r := range res {
		dev[i] = math.Abs(r - med)
	}
	limit := math.Max(OutlierMADs*1.4826*stats.Median(dev), OutlierFloor)
	if len(res) < FewForOutliers {
		// a handful of passes cannot say what scatter is normal: only a gross
		// miss (a lift, a pedal) is left out
		limit = math.Max(limit, GrossOutlier)
	}
	kept := f.Samples[:0:0]
	for i, s := range f.Samples {
		if dev[i] > limit {
			dir := "slower"
			if res[i] < 0 {
				dir = "quicker"
			}
			f.Outliers = append(f.Outliers, Outlier{s.Pass, fmt.Sprintf("ran %.3f s %s than the model expects in its air, when the other passes stay within %.3f s of it",
				math.Abs(res[i]), dir, limit)})
			continue
		}
		kept = append(kept, s)
	}
	if len(kept) < len(f.Samples) && len(kept) > 0 {
		f.Samples = kept
		f.fit()
	}
	// The day offsets and the drift through the day, as nuisances: taken out
	// of the logged times so the physics learns the air's and the track's
	// effects from what changes within and across days, not from one day's
	// tune-up that happened to come with a low barometer.
	for range NuisanceRounds {
		if ablation.noNuisance {
			break
		}
		f.nuisance()
		f.fit()
	}
	f.Params.SeenTrackF = seenTrack(f.Samples)
	sort.SliceStable(f.Outliers, func(i, j int) bool { return f.Outliers[i].Pass.Time.After(f.Outliers[j].Pass.Time) })
	return f, nil
}

// seenTrack is the range of surface temperatures of the fitted passes, °F.
func seenTrack(ss []Sample) [2]float64 {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, s := range ss {
		t := s.Env.TrackTemp.Fahrenheit()
		lo, hi = math.Min(lo, t), math.Max(hi, t)
	}
	if len(ss) == 0 {
		return [2]float64{}
	}
	return [2]float64{lo, hi}
}

func (f *Fit) sample(p logbook.Pass, in CalibrateInput, rank int) Sample {
	trk := in.Track
	weight := 1.0
	if !strings.EqualFold(p.Track, in.Track.Name) {
		weight = OtherTrackWeight
		trk = Track{Name: p.Track, Prep: "full"}
		if t, ok := in.Tracks[strings.ToLower(p.Track)]; ok {
			trk = t
		}
	}
	prep, err := ParsePrep(trk.Prep)
	if err != nil {
		prep = 1
	}
	mass := in.Car.WeightLb * weather.KgPerLb
	switch {
	case p.WeightLb > 0:
		mass = p.WeightLb * weather.KgPerLb
	case f.Weight != nil && !ablation.noWeightFill:
		mass = f.Weight.At(p.Time) * weather.KgPerLb
	}
	age := in.Now.Sub(p.Time).Hours() / 24
	weight *= math.Max(math.Pow(0.5, age/FitHalfLifeDays), FitAgeFloor) * math.Pow(0.5, float64(rank)/FitHalfLifePasses)
	s := Sample{Pass: p, Env: NewEnv(p.Air, trk.HeadingDeg, prep, mass), Weight: weight}
	for i := range logbook.Timers {
		s.Obs[i] = math.NaN()
		if et, ok := p.ETAt(logbook.Timers[i]); ok && logbook.Timers[i] <= in.Car.DistanceFt {
			s.Obs[i] = et
		}
	}
	s.Trap = [2]float64{math.NaN(), math.NaN()}
	if p.MPH660.Valid {
		s.Trap[0] = p.MPH660.Decimal.InexactFloat64()
	}
	if p.MPH1320.Valid && in.Car.DistanceFt >= 1320 {
		s.Trap[1] = p.MPH1320.Decimal.InexactFloat64()
	}
	return s
}

// NP is the number of fitted parameters.
const NP = 6

// The fit works on θ = (ln power scale, ln traction scale, pressure
// exponent, temperature exponent, best track °F, ln track width).
type theta [NP]float64

func (p Params) theta() theta {
	return theta{math.Log(p.PowerScale), math.Log(p.TractionScale), p.PressureExp, p.TempExp, p.TrackOptF, math.Log(p.TrackWidthF)}
}

func (t theta) params() Params {
	c := func(v, lo, hi float64) float64 { return math.Max(lo, math.Min(hi, v)) }
	if ablation.oneAirExponent {
		t[3] = t[2] / 2
	}
	// The bounds keep a fit off physics no car has: traction from 0.6 to 1.65
	// of the tire's, a grip well TrackWidthRangeF wide, the air mattering at
	// least a little and at most twice a natural engine's.
	return Params{PowerScale: math.Exp(c(t[0], -1.2, 1.2)), TractionScale: math.Exp(c(t[1], -0.5, 0.5)),
		PressureExp: c(t[2], -0.3, 2), TempExp: c(t[3], 0, 1.5), TrackOptF: c(t[4], 50, 170), TrackWidthF: math.Exp(c(t[5], math.Log(TrackWidthRangeF[0]), math.Log(TrackWidthRangeF[1])))}
}

func sq(x float64) float64 { return x * x }

// huberK is where the fit stops trusting a residual quadratically, in
// standard deviations: beyond it a residual pulls linearly (Huber's loss), so
// a bad day or a mislabelled pass cannot drag the car's physics with it.
const huberK = 3.0

// huber maps a scaled residual to one whose square is Huber's loss (×2):
// r itself within ±huberK, sign(r)·√(2k|r| − k²) beyond.
func huber(r float64) float64 {
	a := math.Abs(r)
	if a <= huberK {
		return r
	}
	return math.Copysign(math.Sqrt(2*huberK*a-huberK*huberK), r)
}

// residuals are the weighted residuals of every sample and the prior rows.
func (f *Fit) residuals(th theta, runs []Run) []float64 {
	p := th.params()
	prior := DefaultParamsFor(f.Car).theta()
	sd := priorSD(f.Car.Induction)
	var r []float64
	for i := range f.Samples {
		s := &f.Samples[i]
		run := Simulate(&f.Vehicle, p, s.Env, f.Car.DistanceFt)
		if runs != nil {
			runs[i] = run
		}
		w := math.Sqrt(s.Weight)
		for j := range logbook.Timers {
			if !math.IsNaN(s.Obs[j]) {
				r = append(r, w*huber((run.ET[j]-(s.Obs[j]-s.Nuisance[j]))/timerSigma[j]))
			}
		}
		for j, sim := range [2]float64{run.MPH660, run.MPH1320} {
			if !math.IsNaN(s.Trap[j]) {
				r = append(r, w*huber((sim-(s.Trap[j]-s.TrapNuisance[j]))/trapSigma))
			}
		}
	}
	for k := range th {
		s := sd[k]
		if ablation.noGripBand && k >= 4 {
			s = 1e-4 // held at the prior
		}
		r = append(r, (th[k]-prior[k])/s)
	}
	return r
}

// fit runs Levenberg–Marquardt from the current parameters.
func (f *Fit) fit() {
	th := f.Params.theta()
	runs := make([]Run, len(f.Samples))
	r := f.residuals(th, runs)
	cost := dot(r, r)
	lambda := 1e-3
	var jtj [NP][NP]float64
	for iter := 0; iter < 12; iter++ {
		// Jacobian by forward differences.
		var jac [NP][]float64
		for k := range th {
			h := 1e-4
			t2 := th
			t2[k] += h
			rk := f.residuals(t2, nil)
			jac[k] = make([]float64, len(r))
			for i := range r {
				jac[k][i] = (rk[i] - r[i]) / h
			}
		}
		var g [NP]float64
		for a := range NP {
			g[a] = dot(jac[a], r)
			for b := range NP {
				jtj[a][b] = dot(jac[a], jac[b])
			}
		}
		improved := false
		for try := 0; try < 8; try++ {
			var m [NP][NP]float64
			var rhs [NP]float64
			for a := range NP {
				for b := range NP {
					m[a][b] = jtj[a][b]
				}
				m[a][a] *= 1 + lambda
				rhs[a] = -g[a]
			}
			step, ok := solveNP(m, rhs)
			if !ok {
				lambda *= 10
				continue
			}
			t2 := th
			for k := range th {
				t2[k] += step[k]
			}
			t2 = t2.params().theta() // clamp to bounds
			r2 := f.residuals(t2, nil)
			if c2 := dot(r2, r2); c2 < cost {
				small := math.Abs(cost-c2) < 1e-4*cost // a hundredth of a percent of the cost: well under a thousandth of a second
				th, r, cost = t2, r2, c2
				lambda = math.Max(lambda/10, 1e-7)
				improved = true
				if small {
					iter = 99
				}
				break
			}
			lambda *= 10
		}
		if !improved {
			break
		}
	}
	f.Params = th.params()
	f.residuals(th, runs)
	for i := range f.Samples {
		f.Samples[i].Sim = runs[i]
	}
	if inv, ok := invertNP(jtj); ok {
		f.Cov = inv
	}
}

func dot(a, b []float64) float64 {
	var s float64
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

// solveNP solves m·x = b by Gaussian elimination with partial pivoting.
func solveNP(m [NP][NP]float64, b [NP]float64) ([NP]float64, bool) {
	for c := range NP {
		p := c
		for r := c + 1; r < NP; r++ {
			if math.Abs(m[r][c]) > math.Abs(m[p][c]) {
				p = r
			}
		}
		if math.Abs(m[p][c]) < 1e-300 {
			return b, false
		}
		m[c], m[p] = m[p], m[c]
		b[c], b[p] = b[p], b[c]
		for r := c + 1; r < NP; r++ {
			k := m[r][c] / m[c][c]
			for cc := c; cc < NP; cc++ {
				m[r][cc] -= k * m[c][cc]
			}
			b[r] -= k * b[c]
		}
	}
	var x [NP]float64
	for r := NP - 1; r >= 0; r-- {
		s := b[r]
		for c := r + 1; c < NP; c++ {
			s -= m[r][c] * x[c]
		}
		x[r] = s / m[r][r]
	}
	return x, true
}

func invertNP(m [NP][NP]float64) ([NP][NP]float64, bool) {
	var inv [NP][NP]float64
	for c := range NP {
		var e [NP]float64
		e[c] = 1
		x, ok := solveNP(m, e)
		if !ok {
			return inv, false
		}
		for r := range NP {
			inv[r][c] = x[r]
		}
	}
	return inv, true
}

// Residuals are each pass's finish ET minus the calibrated model's in that
// pass's conditions, keyed by Pass.Key: the car's scatter with the air and
// the track taken out. Passes without their weather or a finish are absent.
func (f *Fit) Residuals(in CalibrateInput) map[string]float64 {
	out := map[string]float64{}
	for _, p := range in.Passes {
		et, ok := p.ETAt(f.Car.DistanceFt)
		if !ok || !p.HasAir {
			continue
		}
		s := f.sample(p, in, 0)
		out[p.Key()] = et - Simulate(&f.Vehicle, f.Params, s.Env, f.Car.DistanceFt).ETAt(f.Car.DistanceFt)
	}
	return out
}

// EstimatePower estimates a car's flywheel power from its trap speeds with
// the power-weight relations of the trade (MPH = K·(P/W)^⅓, K = 224
// Huntington 1958, 230 Fox 1973, 234 a later fit; pitcard takes their mean,
// 229.3): P = W·(MPH/K)³. It uses the median quarter trap of the clean passes
// (or the eighth trap × 1.25, common practice); aborts mark the passes left
// out (nil: DefaultAbortWords).
func EstimatePower(c Car, passes []logbook.Pass, aborts logbook.AbortWords) (float64, string, error) {
	const k = (224 + 230 + 234) / 3.0
	var traps []float64
	for _, p := range passes {
		if aborts.Aborted(p.Notes) {
			continue
		}
		switch {
		case p.MPH1320.Valid:
			traps = append(traps, p.MPH1320.Decimal.InexactFloat64())
		case p.MPH660.Valid:
			traps = append(traps, 1.25*p.MPH660.Decimal.InexactFloat64())
		}
	}
	if len(traps) == 0 {
		return 0, "", &weather.InputError{Field: "power_hp", Reason: "is missing from car.yaml and the logbook has no trap speeds to estimate it from: give the car's power"}
	}
	mph := stats.Median(traps)
	hp := c.WeightLb * math.Pow(mph/k, 3)
	return hp, fmt.Sprintf("car.yaml gives no power: %.0f hp estimated from the median trap of %d passes (%.1f mph) by the power-weight relations (Huntington, Fox)", hp, len(traps), mph), nil
}
