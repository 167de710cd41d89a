package engine

import (
	"math"
	"testing"

	"pitcard/weather"
)

// j1349Air is the SAE J1349 reference air (25 °C, 99 kPa dry), where CF = 1
// and a car makes its rated power.
var j1349Air = weather.Reading{Temp: weather.Celsius(25), Baro: weather.KPa(99), TrackTemp: weather.Fahrenheit(TrackBestF), HasTrack: true}

func simCar(t testing.TB, lbPerHP float64, ind Induction, r weather.Reading) Run {
	t.Helper()
	c := Car{WeightLb: 3400, PowerHP: 3400 / lbPerHP, Induction: ind, DistanceFt: 1320}
	v := NewVehicle(c, 0)
	return Simulate(&v, DefaultParams(ind), NewEnv(r, 0, 1, v.MassKg), 1320)
}

// Sources: Huntington (Rod & Custom, 1958): ET = 6.290·(W/P)^⅓, MPH = 224·(P/W)^⅓;
// Fox (Am. J. Physics, 1973): 6.269 and 230; a commonly quoted later fit:
// 5.825 and 234. A well-hooked car lands in the band they span, ±6 %.
func TestETAndTrapInThePowerWeightBand(t *testing.T) {
	for _, wp := range []float64{6, 8, 10, 12, 15, 20} {
		run := simCar(t, wp, Natural, j1349Air)
		k := math.Cbrt(wp)
		etLo, etHi := 5.825*k*0.94, 6.290*k*1.06
		mphLo, mphHi := 224/k*0.94, 234/k*1.06
		if run.ET[4] < etLo || run.ET[4] > etHi {
			t.Errorf("%v lb/hp: ET %.3f outside %.2f..%.2f", wp, run.ET[4], etLo, etHi)
		}
		if run.MPH1320 < mphLo || run.MPH1320 > mphHi {
			t.Errorf("%v lb/hp: trap %.2f mph outside %.1f..%.1f", wp, run.MPH1320, mphLo, mphHi)
		}
		// ET·MPH of real passes sits near 1300–1450 (common practice).
		if p := run.ET[4] * run.MPH1320; p < 1300 || p > 1450 {
			t.Errorf("%v lb/hp: ET·MPH %.0f outside 1300..1450", wp, p)
		}
	}
}

// Common practice (from memory): quarter ET ≈ 1.55–1.60 × eighth ET; quarter
// MPH ≈ 1.24–1.27 × eighth MPH.
func TestEighthToQuarterRatios(t *testing.T) {
	for _, wp := range []float64{6, 8, 10, 12, 15, 20} {
		run := simCar(t, wp, Natural, j1349Air)
		if r := run.ET[4] / run.ET[2]; r < 1.55 || r > 1.60 {
			t.Errorf("%v lb/hp: ET ratio %.3f outside 1.55..1.60", wp, r)
		}
		if r := run.MPH1320 / run.MPH660; r < 1.24 || r > 1.27 {
			t.Errorf("%v lb/hp: MPH ratio %.3f outside 1.24..1.27", wp, r)
		}
	}
}

// Derived from the cube-root law (reference, not a source): an NA car's ET
// moves about 1 % per 1000 ft of density altitude; accept 0.7–1.3 %. A
// boost-controlled turbo follows the air less; a nitrous car's added power
// does not follow it at all.
func TestAirSensitivity(t *testing.T) {
	base := weather.Reading{Temp: weather.Fahrenheit(80), Baro: weather.InHg(29.0), RH: 0.4, TrackTemp: weather.Fahrenheit(100), HasTrack: true}
	worse := ThinnerAir(base, 1000)
	na0, na1 := simCar(t, 9, Natural, base), simCar(t, 9, Natural, worse)
	pct := 100 * (na1.ET[4] - na0.ET[4]) / na0.ET[4]
	if pct < 0.7 || pct > 1.3 {
		t.Errorf("NA: ET moves %.2f %% per 1000 ft DA, want 0.7..1.3", pct)
	}
	tu0, tu1 := simCar(t, 9, Turbo, base), simCar(t, 9, Turbo, worse)
	if tp := 100 * (tu1.ET[4] - tu0.ET[4]) / tu0.ET[4]; !(tp > 0 && tp < pct) {
		t.Errorf("turbo: %.2f %% per 1000 ft, want less than NA's %.2f", tp, pct)
	}
	c := Car{WeightLb: 3400, PowerHP: 300, NitrousHP: 150, Induction: Nitrous, DistanceFt: 1320}
	v := NewVehicle(c, 0)
	p := DefaultParams(Nitrous)
	r0 := Simulate(&v, p, NewEnv(base, 0, 1, v.MassKg), 1320)
	r1 := Simulate(&v, p, NewEnv(worse, 0, 1, v.MassKg), 1320)
	// the engine's own part follows SAE J607's law: dry pressure over √T
	airOf := func(e Env) float64 { return e.DryRatio * math.Sqrt(e.TempRatio) }
	engine0 := v.Efficiency * v.PowerW * airOf(NewEnv(base, 0, 1, 0))
	engine1 := v.Efficiency * v.PowerW * airOf(NewEnv(worse, 0, 1, 0))
	if shot0, shot1 := r0.Power-engine0, r1.Power-engine1; math.Abs(shot0-shot1) > 1e-6 || math.Abs(shot0-v.Efficiency*150*WattPerHP) > 1e-6 {
		t.Errorf("nitrous shot %v W in good air, %v W in bad", shot0, shot1)
	}
}

// Kinematics (physics and common practice): trap speed is the 66-ft average,
// not the speed at the line; the clock starts after about a foot of rollout.
func TestKinematics(t *testing.T) {
	run := simCar(t, 10, Natural, j1349Air)
	if !(run.MPH1320 < run.MPH[4]) {
		t.Errorf("trap %.2f mph should be below the speed at the line %.2f (the car still accelerates)", run.MPH1320, run.MPH[4])
	}
	// The clock starts after the first foot: at a launch of about 1 g that
	// takes √(2·0.3048 m/9.8 m/s²) ≈ 0.25 s, and the car is already moving.
	if run.ClockStart < 0.15 || run.ClockStart > 0.35 || run.StartSpeed <= 0 {
		t.Errorf("clock starts %.3f s after first motion at %.2f m/s", run.ClockStart, run.StartSpeed)
	}
	// Units round-trip (facts of the trade): 30 mph = 44 ft/s; 0–30 mph in
	// 1.0 s is a 1.37 g average with g = 32.2 ft/s².
	if fps := weather.MPH(30).MPS() / MetrePerFt; math.Abs(fps-44) > 1e-9 {
		t.Errorf("30 mph = %v ft/s", fps)
	}
	if gAvg := weather.MPH(30).MPS() / MetrePerFt / 1.0 / 32.2; math.Abs(gAvg-1.37) > 0.005 {
		t.Errorf("0–30 mph in 1 s = %.3f g", gAvg)
	}
	// Common practice: street-legal drag radials top out near 1.8 g at the
	// launch; the model's peak stays below it, and above the average to 60 ft.
	if run.PeakG >= 1.8 || run.PeakG < run.AvgG60 {
		t.Errorf("peak %.2f g, average to 60 ft %.2f g", run.PeakG, run.AvgG60)
	}
	// Monotone timers.
	for i := 1; i < len(run.ET); i++ {
		if !(run.ET[i] > run.ET[i-1]) {
			t.Errorf("timers not increasing: %v", run.ET)
		}
	}
}

// The trap speed is the average over the 66 ft before the timer (common
// practice, no source), checked with kinematics written here apart from the
// integrator: between the 1000 ft and 1320 ft timers (and 330 and 660) the
// acceleration changes slowly, so v² is close to linear in distance; the
// mean speed over the last L feet is then L over ∫dx/v. For this car a
// 66 ft trap sits 0.9 mph under the line speed at 1320 ft and a 132 ft one
// 1.8 mph; at 660 ft, 1.7 and 3.5 mph. The linear v² is off by 0.06 mph at
// 1320 ft and 0.20 at 660 ft, where the car still pulls hard (measured
// when the test was written): the tolerances, 0.15 and 0.35 mph, sit
// between that and what a 132 ft trap would move (0.9 and 1.8 mph).
func TestTrapIsTheAverageOver66Feet(t *testing.T) {
	c := Car{WeightLb: 3200, PowerHP: 400, Induction: Natural, DistanceFt: 1320}
	v := NewVehicle(c, 0)
	env := NewEnv(j1349Air, 0, 1, v.MassKg)
	full := Simulate(&v, DefaultParams(Natural), env, 1320)
	trap := func(vFrom, vTo, spanFt, lengthFt float64) float64 {
		// v² = vTo² − k·(end − x), k from the two timers' speeds
		k := (vTo*vTo - vFrom*vFrom) / spanFt
		const n = 1000
		var tm float64
		for i := range n {
			x := lengthFt * (float64(i) + 0.5) / n // feet before the timer
			tm += lengthFt / n / math.Sqrt(vTo*vTo-k*x)
		}
		return lengthFt / tm
	}
	cases := []struct {
		name                 string
		got, vFrom, vTo, tol float64
		spanFt               float64
	}{
		{"quarter (1320 ft)", full.MPH1320, full.MPH[3], full.MPH[4], 0.15, 320},
		{"eighth (660 ft)", full.MPH660, full.MPH[1], full.MPH[2], 0.35, 330},
	}
	for _, tc := range cases {
		want := trap(tc.vFrom, tc.vTo, tc.spanFt, 66)
		if math.Abs(tc.got-want) > tc.tol {
			t.Errorf("%s trap %.3f mph; over the last 66 ft the kinematics give %.3f (132 ft: %.3f; line speed %.3f)",
				tc.name, tc.got, want, trap(tc.vFrom, tc.vTo, tc.spanFt, 132), tc.vTo)
		}
		if testing.Verbose() {
			t.Logf("%s: trap %.3f, 66 ft kinematics %.3f, 132 ft %.3f, line %.3f", tc.name, tc.got, want, trap(tc.vFrom, tc.vTo, tc.spanFt, 132), tc.vTo)
		}
	}
}

// Physics: a headwind costs speed at the big end; a tailwind helps; a hot
// track and poor prep slow the 60 ft (common practice).
func TestWindAndTrack(t *testing.T) {
	c := Car{WeightLb: 3400, PowerHP: 450, Induction: Natural, DistanceFt: 1320}
	v := NewVehicle(c, 0)
	p := DefaultParams(Natural)
	r := j1349Air
	calm := Simulate(&v, p, NewEnv(r, 0, 1, v.MassKg), 1320)
	r.Wind, r.WindFrom = weather.MPH(15), 0
	head := Simulate(&v, p, NewEnv(r, 0, 1, v.MassKg), 1320)
	tail := Simulate(&v, p, NewEnv(r, 180, 1, v.MassKg), 1320)
	if !(head.ET[4] > calm.ET[4] && calm.ET[4] > tail.ET[4] && head.MPH1320 < calm.MPH1320) {
		t.Errorf("head %.3f calm %.3f tail %.3f", head.ET[4], calm.ET[4], tail.ET[4])
	}
	hot := j1349Air
	hot.TrackTemp = weather.Fahrenheit(145)
	h := Simulate(&v, p, NewEnv(hot, 0, 1, v.MassKg), 1320)
	bare := Simulate(&v, p, NewEnv(j1349Air, 0, 0, v.MassKg), 1320)
	if !(h.ET[0] > calm.ET[0] && bare.ET[0] > calm.ET[0]) {
		t.Errorf("60 ft: best %.3f hot %.3f unprepped %.3f", calm.ET[0], h.ET[0], bare.ET[0])
	}
}

func TestGearedCar(t *testing.T) {
	c := Car{WeightLb: 3400, PowerHP: 450, Induction: Natural, DistanceFt: 1320, Gears: []float64{2.48, 1.48, 1.0},
		FinalDrive: 3.73, TireDiameterIn: 28, PeakRPM: 6200}
	v := NewVehicle(c, 0)
	run := Simulate(&v, DefaultParams(Natural), NewEnv(j1349Air, 0, 1, v.MassKg), 1320)
	k := math.Cbrt(3400.0 / 450)
	if run.ET[4] < 5.825*k*0.94 || run.ET[4] > 6.290*k*1.06 {
		t.Errorf("geared: ET %.3f outside the power-weight band (Huntington 1958 / later fit)", run.ET[4])
	}
	for i := 1; i < len(run.ET); i++ {
		if !(run.ET[i] > run.ET[i-1]) {
			t.Errorf("geared timers not increasing: %v", run.ET)
		}
	}
}

func BenchmarkSimulatePass(b *testing.B) {
	c := Car{WeightLb: 3400, PowerHP: 450, Induction: Natural, DistanceFt: 1320}
	v := NewVehicle(c, 0)
	env := NewEnv(j1349Air, 0, 1, v.MassKg)
	p := DefaultParams(Natural)
	for b.Loop() {
		Simulate(&v, p, env, 1320)
	}
}
