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

// Calibration settings.
const (
	// NuisanceRounds is how many times the day offsets are estimated and the
	// physics refitted around them (Calibrate's last step).
	NuisanceRounds = 1
	// FitWindow is the most clean passes a fit uses (the most recent).
	FitWindow = 60
	// FitHalfLifeDays is the calendar half-life of a pass's weight in the
	// fit: it halves every 120 days back (and every FitHalfLifePasses).
	FitHalfLifeDays = 120.0
	// FitHalfLifePasses is the half-life of a pass's weight in passes: it
	// halves every 20 passes back.
	FitHalfLifePasses = 20.0
	// FitAgeFloor is the least a pass's weight falls for its age alone, so a
	// winter's break does not hand the whole fit to the first few passes of
	// spring.
	FitAgeFloor = 0.25
	// OtherTrackWeight is the weight of a pass at another track.
	OtherTrackWeight = 0.5
	// OutlierMADs: a finish residual beyond this many robust deviations (and
	// beyond OutlierFloor) is taken for an aborted or pedaled run.
	OutlierMADs = 4.0
	// OutlierFloor is the least finish residual, s, taken for an outlier,
	// however tight the other passes lie.
	OutlierFloor = 0.05
	// FewForOutliers: with fewer clean passes than this, a pass is left out
	// only beyond GrossOutlier.
	FewForOutliers = 8
	// GrossOutlier is the finish residual, s, beyond which a pass is left
	// out even from a handful (a lift, a pedal).
	GrossOutlier = 0.20
)

// madToSD is the normal-consistency constant of the median absolute
// deviation: 1/Φ⁻¹(¾) ≈ 1.4826, so 1.4826·MAD estimates the standard
// deviation of normal data while a few wild passes cannot move it (Hampel
// 1974; Rousseeuw & Croux 1993).
const madToSD = 1.4826

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
	Pass     logbook.Pass
	Env      Env
	Obs      [5]float64 // logged ET at each timer, NaN where not timed
	Trap     [2]float64 // logged trap speeds at 660 and 1320, NaN where not timed
	FitShare float64    // its share in the fit: recency × track (not the car's weight)
	Sim      Run        // the calibrated model's run in this pass's conditions
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
	// Converged: the last Levenberg–Marquardt run ended at a minimum (a step
	// that lowered the cost by less than lmTolerance of it, or no damped
	// step that lowered it at all), not at lmMaxIterations while still
	// improving; Notes says so when it did not. False when nothing was
	// fitted (no clean passes).
	Converged bool
	lastGain  float64 // the last step's share of the cost, for the note
	// simsAt are the parameters each sample's Sim was run at, when simsValid:
	// a refit that starts there takes them rather than running them again.
	simsAt    Params
	simsValid bool
	// Ablation is the input's: which mechanisms were switched off (zero:
	// none), for Predict to honour too.
	Ablation Ablation
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
	// Ablation switches mechanisms of the model off, for the ablation test
	// only; the zero value is the model as it ships.
	Ablation Ablation
}

// Calibrate fits the physics model to the car's own logbook: a maximum a
// posteriori (MAP) fit of the six Params (effective power, traction, how
// power follows the air's pressure and its temperature, the grip band's best
// surface temperature and its width) by weighted least squares of simulated
// against logged timers and traps (residuals, robust by Huber's weights),
// with car.yaml, the induction type and the tire as the prior
// (DefaultParamsFor, priorSD), minimised by Levenberg–Marquardt (fit). A
// short logbook leans on the prior; a long one on the car's history. Recent
// passes weigh more, passes at the track of the day more than elsewhere.
//
// The steps, in order:
//  1. cleanPasses: the latest FitWindow clean passes with their weather;
//     aborted ones go to Outliers, ones without weather to NoAir;
//  2. setPrior: the power (car.yaml's or EstimatePower's), the vehicle, the
//     weight model and the prior as the starting point;
//  3. fit, then carryAcrossChange (change.go) and a refit when the car was
//     changed among the passes;
//  4. dropOutliers: a robust cut on the finish residuals (median and MAD),
//     and a refit without them;
//  5. NuisanceRounds of nuisance (dayeffect.go: each day's offset and the
//     drift through the day, taken out of the logged times) and a refit, so
//     the physics learns the air's and the track's effects from what changes
//     within and across days, not from one day's tune-up that happened to
//     come with a low barometer.
func Calibrate(in CalibrateInput) (Fit, error) {
	in.Passes = MarkSetupChanges(in.Passes, in.Car.Setup) // a changed choice item is a change of the car
	f := Fit{Car: in.Car, Track: in.Track, DayStart: in.DayStart, Ablation: in.Ablation}
	clean := f.cleanPasses(in)
	if err := f.setPrior(in); err != nil {
		return f, err
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
	if !in.Ablation.NoChangeCarry && f.carryAcrossChange(in.Changes) {
		f.fit()
	}
	if f.dropOutliers() {
		f.fit()
	}
	if !in.Ablation.NoNuisance {
		for range NuisanceRounds {
			f.nuisance()
			f.fit()
		}
	}
	if !f.Converged && f.lastGain > lmNoteGain {
		f.Notes = append(f.Notes, fmt.Sprintf("the fit stopped at its limit of %d steps, still gaining %.2f %% a step",
			lmMaxIterations, 100*f.lastGain))
	}
	if !in.Ablation.NoGripEdge {
		f.Params.SeenTrackF = seenTrack(f.Samples)
	}
	sort.SliceStable(f.Outliers, func(i, j int) bool { return f.Outliers[i].Pass.Time.After(f.Outliers[j].Pass.Time) })
	return f, nil
}

// cleanPasses walks the logbook back from in.Now and returns the latest
// clean passes with their weather at the distance raced, most recent first:
// at most FitWindow (40 under Ablation.Window40). On the way it files the
// passes the notes call aborted under f.Outliers and the clean passes logged
// without their weather under f.NoAir (at most FitWindow of those too).
func (f *Fit) cleanPasses(in CalibrateInput) []logbook.Pass {
	window := FitWindow
	if in.Ablation.Window40 {
		window = 40
	}
	var clean []logbook.Pass
	for i := len(in.Passes) - 1; i >= 0; i-- {
		p := in.Passes[i]
		if p.Time.After(in.Now) {
			continue
		}
		if _, ok := p.ETAt(in.Car.DistanceFt); !ok {
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
		if len(clean) == window {
			break
		}
	}
	return clean
}

// setPrior sets what the fit starts from: the power (car.yaml's, or
// EstimatePower's from the traps when car.yaml gives none), the vehicle, the
// weight model of the passes up to in.Now, and the parameters at the prior
// with the prior's covariance. It fails only when the power can be neither
// read nor estimated.
func (f *Fit) setPrior(in CalibrateInput) error {
	f.PowerHP = in.Car.PowerHP
	if f.PowerHP == 0 {
		hp, note, err := EstimatePower(in.Car, in.Passes, in.Aborts)
		if err != nil {
			return err
		}
		f.PowerHP, f.PowerEstimated = hp, true
		f.Notes = append(f.Notes, note)
	}
	f.Vehicle = NewVehicle(in.Car, f.PowerHP)
	f.Weight = newWeightModel(in.Car, passesUpTo(in.Passes, in.Now), in.DayStart)
	f.Params = DefaultParamsFor(in.Car)
	for k := range f.Cov {
		f.Cov[k][k] = sq(priorSD(in.Car.Induction)[k])
	}
	return nil
}

// passesUpTo are the passes not after now, in their order. Where none is
// after now (every held-out fit: its passes are those before its target) it
// is passes itself, not a copy: a copy of a 5,000-pass logbook for each of
// a card's fits cost more than the weight model made from it.
func passesUpTo(passes []logbook.Pass, now time.Time) []logbook.Pass {
	n := 0
	for i := range passes {
		if !passes[i].Time.After(now) {
			n++
		}
	}
	if n == len(passes) {
		return passes
	}
	out := make([]logbook.Pass, 0, n)
	for _, p := range passes {
		if !p.Time.After(now) {
			out = append(out, p)
		}
	}
	return out
}

// dropOutliers leaves out runs far from the rest (aborted, pedaled, a timing
// fault): a finish residual more than OutlierMADs robust deviations
// (madToSD·MAD about the median) and more than OutlierFloor from the median,
// or beyond GrossOutlier when fewer than FewForOutliers passes cannot say
// what scatter is normal. Each goes to f.Outliers with the reason in words.
// It reports whether any sample was dropped (and some kept): the fit must
// then be rerun.
func (f *Fit) dropOutliers() bool {
	dist := f.Car.DistanceFt
	res := make([]float64, len(f.Samples))
	for i, s := range f.Samples {
		res[i] = s.Obs[logbook.TimerIndex(dist)] - s.Sim.ETAt(dist)
	}
	med := stats.Median(res)
	dev := make([]float64, len(res))
	for i, r := range res {
		dev[i] = math.Abs(r - med)
	}
	limit := math.Max(OutlierMADs*madToSD*stats.Median(dev), OutlierFloor)
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
		return true
	}
	return false
}

// lmNoteGain: a fit stopped at lmMaxIterations still gaining more than
// this share of its cost a step is said on the card; below it the step
// moves the prediction by well under a thousandth (measured on the demo:
// 0.02 % a step), and a note would only be noise at the ropes.
const lmNoteGain = 0.005

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

// sample prepares pass p, the rank-th most recent clean pass, for the fit:
// its track's heading and prep, its weight (logged, else the weight model's,
// else car.yaml's), its weight in the fit (OtherTrackWeight away from the
// track of the day, halving with FitHalfLifeDays and FitHalfLifePasses down
// to FitAgeFloor for age) and its logged timers and traps.
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
	case f.Weight != nil && !f.Ablation.NoWeightFill:
		mass = f.Weight.At(p.Time) * weather.KgPerLb
	}
	age := in.Now.Sub(p.Time).Hours() / 24
	weight *= math.Max(math.Pow(0.5, age/FitHalfLifeDays), FitAgeFloor) * math.Pow(0.5, float64(rank)/FitHalfLifePasses)
	s := Sample{Pass: p, Env: NewEnv(p.Air, trk.HeadingDeg, prep, mass), FitShare: weight}
	for i := range logbook.TimerDistancesFt {
		s.Obs[i] = math.NaN()
		if et, ok := p.ETAt(logbook.TimerDistancesFt[i]); ok && logbook.TimerDistancesFt[i] <= in.Car.DistanceFt {
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

// theta is the parameters as the fit works on them: θ = (ln power scale,
// ln traction scale, pressure exponent, temperature exponent, best track
// °F, ln track width). The logs keep the scales positive and make their
// prior spreads relative.
type theta [NP]float64

func (p Params) theta() theta {
	return theta{math.Log(p.PowerScale), math.Log(p.TractionScale), p.PressureExp, p.TempExp, p.TrackOptF, math.Log(p.TrackWidthF)}
}

// params is θ as Params, clamped to the bounds; under ab.OneAirExponent the
// temperature exponent is tied to half the pressure exponent.
func (t theta) params(ab Ablation) Params {
	c := func(v, lo, hi float64) float64 { return math.Max(lo, math.Min(hi, v)) }
	if ab.OneAirExponent {
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
// standard deviations: beyond it a residual pulls linearly (Huber's loss,
// Huber 1964), so a bad day or a mislabelled pass cannot drag the car's
// physics with it. 3σ leaves a normal pass's residual quadratic almost
// always (99.7 %).
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

// heldAtPriorSD is the prior spread that holds a parameter at the prior
// (Ablation.NoGripBand), in θ's units.
const heldAtPriorSD = 1e-4

// residuals are the weighted residuals of every sample and the prior rows:
// the MAP fit's cost is their sum of squares. A sample's row is
// √weight·huber((simulated − (logged − nuisance))/σ) at each timer
// (timerSigma) and trap (trapSigma) it has; a prior row is
// (θₖ − priorₖ)/priorSDₖ. runs, if not nil, receives each sample's run.
func (f *Fit) residuals(th theta, runs []Run) []float64 {
	r, _ := f.residualsBelow(th, runs, math.Inf(1))
	return r
}

// residualsBelow are residuals, unless their cost (sum of squares) is
// sure to reach limit: it stops simulating the samples, and returns false,
// once the squares so far exceed limit (every row adds a square, so the cost
// can only grow; the margin covers a sum rounded otherwise than dot's). A
// damped step that does not lower the cost is known for one without
// simulating every sample.
func (f *Fit) residualsBelow(th theta, runs []Run, limit float64) ([]float64, bool) {
	p := th.params(f.Ablation)
	return f.residualsOf(th, func(i int) Run {
		run := Simulate(&f.Vehicle, p, f.Samples[i].Env, f.Car.DistanceFt)
		if runs != nil {
			runs[i] = run
		}
		return run
	}, limit)
}

// costMargin: residualsBelow stops only when the squares so far exceed its
// limit by this share, far beyond any difference of rounding.
const costMargin = 1e-9

// residualsOf are the residuals at th with each sample's run given by run
// (its index in f.Samples), or nil and false once the squares of the
// samples' rows exceed limit·(1 + costMargin) (see residualsBelow).
func (f *Fit) residualsOf(th theta, run func(int) Run, limit float64) ([]float64, bool) {
	prior := DefaultParamsFor(f.Car).theta()
	sd := priorSD(f.Car.Induction)
	r := make([]float64, 0, len(f.Samples)*(len(logbook.TimerDistancesFt)+2)+NP)
	stop := limit * (1 + costMargin)
	var sum float64
	for i := range f.Samples {
		if sum > stop {
			return nil, false
		}
		rows := len(r)
		s := &f.Samples[i]
		run := run(i)
		w := math.Sqrt(s.FitShare)
		for j := range logbook.TimerDistancesFt {
			if !math.IsNaN(s.Obs[j]) {
				r = append(r, w*huber((run.ET[j]-(s.Obs[j]-s.Nuisance[j]))/timerSigma[j]))
			}
		}
		for j, sim := range [2]float64{run.MPH660, run.MPH1320} {
			if !math.IsNaN(s.Trap[j]) {
				r = append(r, w*huber((sim-(s.Trap[j]-s.TrapNuisance[j]))/trapSigma))
			}
		}
		for _, x := range r[rows:] {
			sum += x * x
		}
	}
	for k := range th {
		s := sd[k]
		if f.Ablation.NoGripBand && k >= 4 {
			s = heldAtPriorSD
		}
		r = append(r, (th[k]-prior[k])/s)
	}
	return r, true
}

// Settings of the Levenberg–Marquardt fit (Levenberg 1944, Marquardt 1963:
// Gauss–Newton steps on JᵀJ with its diagonal scaled by 1+λ, λ lowered after
// a step that lowers the cost and raised after one that does not).
const (
	// lmMaxIterations bounds the steps of one fit. It starts from the
	// prior or the previous fit, and six parameters with a prior settle in
	// a handful of steps; each step costs NP+1 simulations of every sample,
	// so the bound keeps a 60-pass calibration in tens of milliseconds. A
	// fit that reaches it still improving says so (Fit.Converged).
	lmMaxIterations = 12
	// lmMaxTries is how many times one step raises λ tenfold before giving
	// up: eight take λ up by 10⁸, to a step a tiny fraction of the
	// gradient's; if none of those lowers the cost the fit is at a minimum
	// (or against a bound) as far as the finite differences can tell.
	lmMaxTries = 8
	// lmInitialDamping is λ at the start of a fit (Marquardt's customary
	// 10⁻³: nearly Gauss–Newton, the prior keeping JᵀJ well conditioned).
	lmInitialDamping = 1e-3
	// lmDampingFactor is how much λ falls after a step that lowers the cost
	// and rises after one that does not.
	lmDampingFactor = 10
	// lmMinDamping is the least λ: it stops λ underflowing over a long run
	// of good steps, so one bad step is undone in a few tries.
	lmMinDamping = 1e-7
	// lmTolerance: a step that lowers the cost by less than this share of it
	// ends the fit as converged (a hundredth of a percent of the cost: well
	// under a thousandth of a second).
	lmTolerance = 1e-4
	// jacobianStep is the forward difference's step in θ, for the Jacobian
	// (and the parameters' gradient in parameterSpread): small against
	// every parameter's prior spread, large against the simulation's
	// rounding.
	jacobianStep = 1e-4
)

// fit runs Levenberg–Marquardt from the current parameters to the MAP
// estimate, and sets f.Params, each sample's Sim at them, f.Cov (the
// inverse of the last JᵀJ, the Laplace approximation of the posterior's
// covariance in θ) and f.Converged. It keeps the runs of the step it took
// last (and, starting where the previous fit ended, that fit's), rather than
// running them again: they are the same numbers.
func (f *Fit) fit() {
	th := f.Params.theta()
	runs, trial := make([]Run, len(f.Samples)), make([]Run, len(f.Samples))
	var r []float64
	if f.simsValid && th.params(f.Ablation) == f.simsAt {
		r, _ = f.residualsOf(th, func(i int) Run { runs[i] = f.Samples[i].Sim; return runs[i] }, math.Inf(1))
	} else {
		r = f.residuals(th, runs)
	}
	cost := dot(r, r)
	lambda := lmInitialDamping
	var jtj [NP][NP]float64
	f.Converged = false
	for range lmMaxIterations {
		var g [NP]float64
		g, jtj = normalEquations(f.jacobian(th, r), r)
		t2, r2, c2, ok := f.lmStep(th, g, jtj, cost, &lambda, trial)
		if !ok {
			f.Converged = true // no damped step lowers the cost: at the minimum
			break
		}
		f.lastGain = math.Abs(cost-c2) / cost
		small := math.Abs(cost-c2) < lmTolerance*cost
		th, r, cost = t2, r2, c2
		runs, trial = trial, runs
		if small {
			f.Converged = true
			break
		}
	}
	f.Params = th.params(f.Ablation)
	for i := range f.Samples {
		f.Samples[i].Sim = runs[i]
	}
	f.simsAt, f.simsValid = f.Params, true
	if inv, ok := invertNP(jtj); ok {
		f.Cov = inv
	}
}

// jacobian is the residuals' Jacobian at th by forward differences (r are
// the residuals at th), one row per parameter.
func (f *Fit) jacobian(th theta, r []float64) [NP][]float64 {
	var jac [NP][]float64
	for k := range th {
		h := jacobianStep
		t2 := th
		t2[k] += h
		rk := f.residuals(t2, nil)
		jac[k] = make([]float64, len(r))
		for i := range r {
			jac[k][i] = (rk[i] - r[i]) / h
		}
	}
	return jac
}

// normalEquations are the gradient Jᵀr and the Gauss–Newton matrix JᵀJ.
func normalEquations(jac [NP][]float64, r []float64) (g [NP]float64, jtj [NP][NP]float64) {
	for a := range NP {
		g[a] = dot(jac[a], r)
		for b := range NP {
			jtj[a][b] = dot(jac[a], jac[b])
		}
	}
	return g, jtj
}

// lmStep is one Levenberg–Marquardt step from th: it solves
// (JᵀJ + λ·diag(JᵀJ))·δ = −Jᵀr, clamps θ+δ to the bounds, and takes it if it
// lowers the cost (λ then falls by lmDampingFactor, to at least
// lmMinDamping); otherwise λ rises by lmDampingFactor and it tries again, at
// most lmMaxTries times. It returns the new θ, its residuals and cost, and
// whether a step was taken; runs receives each sample's run at each θ it
// tries (at the new θ when a step was taken).
func (f *Fit) lmStep(th theta, g [NP]float64, jtj [NP][NP]float64, cost float64, lambda *float64, runs []Run) (theta, []float64, float64, bool) {
	for range lmMaxTries {
		var m [NP][NP]float64
		var rhs [NP]float64
		for a := range NP {
			for b := range NP {
				m[a][b] = jtj[a][b]
			}
			m[a][a] *= 1 + *lambda
			rhs[a] = -g[a]
		}
		step, ok := solveNP(m, rhs)
		if !ok {
			*lambda *= lmDampingFactor
			continue
		}
		t2 := th
		for k := range th {
			t2[k] += step[k]
		}
		t2 = t2.params(f.Ablation).theta() // clamp to bounds
		r2, below := f.residualsBelow(t2, runs, cost)
		if !below {
			*lambda *= lmDampingFactor // its cost is sure to reach the current one
			continue
		}
		if c2 := dot(r2, r2); c2 < cost {
			*lambda = math.Max(*lambda/lmDampingFactor, lmMinDamping)
			return t2, r2, c2, true
		}
		*lambda *= lmDampingFactor
	}
	return th, nil, cost, false
}

// dot is the dot product of two vectors of one length.
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

// invertNP inverts m column by column with solveNP; false when m is
// singular.
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
