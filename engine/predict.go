package engine

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"time"

	"pitcard/bracket"
	"pitcard/internal/stats"
	"pitcard/internal/text"
	"pitcard/logbook"
	"pitcard/weather"
)

// Prediction settings.
const (
	// BaseHalfLifeDays: an earlier race day's weight in the car's level
	// halves every this many days of calendar (and every DayHalfLife race
	// days).
	BaseHalfLifeDays = 56.0
	// IntervalZ is the interval's half-width in standard deviations: a 95 %
	// interval of a normal spread.
	IntervalZ = 1.96
	// PhysicsOnlySpread is the relative spread (one standard deviation) of a
	// prediction from car.yaml alone: a model that has never seen the car
	// can be off by several percent.
	PhysicsOnlySpread = 0.03
	// ExtrapolationShare: the part of a correction beyond the conditions the
	// logbook has seen is taken as uncertain by this share.
	ExtrapolationShare = 0.25
	// ExtrapolationFloor is the least uncertainty, as a share of the ET,
	// per 1000 ft of density altitude or 10 °F of track beyond the logbook.
	ExtrapolationFloor = 0.002
)

// Timer is the prediction at one timer.
type Timer struct {
	DistanceFt     float64
	ET, SD         float64 // s
	Low, High      float64 // the 95 % interval, s
	PhysicsOnly    float64 // the calibrated model alone, before the residual correction
	ResidualSpread float64
}

// Trap is the prediction of one trap speed.
type Trap struct {
	DistanceFt float64
	MPH, SD    float64
	Low, High  float64
}

// Leaned is a pass the prediction leaned on.
type Leaned struct {
	Pass    logbook.Pass
	Share   float64 // its share of the residual correction, 0..1
	Carried float64 // its finish ET carried to today's conditions, s
	ET      float64 // its logged finish ET, s
}

// Sensitivity is what a change of conditions is worth to this car today, in
// seconds of finish ET (positive: slower) and mph of trap speed.
type Sensitivity struct {
	PerKDA, PerKDAMPH             float64 // per 1000 ft more density altitude
	Per10FTrack                   float64 // per 10 °F hotter track
	Per10Headwind, Per10HeadMPH   float64 // per 10 mph more headwind
	Per10FAir                     float64 // per 10 °F warmer air (same pressure and dew point)
	PerTenthInHg                  float64 // per 0.1 inHg lower station pressure (same temperature and humidity)
	Per10PctRH                    float64 // per 10 points more relative humidity (same temperature and pressure)
	Sixty10FTrack                 float64 // 60-ft time per 10 °F hotter track
	DAFeet, TrackF, HeadwindMPH   float64 // today's values the sensitivities are taken at
	SeenDALo, SeenDAHi            float64 // density altitudes of the passes leaned on, ft
	SeenTrackLo, SeenTrackHi      float64 // their track temperatures, °F
	ExtrapolatedDA, ExtrapolatedT float64 // how far today lies outside them (ft, °F)
	// BeyondDA, BeyondTrack are how much of the ET, s, the model moves
	// between the edge of the conditions seen and today's: the part of the
	// prediction that rests on the model alone, out where no pass checks it.
	BeyondDA, BeyondTrack float64
}

// Prediction is the predicted next pass.
type Prediction struct {
	Distance    float64
	Timers      []Timer
	Traps       []Trap
	Model       Run // the calibrated model in today's conditions
	Env         Env
	Air         weather.Reading
	Params      Params
	Leaned      []Leaned // most-leaned-on first
	Outliers    []Outlier
	PhysicsOnly bool // no pass to calibrate to
	// Passes is how many clean passes of the car at the distance raced the
	// prediction rests on (with or without their weather).
	Passes int
	// Raw: the logbook's passes have no weather, so the prediction is their
	// plain average, not corrected for today's air.
	Raw         bool
	Sensitivity Sensitivity
	// Blend is what the finish leans on (Forecast); zero from Predict alone.
	Blend Blend
	// DialSD is the finish's spread for the dial's breakout chances, where
	// Forecast calibrated the quick tail apart from the interval (0: the
	// finish's SD).
	DialSD float64
	Notes  []string
	// The notes a reader tells apart, each as it stands in Notes ("" when
	// not made): the calibration's account, today outside the logbook's
	// conditions, what the blend leaned on, and the cold start's. A reader
	// compares a note with these, never with its wording.
	CalibrationNote, OutsideNote, BlendNote, ColdStartNote string
}

// Finish is the prediction at the finish line.
func (p Prediction) Finish() Timer { return p.Timers[len(p.Timers)-1] }

// MinPassesForDial is the fewest clean passes of the car at the distance
// raced before pitcard posts a dial-in. Below it the car's run-to-run spread
// is not measured and the estimate leans on physics and car.yaml, which can
// be off by tenths: a breakout chance computed from it would be a number
// pitcard has no right to. Three, because a first pass is the least
// predictable and two more show how the car repeats (common practice, no
// source: most racers make two or three time trials before dialing).
const MinPassesForDial = 3

// FewPassesForDial is the number of passes below which a dial is still
// posted but the card says it rests on few.
const FewPassesForDial = 6

// DialReady says whether the prediction may post a dial-in, and why not.
func (p Prediction) DialReady() (bool, string) {
	if p.Passes >= MinPassesForDial {
		return true, ""
	}
	what := "no clean pass"
	if p.Passes > 0 {
		what = fmt.Sprintf("only %s", text.Plural(p.Passes, "clean pass"))
	}
	return false, fmt.Sprintf("%s of this car at %.0f ft in the logbook (a dial is posted from %d): make a time trial first; the estimate is a guide only",
		what, p.Distance, MinPassesForDial)
}

// Estimate is the finish prediction as a dial-in estimate.
func (p Prediction) Estimate() bracket.Estimate {
	f := p.Finish()
	basis := "the pass model"
	switch {
	case p.PhysicsOnly:
		basis = "physics from car.yaml alone (no logbook passes to calibrate to: wide interval)"
	case p.Raw:
		basis = fmt.Sprintf("the plain average of %d recent passes logged without their weather (not corrected for the air)", len(p.Leaned))
	case p.Blend.ColdStart && len(p.Leaned) > 0:
		basis = fmt.Sprintf("%s carried to this air by the SAE J1349 factor (nothing fitted yet)", text.Plural(len(p.Leaned), "pass"))
	case len(p.Leaned) > 0:
		basis = fmt.Sprintf("the pass model calibrated to %s, corrected by the recent ones", text.Plural(len(p.Leaned), "pass"))
	}
	sd := f.SD
	if p.DialSD > 0 {
		sd = p.DialSD
	}
	return bracket.Estimate{ET: f.ET, SD: sd, Basis: basis}
}

// PredictInput is the conditions of the next pass.
type PredictInput struct {
	Air      weather.Reading // the air and track of the pass (station pressure)
	Prep     float64         // prep level of the surface, 0 none .. 1 full
	WeightLb float64         // 0: car.yaml's
	Time     time.Time       // when the pass will run
	// Change is the crew's words for a change made to the car since its
	// last pass (empty: none). No pass has shown yet what it is worth, so
	// Forecast widens the interval by ChangePriorShare of the ET.
	Change string
	// Quick skips the sensitivities and the parameters' share of the
	// interval (a backcast of an earlier pass needs only the ET).
	Quick bool
}

// Predict predicts every timer and trap of the next pass from fit: the
// calibrated model run in the conditions of the next pass, corrected by the
// structure of its residuals (what the model has got wrong: the car's
// level, today, the drift through the day; fitResiduals), each recent pass
// thereby "carried" to today's conditions. The interval comes from the
// spread of those residuals, widened by the parameters' uncertainty
// (parameterSpread), by how far today's air and track lie outside what the
// logbook has seen (extrapolation) and by a noted car change.
//
// With no clean pass with its weather it falls back on rawPrediction (two
// or more passes without weather) or physicsOnlyPrediction (car.yaml alone).
func Predict(f Fit, in PredictInput) Prediction {
	mass, weightNote := predictMass(f, in)
	env := NewEnv(in.Air, f.Track.HeadingDeg, in.Prep, mass)
	dist := f.Car.DistanceFt
	model := Simulate(&f.Vehicle, f.Params, env, dist)
	pr := Prediction{Distance: dist, Model: model, Env: env, Air: in.Air, Params: f.Params, Outliers: f.Outliers,
		Passes: len(f.Samples) + len(f.NoAir)}
	pr.Notes = append(pr.Notes, f.Notes...)
	if weightNote != "" && !in.Quick {
		pr.Notes = append(pr.Notes, weightNote)
	}
	if !in.Air.HasTrack {
		pr.Notes = append(pr.Notes, "track temperature not read: taken as the air plus 10 °F")
	}
	if !in.Quick {
		pr.Sensitivity = sensitivity(f, in, env, model)
	}
	timers := logbook.TimersFor(dist)

	if len(f.Samples) == 0 && len(f.NoAir) >= 2 {
		return rawPrediction(pr, f, timers)
	}
	if len(f.Samples) == 0 {
		return physicsOnlyPrediction(pr, timers)
	}

	// The correction: the structure of the model's residuals (base, today,
	// drift through the day), timer by timer.
	fj := logbook.TimerIndex(dist)
	fin := fitResiduals(f.Samples, timerResidual(fj), in.Time, timerPriors(fj, fj), f.DayStart, f.Ablation)
	w := fin.Weights
	var w2 float64
	for _, x := range w {
		w2 += x * x
	}
	kEff := 1 / math.Max(w2, 1e-9) // Kish's effective number of passes leaned on
	u := modelSpread{}
	if !in.Quick {
		u.extra, u.param = extrapolation(pr.Sensitivity, model.ETAt(dist)), parameterSpread(f, env, w)
	}
	if f.Change != nil {
		u.change = f.Change.OffsetSD
		pr.Notes = append(pr.Notes, f.Change.Text())
	}
	u.rel = math.Sqrt(fin.Var()) / model.ETAt(dist)
	unlogged := predictTimers(&pr, f, in, timers, u)
	if j := fin; j.TodayN == 0 {
		pr.Notes = append(pr.Notes, fmt.Sprintf("the first pass of the day: the interval carries the day-to-day spread (±%.3f s)", math.Sqrt(j.Tau2)))
	}
	unlogged = append(unlogged, predictTraps(&pr, f, in, u)...)
	if len(unlogged) > 0 {
		pr.Notes = append(pr.Notes, "no logged times at "+strings.Join(unlogged, ", ")+": those come from the model, with a wider interval")
	}
	for i, s := range f.Samples {
		// ET is the pass as logged; Obs may carry a change's offset
		logged, ok := s.Pass.ETAt(f.Car.DistanceFt)
		if !ok {
			logged = s.Obs[fj]
		}
		pr.Leaned = append(pr.Leaned, Leaned{Pass: s.Pass, Share: w[i], ET: logged, Carried: s.Obs[fj] + model.ET[fj] - s.Sim.ET[fj]})
	}
	sort.SliceStable(pr.Leaned, func(a, b int) bool { return pr.Leaned[a].Share > pr.Leaned[b].Share })
	pr.CalibrationNote = fmt.Sprintf("calibrated to %s (%s to %s); the correction leans mostly on the latest %d",
		text.Plural(len(f.Samples), "clean pass"), f.Samples[len(f.Samples)-1].Pass.Time.Format("2006-01-02"), f.Samples[0].Pass.Time.Format("2006-01-02"), max(1, int(math.Round(kEff))))
	pr.Notes = append(pr.Notes, pr.CalibrationNote)
	if u.extra > 0.0005 {
		pr.OutsideNote = fmt.Sprintf("today lies outside the conditions of the passes leaned on (%s): the interval is widened by %.3f s",
			outsideText(pr.Sensitivity), u.extra)
		pr.Notes = append(pr.Notes, pr.OutsideNote)
	}
	return pr
}

// predictMass is the car's mass for the next pass, kg: the input's weight,
// else the weight model's (with its note) when passes logged a weight, else
// car.yaml's.
func predictMass(f Fit, in PredictInput) (float64, string) {
	switch {
	case in.WeightLb > 0:
		return in.WeightLb * weather.KgPerLb, ""
	case f.Weight != nil && f.Weight.logged > 0 && !f.Ablation.NoWeightFill:
		return f.Weight.At(in.Time) * weather.KgPerLb, f.Weight.note(in.Time)
	}
	return f.Car.WeightLb * weather.KgPerLb, ""
}

// interval is the IntervalZ interval of a normal spread sd about x.
func interval(x, sd float64) (lo, hi float64) {
	return x - IntervalZ*sd, x + IntervalZ*sd
}

// newTimer is a timer's prediction with its interval.
func newTimer(ft, et, sd, physicsOnly, spread float64) Timer {
	lo, hi := interval(et, sd)
	return Timer{DistanceFt: ft, ET: et, SD: sd, Low: lo, High: hi, PhysicsOnly: physicsOnly, ResidualSpread: spread}
}

// newTrap is a trap speed's prediction with its interval.
func newTrap(ft, mph, sd float64) Trap {
	lo, hi := interval(mph, sd)
	return Trap{DistanceFt: ft, MPH: mph, SD: sd, Low: lo, High: hi}
}

// physicsOnlyPrediction is the calibrated model alone (no pass to calibrate
// to), each figure ± PhysicsOnlySpread of itself.
func physicsOnlyPrediction(pr Prediction, timers []float64) Prediction {
	pr.PhysicsOnly = true
	for _, ft := range timers {
		et := pr.Model.ETAt(ft)
		pr.Timers = append(pr.Timers, newTimer(ft, et, PhysicsOnlySpread*et, et, 0))
	}
	for j, ft := range []float64{660, 1320} {
		if ft <= pr.Distance {
			mph := []float64{pr.Model.MPH660, pr.Model.MPH1320}[j]
			pr.Traps = append(pr.Traps, newTrap(ft, mph, PhysicsOnlySpread*mph))
		}
	}
	return pr
}

// modelSpread is the part of the finish's spread the residuals do not
// carry, s: the parameters' uncertainty, the extrapolation beyond the
// conditions seen, a car change's offset; and rel, the finish's relative
// spread from the residuals, for a timer or trap no pass logged.
type modelSpread struct {
	param, extra, change, rel float64
}

// timerResidual is timer j's residual of a sample, logged minus model.
func timerResidual(j int) func(Sample) (float64, bool) {
	return func(s Sample) (float64, bool) { return s.Obs[j] - s.Sim.ET[j], !math.IsNaN(s.Obs[j]) }
}

// trapResidual is trap j's residual of a sample (0: 660 ft, 1: 1320 ft),
// logged minus model, mph.
func trapResidual(j int) func(Sample) (float64, bool) {
	return func(s Sample) (float64, bool) {
		return s.Trap[j] - []float64{s.Sim.MPH660, s.Sim.MPH1320}[j], !math.IsNaN(s.Trap[j])
	}
}

// anyLogged says whether some sample has the residual res.
func anyLogged(f Fit, res func(Sample) (float64, bool)) bool {
	for _, s := range f.Samples {
		if _, ok := res(s); ok {
			return true
		}
	}
	return false
}

// predictTimers appends each timer's prediction to pr: the model corrected
// by its residuals' structure, the spread widened by u in proportion to the
// ET. A timer no pass logged is the model's with twice the finish's
// relative spread; predictTimers returns those, in words.
func predictTimers(pr *Prediction, f Fit, in PredictInput, timers []float64, u modelSpread) (unlogged []string) {
	model, dist := pr.Model, pr.Distance
	fj := logbook.TimerIndex(dist)
	for _, ft := range timers {
		j := logbook.TimerIndex(ft)
		et, sd := model.ET[j], 2*u.rel*model.ET[j]
		rf := residualFit{}
		if res := timerResidual(j); anyLogged(f, res) {
			rf = fitResiduals(f.Samples, res, in.Time, timerPriors(j, fj), f.DayStart, f.Ablation)
			et += rf.Mean()
			sd = math.Sqrt(rf.Var())
		} else {
			unlogged = append(unlogged, fmt.Sprintf("%.0f ft", ft))
		}
		scale := et / model.ETAt(dist) // extrapolation and parameters scale with the ET
		sd = math.Sqrt(sq(sd) + sq(u.param*scale) + sq(u.extra*scale) + sq(u.change*scale))
		pr.Timers = append(pr.Timers, newTimer(ft, et, sd, model.ET[j], math.Sqrt(rf.Sigma2)))
	}
	return unlogged
}

// predictTraps appends each trap speed's prediction to pr, as predictTimers
// does the timers; the model's relative uncertainty of the finish ET is
// carried to the speed. It returns the traps no pass logged, in words.
func predictTraps(pr *Prediction, f Fit, in PredictInput, u modelSpread) (unlogged []string) {
	model := pr.Model
	for j, ft := range []float64{660, 1320} {
		if ft > pr.Distance {
			continue
		}
		sim := []float64{model.MPH660, model.MPH1320}[j]
		mph, sd := sim, 2*u.rel*sim
		if res := trapResidual(j); anyLogged(f, res) {
			rf := fitResiduals(f.Samples, res, in.Time, trapPriors, f.DayStart, f.Ablation)
			mph += rf.Mean()
			sd = math.Sqrt(rf.Var())
		} else {
			unlogged = append(unlogged, fmt.Sprintf("the %.0f-ft trap", ft))
		}
		rel := (u.param + u.extra) / pr.Finish().ET // the ET's relative model uncertainty, carried to the speed
		sd = math.Sqrt(sq(sd) + sq(mph*rel))
		pr.Traps = append(pr.Traps, newTrap(ft, mph, sd))
	}
	return unlogged
}

// rawPrediction is the plain average of recent passes without weather, each
// timer and trap with the spread of the passes, widened for a short sample.
// Today's air cannot be taken into account; the notes say so.
func rawPrediction(pr Prediction, f Fit, timers []float64) Prediction {
	pr.Raw = true
	passes := f.NoAir
	if len(passes) > 10 {
		passes = passes[:10]
	}
	stat := func(get func(logbook.Pass) (float64, bool)) (float64, float64, bool) {
		var v []float64
		for _, p := range passes {
			if x, ok := get(p); ok {
				v = append(v, x)
			}
		}
		if len(v) < 2 {
			return 0, 0, false
		}
		m, sd := stats.MeanSD(v)
		return m, math.Max(sd*math.Sqrt(1+1/float64(len(v))), bracket.MinSD), true
	}
	for _, ft := range timers {
		if m, sd, ok := stat(func(p logbook.Pass) (float64, bool) { return p.ETAt(ft) }); ok {
			pr.Timers = append(pr.Timers, newTimer(ft, m, sd, pr.Model.ETAt(ft), sd))
		} else {
			et := pr.Model.ETAt(ft) // a timer the slips never had: the model's, wide
			pr.Timers = append(pr.Timers, newTimer(ft, et, PhysicsOnlySpread*et, et, 0))
		}
	}
	for _, tr := range []struct {
		ft  float64
		get func(logbook.Pass) (float64, bool)
	}{
		{660, func(p logbook.Pass) (float64, bool) { return p.MPH660.Decimal.InexactFloat64(), p.MPH660.Valid }},
		{1320, func(p logbook.Pass) (float64, bool) { return p.MPH1320.Decimal.InexactFloat64(), p.MPH1320.Valid }},
	} {
		if tr.ft > f.Car.DistanceFt {
			continue
		}
		if m, sd, ok := stat(tr.get); ok {
			pr.Traps = append(pr.Traps, newTrap(tr.ft, m, sd))
		}
	}
	fin := f.Car.DistanceFt
	for _, p := range passes {
		et, _ := p.ETAt(fin)
		pr.Leaned = append(pr.Leaned, Leaned{Pass: p, Share: 1 / float64(len(passes)), ET: et, Carried: et})
	}
	pr.Notes = append(pr.Notes, fmt.Sprintf("the logbook's passes have no weather: the prediction is the plain average of the last %d, not corrected for today's air; log the weather with each pass", len(passes)))
	return pr
}

func sameDay(a, b time.Time) bool {
	ya, ma, da := a.Date()
	yb, mb, db := b.Date()
	return ya == yb && ma == mb && da == db
}

// parameterSpread is one standard deviation of the finish ET from the
// parameters' uncertainty. The prediction is Σ wᵢ·loggedᵢ + (model today −
// Σ wᵢ·modelᵢ): only the model's change from the passes' conditions to
// today's depends on the parameters, so its gradient goes through the fit's
// covariance.
func parameterSpread(f Fit, env Env, w []float64) float64 {
	dist := f.Car.DistanceFt
	change := func(p Params) float64 {
		d := Simulate(&f.Vehicle, p, env, dist).ETAt(dist)
		for i, s := range f.Samples {
			d -= w[i] * Simulate(&f.Vehicle, p, s.Env, dist).ETAt(dist)
		}
		return d
	}
	th := f.Params.theta()
	base := change(f.Params)
	var g [NP]float64
	for k := range th {
		t2 := th
		t2[k] += jacobianStep
		p := t2.params(f.Ablation)
		p.SeenTrackF = f.Params.SeenTrackF
		g[k] = (change(p) - base) / jacobianStep
	}
	var v float64
	for a := range NP {
		for b := range NP {
			v += g[a] * f.Cov[a][b] * g[b]
		}
	}
	return math.Sqrt(math.Max(v, 0))
}

// sensitivity finite-differences the calibrated model in today's conditions.
func sensitivity(f Fit, in PredictInput, env Env, model Run) Sensitivity {
	dist := f.Car.DistanceFt
	run := func(r weather.Reading) Run {
		e := NewEnv(r, f.Track.HeadingDeg, in.Prep, env.MassKg)
		return Simulate(&f.Vehicle, f.Params, e, dist)
	}
	et := model.ETAt(dist)
	trapOf := func(r Run) float64 {
		if dist >= 1320 {
			return r.MPH1320
		}
		return r.MPH660
	}
	s := Sensitivity{DAFeet: in.Air.Derive(0).DensityAltitude.Feet(), TrackF: env.TrackTemp.Fahrenheit(),
		HeadwindMPH: weather.Speed(env.Headwind).MPH()}
	da := ThinnerAir(in.Air, 1000)
	rda := run(da)
	s.PerKDA, s.PerKDAMPH = rda.ETAt(dist)-et, trapOf(rda)-trapOf(model)
	hot := in.Air
	hot.TrackTemp, hot.HasTrack = weather.Fahrenheit(env.TrackTemp.Fahrenheit()+10), true
	rh := run(hot)
	s.Per10FTrack, s.Sixty10FTrack = rh.ETAt(dist)-et, rh.ET[0]-model.ET[0]
	e2 := env
	e2.Headwind += weather.MPH(10).MPS()
	rw := Simulate(&f.Vehicle, f.Params, e2, dist)
	s.Per10Headwind, s.Per10HeadMPH = rw.ETAt(dist)-et, trapOf(rw)-trapOf(model)
	warm := in.Air
	a := in.Air.Derive(0)
	warm.Temp, warm.DewPointSet, warm.DewPoint = weather.Fahrenheit(in.Air.Temp.Fahrenheit()+10), true, a.DewPoint
	if !in.Air.HasTrack {
		warm.TrackTemp, warm.HasTrack = env.TrackTemp, true // the same surface
	}
	s.Per10FAir = run(warm).ETAt(dist) - et
	low := in.Air
	low.Baro, low.BaroKind = a.Station-weather.InHg(0.1), weather.StationPressure
	low.DewPointSet, low.RH = false, a.RH
	s.PerTenthInHg = run(low).ETAt(dist) - et
	humid := in.Air
	humid.DewPointSet, humid.RH = false, math.Min(1, a.RH+0.1)
	humid.Baro, humid.BaroKind = a.Station, weather.StationPressure
	if d := humid.RH - a.RH; d > 0.01 {
		s.Per10PctRH = (run(humid).ETAt(dist) - et) * 0.1 / d
	}
	// the conditions the passes covered
	s.SeenDALo, s.SeenDAHi, s.SeenTrackLo, s.SeenTrackHi = math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, sm := range f.Samples {
		d := sm.Pass.Air.Derive(0).DensityAltitude.Feet()
		t := sm.Env.TrackTemp.Fahrenheit()
		s.SeenDALo, s.SeenDAHi = math.Min(s.SeenDALo, d), math.Max(s.SeenDAHi, d)
		s.SeenTrackLo, s.SeenTrackHi = math.Min(s.SeenTrackLo, t), math.Max(s.SeenTrackHi, t)
	}
	if len(f.Samples) > 0 {
		s.ExtrapolatedDA = math.Max(0, math.Max(s.DAFeet-s.SeenDAHi, s.SeenDALo-s.DAFeet))
		s.ExtrapolatedT = math.Max(0, math.Max(s.TrackF-s.SeenTrackHi, s.SeenTrackLo-s.TrackF))
		if s.ExtrapolatedT > 0 {
			edge := in.Air
			edge.TrackTemp, edge.HasTrack = weather.Fahrenheit(math.Max(s.SeenTrackLo, math.Min(s.SeenTrackHi, s.TrackF))), true
			s.BeyondTrack = et - run(edge).ETAt(dist)
		}
		if s.ExtrapolatedDA > 0 {
			back := s.ExtrapolatedDA
			if s.DAFeet > s.SeenDAHi {
				back = -back
			}
			s.BeyondDA = et - run(ThinnerAir(in.Air, back)).ETAt(dist)
		}
	}
	return s
}

// extrapolation is the extra spread, s, for conditions beyond those seen.
func extrapolation(s Sensitivity, et float64) float64 {
	// The fitted sensitivity may itself be wrong out there (a tire that
	// grips fine down to 70 °F can give up at 55): whatever the fit says,
	// new ground costs at least ExtrapolationFloor of the ET per 1000 ft of
	// density altitude or 10 °F of track beyond what was seen.
	// The local slope alone shrinks the interval where a fitted curve goes
	// flat (a grip floor): the shift the model makes beyond the edge of the
	// logbook is at least as uncertain, so the interval only widens with
	// the distance out.
	da := math.Max(ExtrapolationShare*math.Abs(s.PerKDA), ExtrapolationFloor*et)*s.ExtrapolatedDA/1000 + ExtrapolationShare*math.Abs(s.BeyondDA)
	tr := math.Max(ExtrapolationShare*math.Abs(s.Per10FTrack), ExtrapolationFloor*et)*s.ExtrapolatedT/10 + ExtrapolationShare*math.Abs(s.BeyondTrack)
	return math.Hypot(da, tr)
}

func outsideText(s Sensitivity) string {
	var parts []string
	if s.ExtrapolatedDA > 0 {
		da := func(ft float64) float64 { return weather.RoundDensityAltitude(ft, weather.UnitFt) }
		parts = append(parts, fmt.Sprintf("density altitude %.0f ft, %.0f ft beyond %.0f..%.0f", da(s.DAFeet), da(s.ExtrapolatedDA), da(s.SeenDALo), da(s.SeenDAHi)))
	}
	if s.ExtrapolatedT > 0 {
		parts = append(parts, fmt.Sprintf("track %.0f °F, %.0f °F beyond %.0f..%.0f", s.TrackF, s.ExtrapolatedT, s.SeenTrackLo, s.SeenTrackHi))
	}
	return strings.Join(parts, "; ")
}

// Backcast is what the model would have predicted for pass p from the passes
// before it: the fit's parameters, the residual correction of the earlier
// passes only. It is the card's "predicted against actual" for a pass of the
// day. ok is false when p has no weather or no pass came before it.
func Backcast(f Fit, p logbook.Pass, in CalibrateInput) (Timer, bool) {
	if !p.HasAir {
		return Timer{}, false
	}
	g := f
	g.Samples = nil
	for _, s := range f.Samples {
		if s.Pass.Time.Before(p.Time) {
			g.Samples = append(g.Samples, s)
		}
	}
	trk := in.Track
	if !strings.EqualFold(p.Track, in.Track.Name) {
		if t, ok := in.Tracks[strings.ToLower(p.Track)]; ok {
			trk = t
		}
	}
	g.Track = trk
	prep, err := ParsePrep(trk.Prep)
	if err != nil {
		prep = 1
	}
	pr := Predict(g, PredictInput{Air: p.Air, Prep: prep, WeightLb: p.WeightLb, Time: p.Time, Quick: true})
	return pr.Finish(), len(g.Samples) > 0
}

// ThinnerAir is reading r with its station pressure lowered (or raised, for
// a negative dDA) until the density altitude is dDA feet higher, at the same
// temperature and humidity.
func ThinnerAir(r weather.Reading, dDA float64) weather.Reading {
	target := r.Derive(0).DensityAltitude.Feet() + dDA
	lo, hi := r.Baro*0.5, r.Baro*1.5
	for range 50 {
		mid := (lo + hi) / 2
		x := r
		x.Baro = mid
		if x.Derive(0).DensityAltitude.Feet() > target {
			lo = mid
		} else {
			hi = mid
		}
	}
	r.Baro = (lo + hi) / 2
	return r
}
