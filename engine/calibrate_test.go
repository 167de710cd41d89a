package engine

import (
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/logbook"
	"pitcard/weather"
)

// The calibration tests run against logbooks generated from the model itself
// with known "true" parameters and a noise of 0.015 s at the finish, so the
// truth is known exactly (a synthetic-data check; the noise level is common
// practice for a consistent bracket car, from memory).

var testTrack = Track{Name: "Test Strip", ElevationFt: 800, HeadingDeg: 90, Prep: "full"}

var testCar = Car{Name: "test car", WeightLb: 3350, PowerHP: 480, Induction: Natural, DistanceFt: 1320}

type gen struct {
	rng   *rand.Rand
	truth Params
	car   Car
}

// day makes n passes on one day: the afternoon heat falls away into the
// evening (30 °F of air, 50 °F of track: a density-altitude swing of about
// 2000 ft), the barometer drifts.
func (g gen) day(date time.Time, n int, baro float64) []logbook.Pass {
	v := NewVehicle(g.car, 0)
	var out []logbook.Pass
	t0 := 96 + g.rng.Float64()*8
	for k := range n {
		frac := float64(k) / float64(n-1)
		r := weather.Reading{
			Time: date.Add(time.Duration(14*60+k*30) * time.Minute),
			Temp: weather.Fahrenheit(t0 - 30*frac + g.rng.NormFloat64()*0.5), Baro: weather.InHg(baro + 0.08*frac),
			RH: 0.25 + 0.3*frac, Wind: weather.MPH(3 + 6*g.rng.Float64()), WindFrom: 360 * g.rng.Float64(),
			TrackTemp: weather.Fahrenheit(140 - 50*frac), HasTrack: true,
		}
		env := NewEnv(r, testTrack.HeadingDeg, 1, v.MassKg)
		run := Simulate(&v, g.truth, env, 1320)
		e0 := g.rng.NormFloat64() * 0.008
		gain := [5]float64{1, 1.3, 1.4, 1.5, 1.5}
		sd := [5]float64{0, 0.005, 0.007, 0.008, 0.009}
		p := logbook.Pass{Time: r.Time, Track: testTrack.Name, Session: logbook.Session{Kind: logbook.TimeTrial, N: k + 1}, Lane: logbook.Left, Air: r, HasAir: true}
		for j := range logbook.TimerDistancesFt {
			et := run.ET[j] + e0*gain[j] + g.rng.NormFloat64()*sd[j]
			p.ET[j] = decimal.NewNullDecimal(decimal.NewFromFloat(et).Round(3))
		}
		p.MPH660 = decimal.NewNullDecimal(decimal.NewFromFloat(run.MPH660 + g.rng.NormFloat64()*0.3).Round(2))
		p.MPH1320 = decimal.NewNullDecimal(decimal.NewFromFloat(run.MPH1320 + g.rng.NormFloat64()*0.3).Round(2))
		out = append(out, p)
	}
	return out
}

func (g gen) season(days, perDay int) []logbook.Pass {
	var all []logbook.Pass
	start := time.Date(2026, 5, 2, 0, 0, 0, 0, time.UTC)
	for d := range days {
		all = append(all, g.day(start.AddDate(0, 0, 7*d), perDay, 28.8+0.6*g.rng.Float64())...)
	}
	return all
}

func finishOf(p logbook.Pass) float64 { et, _ := p.ETAt(1320); return et }

func daSwing(passes []logbook.Pass) float64 {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, p := range passes {
		d := p.Air.Derive(0).DensityAltitude.Feet()
		lo, hi = math.Min(lo, d), math.Max(hi, d)
	}
	return hi - lo
}

// Calibration recovers the truth: held-out passes are predicted within an MAE
// of 0.015 s, and at least 30 % better than "same as the last pass" on days
// whose density altitude swings 1500 ft or more.
func TestCalibrationRecoversTheTruth(t *testing.T) {
	// PITCARD_ABLATION names a mechanism to switch off, for the ablation
	// table's column on the model's own world.
	ab := AblationOf(os.Getenv("PITCARD_ABLATION"))
	for _, truth := range []Params{
		{PowerScale: 0.92, TractionScale: 1.10, PressureExp: 1.0, TempExp: 0.5, TrackOptF: 100, TrackWidthF: 33},
		{PowerScale: 1.08, TractionScale: 0.90, PressureExp: 0.85, TempExp: 0.45, TrackOptF: 118, TrackWidthF: 50},
	} {
		g := gen{rng: rand.New(rand.NewPCG(7, uint64(truth.PowerScale*100))), truth: truth, car: testCar}
		passes := g.season(8, 12)
		var errModel, errLast []float64
		for k := len(passes) - 24; k < len(passes); k++ {
			held := passes[k]
			if sameDay(held.Time, passes[k-1].Time) == false {
				continue // the first pass of a day has no "last pass" of the day to compare with
			}
			fit, err := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes[:k], Now: held.Time, Ablation: ab})
			if err != nil {
				t.Fatal(err)
			}
			pr := Predict(fit, PredictInput{Air: held.Air, Prep: 1, Time: held.Time})
			errModel = append(errModel, math.Abs(pr.Finish().ET-finishOf(held)))
			errLast = append(errLast, math.Abs(finishOf(passes[k-1])-finishOf(held)))
		}
		if s := daSwing(passes[len(passes)-12:]); s < 1500 {
			t.Fatalf("the held-out day swings only %.0f ft of DA", s)
		}
		mae, base := mean(errModel), mean(errLast)
		t.Logf("truth %+v: held-out MAE %.4f s, last-pass MAE %.4f s (%d passes)", truth, mae, base, len(errModel))
		if mae > 0.015 {
			t.Errorf("held-out MAE %.4f s > 0.015", mae)
		}
		if mae > 0.7*base {
			t.Errorf("MAE %.4f not 30 %% better than the last pass's %.4f", mae, base)
		}
	}
}

func mean(v []float64) float64 {
	var s float64
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}

// Planted outliers (a pedaled run, a lifted run with no note) are found and
// left out; a note saying "lifted" is left out too.
func TestOutliersAreFound(t *testing.T) {
	truth := Params{PowerScale: 0.95, TractionScale: 1.05, PressureExp: 1, TempExp: 0.5, TrackOptF: 110, TrackWidthF: 40}
	g := gen{rng: rand.New(rand.NewPCG(3, 4)), truth: truth, car: testCar}
	passes := g.season(4, 10)
	plant := func(i int, add float64, note string) {
		et := passes[i].ET[4].Decimal.Add(decimal.NewFromFloat(add))
		passes[i].ET[4] = decimal.NewNullDecimal(et)
		passes[i].Notes = note
	}
	plant(33, 0.45, "")
	plant(36, 1.20, "")
	plant(30, 0.30, "lifted at 1000")
	fit, err := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: passes[len(passes)-1].Time.Add(time.Hour)})
	if err != nil {
		t.Fatal(err)
	}
	found := map[time.Time]bool{}
	for _, o := range fit.Outliers {
		found[o.Pass.Time] = true
	}
	for _, i := range []int{30, 33, 36} {
		if !found[passes[i].Time] {
			t.Errorf("planted outlier %d (%s) not found; outliers %v", i, passes[i].Time.Format("15:04"), fit.Outliers)
		}
	}
	if len(fit.Outliers) > 4 {
		t.Errorf("%d outliers for 3 planted", len(fit.Outliers))
	}
}

// No logbook: physics from car.yaml alone, with a wide interval that says so.
// How wide: a car.yaml power figure 10 % off (dyno sheets flatter, crews
// guess: common practice, from memory) moves the ET by 3.2 % (the cube-root
// law, Huntington 1958), so one SD below 3.2 %/1.96 = 1.6 % of the ET would
// claim more than car.yaml can know; one above 5 % (a 95 % interval past
// ±10 %, wider than the 7.4 % between the power-weight relations' own ET
// coefficients, 6.290 and 5.825) would know less than a rule of thumb. The
// interval is the normal's 95 %: ±1.96 SD (definition), to 1 %.
func TestPhysicsOnlyPrediction(t *testing.T) {
	fit, err := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Now: time.Now()})
	if err != nil {
		t.Fatal(err)
	}
	pr := Predict(fit, PredictInput{Air: j1349Air, Prep: 1})
	f := pr.Finish()
	sd := pr.Estimate().SD
	if !pr.PhysicsOnly || sd < 0.016*f.ET || sd > 0.05*f.ET || math.Abs((f.High-f.Low)/(2*1.96*sd)-1) > 0.01 {
		t.Errorf("physics-only %+v: SD %.4f s (%.2f %% of the ET; want 1.6–5 %%), interval %.3f–%.3f", f, sd, 100*sd/f.ET, f.Low, f.High)
	}
	if len(pr.Timers) != 5 || len(pr.Traps) != 2 {
		t.Errorf("%d timers, %d traps", len(pr.Timers), len(pr.Traps))
	}
}

// No power figure: estimated from the traps with the power-weight relations
// (Huntington 1958, Fox 1973 and the later fit), and said so. The relations
// disagree among themselves by (234/224)³ = 14 % in power for the same trap
// speed, so within 14 % of the true 480 hp (421–547 hp) is all they can
// promise; the estimate was 454 hp when the test was written.
func TestPowerFromTraps(t *testing.T) {
	g := gen{rng: rand.New(rand.NewPCG(5, 6)), truth: DefaultParams(Natural), car: testCar}
	passes := g.season(2, 8)
	noPower := testCar
	noPower.PowerHP = 0
	fit, err := Calibrate(CalibrateInput{Car: noPower, Track: testTrack, Passes: passes, Now: passes[len(passes)-1].Time.Add(time.Hour)})
	if err != nil {
		t.Fatal(err)
	}
	if !fit.PowerEstimated || fit.PowerHP < 480/1.14 || fit.PowerHP > 480*1.14 || len(fit.Notes) == 0 {
		t.Errorf("estimated %v hp (true 480), notes %v", fit.PowerHP, fit.Notes)
	}
	if _, err := Calibrate(CalibrateInput{Car: noPower, Track: testTrack, Now: time.Now()}); err == nil {
		t.Error("no power and no traps gave no error")
	}
}

// The interval widens when today's air is outside what the logbook has seen,
// the further the wider: a fitted slope's prediction variance grows with
// the squared distance from the data's centre (least squares, a statistics
// identity). The logbook spans about 2600 ft of density altitude; 4000 ft
// beyond it the SD must be at least twice the inside figure (3.8× when the
// test was written), where a flat "outside" surcharge would give a constant.
func TestIntervalWidensOutsideTheSeenAir(t *testing.T) {
	g := gen{rng: rand.New(rand.NewPCG(9, 9)), truth: DefaultParams(Natural), car: testCar}
	passes := g.season(3, 10)
	now := passes[len(passes)-1].Time.Add(time.Hour)
	fit, _ := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: now})
	inside := passes[len(passes)-1].Air
	outside := ThinnerAir(inside, 4000)
	a := Predict(fit, PredictInput{Air: inside, Prep: 1, Time: now}).Finish()
	b := Predict(fit, PredictInput{Air: outside, Prep: 1, Time: now}).Finish()
	if !(b.SD > a.SD*2) {
		t.Errorf("SD inside %.4f, 4000 ft beyond %.4f", a.SD, b.SD)
	}
	prev := a.SD
	for _, ft := range []float64{1000, 2000, 3000, 4000} {
		sd := Predict(fit, PredictInput{Air: ThinnerAir(inside, ft), Prep: 1, Time: now}).Finish().SD
		if !(sd > prev) {
			t.Errorf("SD %.4f at %v ft beyond, not above %.4f nearer", sd, ft, prev)
		}
		prev = sd
	}
}

func BenchmarkPredict5000(b *testing.B) {
	g := gen{rng: rand.New(rand.NewPCG(1, 2)), truth: DefaultParams(Natural), car: testCar}
	passes := g.season(250, 20)
	now := passes[len(passes)-1].Time.Add(time.Hour)
	air := passes[len(passes)-1].Air
	for b.Loop() {
		fit, err := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: now})
		if err != nil {
			b.Fatal(err)
		}
		Predict(fit, PredictInput{Air: air, Prep: 1, Time: now})
	}
}

// Passes logged without their weather still count: the prediction is their
// plain average, and says it is not corrected for the air.
func TestPredictionFromPassesWithoutWeather(t *testing.T) {
	g := gen{rng: rand.New(rand.NewPCG(2, 3)), truth: DefaultParams(Natural), car: testCar}
	passes := g.season(1, 8)
	var sum float64
	for i := range passes {
		passes[i].HasAir = false
		sum += finishOf(passes[i])
	}
	fit, err := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: passes[7].Time.Add(time.Hour)})
	if err != nil {
		t.Fatal(err)
	}
	pr := Predict(fit, PredictInput{Air: j1349Air, Prep: 1, Time: passes[7].Time.Add(time.Hour)})
	if !pr.Raw || pr.PhysicsOnly || math.Abs(pr.Finish().ET-sum/8) > 1e-9 || !strings.Contains(pr.Estimate().Basis, "without their weather") {
		t.Errorf("raw %v physics %v finish %.4f (mean %.4f) basis %q", pr.Raw, pr.PhysicsOnly, pr.Finish().ET, sum/8, pr.Estimate().Basis)
	}
}

// The same recovery for a boosted eighth-mile car: the fit works on the
// timers and the trap the distance has (synthetic truth, as above).
func TestCalibrationEighthMileTurbo(t *testing.T) {
	ab := AblationOf(os.Getenv("PITCARD_ABLATION")) // see TestCalibrationRecoversTheTruth
	car := Car{Name: "turbo eighth", WeightLb: 3100, PowerHP: 700, Induction: Turbo, DistanceFt: 660, Tire: "slick"}
	truth := Params{PowerScale: 0.9, TractionScale: 1.05, PressureExp: 0.35, TempExp: 0.5, TrackOptF: 115, TrackWidthF: 40}
	g := gen{rng: rand.New(rand.NewPCG(11, 12)), truth: truth, car: car}
	passes := g.season(6, 10)
	for i := range passes { // an eighth-mile slip has no 1000 or 1320 ft times
		passes[i].ET[3], passes[i].ET[4], passes[i].MPH1320 = decimal.NullDecimal{}, decimal.NullDecimal{}, decimal.NullDecimal{}
	}
	var errs, last, oracle []float64
	v := NewVehicle(car, 0)
	for k := len(passes) - 20; k < len(passes); k++ {
		fit, err := Calibrate(CalibrateInput{Car: car, Track: testTrack, Passes: passes[:k], Now: passes[k].Time, Ablation: ab})
		if err != nil {
			t.Fatal(err)
		}
		pr := Predict(fit, PredictInput{Air: passes[k].Air, Prep: 1, Time: passes[k].Time})
		et, _ := passes[k].ETAt(660)
		errs = append(errs, math.Abs(pr.Finish().ET-et))
		prev, _ := passes[k-1].ETAt(660)
		last = append(last, math.Abs(prev-et))
		truthET := Simulate(&v, truth, NewEnv(passes[k].Air, testTrack.HeadingDeg, 1, v.MassKg), 660).ETAt(660)
		oracle = append(oracle, math.Abs(truthET-et))
		if len(pr.Timers) != 3 || len(pr.Traps) != 1 {
			t.Fatalf("%d timers, %d traps", len(pr.Timers), len(pr.Traps))
		}
	}
	// the eighth's scatter is about 1.4/1.5 of the quarter's 0.015 s (the generator's gains)
	// The yardstick: a predictor that knows the true parameters misses only
	// by the noise. The fit must come within 25 % of it, and beat "same as
	// the last pass" by 30 %.
	t.Logf("eighth-mile turbo: held-out MAE %.4f s, knowing the truth %.4f s, last pass %.4f s", mean(errs), mean(oracle), mean(last))
	if mae := mean(errs); mae > 1.25*mean(oracle) || mae > 0.7*mean(last) {
		t.Errorf("eighth-mile turbo held-out MAE %.4f s (truth %.4f, last pass %.4f)", mae, mean(oracle), mean(last))
	}
}

// A track hotter than any the logbook has seen, and the first pass of a
// day, are new ground: the interval widens and the prediction says why
// (synthetic truth, as above; the widening is pitcard's own rule).
func TestIntervalSaysWhenItCannotKnow(t *testing.T) {
	g := gen{rng: rand.New(rand.NewPCG(9, 10)), truth: DefaultParams(Natural), car: testCar}
	passes := g.season(4, 10)
	last := passes[len(passes)-1]
	later := last.Time.Add(40 * time.Minute)
	fit, _ := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: later})
	same := Predict(fit, PredictInput{Air: last.Air, Prep: 1, Time: later})
	hot := last.Air
	hot.TrackTemp = weather.Fahrenheit(fit.Samples[0].Env.TrackTemp.Fahrenheit() + 30)
	for _, s := range fit.Samples {
		if f := s.Env.TrackTemp.Fahrenheit() + 30; f > hot.TrackTemp.Fahrenheit() {
			hot.TrackTemp = weather.Fahrenheit(f)
		}
	}
	outside := Predict(fit, PredictInput{Air: hot, Prep: 1, Time: later})
	if !(outside.Finish().SD > same.Finish().SD*1.1) || !strings.Contains(strings.Join(outside.Notes, " "), "outside the conditions") {
		t.Errorf("30 °F hotter than any logged track: SD %.4f (same air %.4f), notes %q", outside.Finish().SD, same.Finish().SD, outside.Notes)
	}
	nextDay := last.Time.AddDate(0, 0, 7)
	first := Predict(fit, PredictInput{Air: last.Air, Prep: 1, Time: nextDay})
	if !(first.Finish().SD > same.Finish().SD) || !strings.Contains(strings.Join(first.Notes, " "), "first pass of the day") {
		t.Errorf("first pass of a day: SD %.4f (later the same day %.4f), notes %q", first.Finish().SD, same.Finish().SD, first.Notes)
	}
}

// The outlier rule is two-sided: a pass far QUICKER than the model (a timing
// fault, a beam tripped early) is as wrong as a pedaled one and is left out
// too; a pass just inside the limit is kept. The limit is OutlierMADs robust
// deviations (4 × 1.4826 × MAD: the 1.4826 makes the MAD a standard
// deviation for normal scatter, a statistics identity; 4 of them is common
// practice for a robust cut, from memory), never below OutlierFloor.
func TestOutliersBothWays(t *testing.T) {
	truth := Params{PowerScale: 0.95, TractionScale: 1.05, PressureExp: 1, TempExp: 0.5, TrackOptF: 110, TrackWidthF: 40}
	g := gen{rng: rand.New(rand.NewPCG(3, 4)), truth: truth, car: testCar}
	passes := g.season(4, 10)
	plant := func(i int, add float64) {
		et := passes[i].ET[4].Decimal.Add(decimal.NewFromFloat(add))
		passes[i].ET[4] = decimal.NewNullDecimal(et)
	}
	plant(12, -0.40) // a timing fault: four tenths quick
	plant(25, -0.25)
	plant(36, +0.45) // a pedaled run
	fit, err := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: passes[len(passes)-1].Time.Add(time.Hour)})
	if err != nil {
		t.Fatal(err)
	}
	found := map[time.Time]string{}
	for _, o := range fit.Outliers {
		found[o.Pass.Time] = o.Reason
	}
	for _, i := range []int{12, 25, 36} {
		if _, ok := found[passes[i].Time]; !ok {
			t.Errorf("planted outlier %d not found; outliers %v", i, fit.Outliers)
		}
	}
	if !strings.HasPrefix(found[passes[12].Time], "ran 0.") || !strings.Contains(found[passes[12].Time], "quicker than the model expects") {
		t.Errorf("the quick pass's reason %q does not give its signed miss", found[passes[12].Time])
	}
	if len(fit.Outliers) > 4 {
		t.Errorf("%d outliers for 3 planted: %v", len(fit.Outliers), fit.Outliers)
	}
}

// With fewer than FewForOutliers (8) clean passes only a gross miss, beyond
// GrossOutlier (0.20 s), is left out: a handful of passes cannot say what
// scatter is normal (pitcard's own rule, calibrate.go). From 8 passes on,
// the robust limit applies and a 0.15 s miss is left out.
func TestFewPassesLeaveOutOnlyGrossMisses(t *testing.T) {
	truth := Params{PowerScale: 0.95, TractionScale: 1.05, PressureExp: 1, TempExp: 0.5, TrackOptF: 110, TrackWidthF: 40}
	cases := []struct {
		name    string
		n       int
		miss    float64
		leftOut bool
	}{
		{"7 passes, a 0.15 s miss kept", 7, 0.15, false},
		{"7 passes, a 0.30 s miss left out", 7, 0.30, true},
		{"8 passes, a 0.15 s miss left out", 8, 0.15, true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g := gen{rng: rand.New(rand.NewPCG(11, 12)), truth: truth, car: testCar}
			passes := g.day(time.Date(2026, 5, 2, 0, 0, 0, 0, time.UTC), tc.n, 29.0)
			i := tc.n / 2
			passes[i].ET[4] = decimal.NewNullDecimal(passes[i].ET[4].Decimal.Add(decimal.NewFromFloat(tc.miss)))
			fit, err := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: passes[tc.n-1].Time.Add(time.Hour)})
			if err != nil {
				t.Fatal(err)
			}
			found := false
			for _, o := range fit.Outliers {
				found = found || o.Pass.Time.Equal(passes[i].Time)
			}
			if found != tc.leftOut || len(fit.Outliers) > 1 {
				t.Errorf("the %.2f s miss left out: %v, want %v; outliers %v", tc.miss, found, tc.leftOut, fit.Outliers)
			}
		})
	}
}

// The robust limit is 4 × 1.4826 × MAD (see TestOutliersBothWays): in a
// logbook that scatters 0.03 s (a car with some scatter, stats.go's band),
// a pass 0.12 s off is inside it (about 4 SD) and kept; 0.30 s is not.
func TestScatterSetsTheLimit(t *testing.T) {
	truth := Params{PowerScale: 0.95, TractionScale: 1.05, PressureExp: 1, TempExp: 0.5, TrackOptF: 110, TrackWidthF: 40}
	g := gen{rng: rand.New(rand.NewPCG(13, 14)), truth: truth, car: testCar}
	passes := g.season(3, 10)
	noise := rand.New(rand.NewPCG(15, 16))
	for i := range passes {
		passes[i].ET[4] = decimal.NewNullDecimal(passes[i].ET[4].Decimal.Add(decimal.NewFromFloat(noise.NormFloat64() * 0.03).Round(3)))
	}
	kept, out := 7, 22
	passes[kept].ET[4] = decimal.NewNullDecimal(passes[kept].ET[4].Decimal.Add(decimal.NewFromFloat(0.12)))
	passes[out].ET[4] = decimal.NewNullDecimal(passes[out].ET[4].Decimal.Add(decimal.NewFromFloat(0.30)))
	fit, err := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: passes[len(passes)-1].Time.Add(time.Hour)})
	if err != nil {
		t.Fatal(err)
	}
	found := map[time.Time]bool{}
	for _, o := range fit.Outliers {
		found[o.Pass.Time] = true
	}
	if found[passes[kept].Time] || !found[passes[out].Time] {
		t.Errorf("0.12 s miss left out: %v (want kept); 0.30 s miss left out: %v (want so); outliers %v", found[passes[kept].Time], found[passes[out].Time], fit.Outliers)
	}
}

// Left out means left out of the fit: the passes named as outliers are not
// among the fit's samples (calibrate.go refits without them), and the
// prediction from a logbook with three planted misses (+0.45, +1.20 and
// −0.40 s) matches the one from the same logbook without them within
// 0.005 s.
func TestOutliersAreLeftOutOfTheFit(t *testing.T) {
	truth := Params{PowerScale: 0.95, TractionScale: 1.05, PressureExp: 1, TempExp: 0.5, TrackOptF: 110, TrackWidthF: 40}
	g := gen{rng: rand.New(rand.NewPCG(3, 4)), truth: truth, car: testCar}
	clean := g.season(4, 10)
	planted := append([]logbook.Pass(nil), clean...)
	for i, add := range map[int]float64{33: 0.45, 36: 1.20, 12: -0.40} {
		planted[i].ET[4] = decimal.NewNullDecimal(planted[i].ET[4].Decimal.Add(decimal.NewFromFloat(add)))
	}
	now := clean[len(clean)-1].Time.Add(time.Hour)
	fit := func(passes []logbook.Pass) Fit {
		f, err := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: now})
		if err != nil {
			t.Fatal(err)
		}
		return f
	}
	fc, fp := fit(clean), fit(planted)
	if len(fp.Outliers) < 3 {
		t.Fatalf("outliers %v", fp.Outliers)
	}
	for _, o := range fp.Outliers {
		for _, s := range fp.Samples {
			if s.Pass.Time.Equal(o.Pass.Time) {
				t.Errorf("outlier %s is still a sample of the fit", o.Pass.Time.Format("01-02 15:04"))
			}
		}
	}
	if len(fp.Samples) != len(planted)-len(fp.Outliers) {
		t.Errorf("%d samples from %d passes less %d outliers", len(fp.Samples), len(planted), len(fp.Outliers))
	}
	air := clean[len(clean)-1].Air
	a := Predict(fc, PredictInput{Air: air, Prep: 1, Time: now}).Finish().ET
	b := Predict(fp, PredictInput{Air: air, Prep: 1, Time: now}).Finish().ET
	if math.Abs(a-b) > 0.005 {
		t.Errorf("prediction %.4f s with the misses left out, %.4f s from the clean logbook", b, a)
	}
}

// The fit says whether Levenberg–Marquardt reached its minimum, and the
// notes say so when it did not (common practice, no source: a bounded
// iterative fit reports hitting its bound).
func TestFitReportsConvergence(t *testing.T) {
	// a grip well inside the range the fit may take (TrackWidthRangeF):
	// a truth outside it pins the fit at a bound, where no step gains
	truth := Params{PowerScale: 0.95, TractionScale: 1.05, PressureExp: 0.95, TempExp: 0.5, TrackOptF: 105, TrackWidthF: 70}
	g := gen{rng: rand.New(rand.NewPCG(3, 4)), truth: truth, car: testCar}
	passes := g.season(6, 10)
	for _, tc := range []struct {
		name string
		n    int
	}{{"short logbook", 6}, {"long logbook", len(passes)}} {
		t.Run(tc.name, func(t *testing.T) {
			fit, err := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes[:tc.n], Now: passes[tc.n-1].Time.Add(time.Hour)})
			if err != nil {
				t.Fatal(err)
			}
			noted := strings.Contains(strings.Join(fit.Notes, "\n"), "stopped at its limit")
			if want := !fit.Converged && fit.lastGain > lmNoteGain; noted != want {
				t.Errorf("converged %v (last gain %.4f), note %v: the note must appear exactly when the fit stopped still gaining more than %.1f %%", fit.Converged, fit.lastGain, noted, 100*lmNoteGain)
			}
			if tc.n == 6 && !fit.Converged {
				t.Errorf("a six-pass fit leaning on the prior should converge within %d steps", lmMaxIterations)
			}
		})
	}
}
