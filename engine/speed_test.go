package engine

import (
	"math/rand/v2"
	"testing"
	"time"
)

// Benchmarks of the issues' speed targets: they measure time, check no
// computed value, and so need no source; the logbooks are invented by the
// model's own generator (gen).

// BenchmarkForecast5000Cold is the card's pass model on a 5,000-pass logbook
// with an empty held-out cache: the fit for the next pass and the
// ScoredPasses held-out fits, each from the passes before its target. Run
// with -cpu 1 for the CPU it costs.
func BenchmarkForecast5000Cold(b *testing.B) {
	g := gen{rng: rand.New(rand.NewPCG(1, 2)), truth: DefaultParams(Natural), car: testCar}
	passes := g.season(250, 20)
	now := passes[len(passes)-1].Time.Add(time.Hour)
	next := PredictInput{Air: passes[len(passes)-1].Air, Prep: 1, Time: now}
	cal := CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: now}
	for b.Loop() {
		if _, _, err := Forecast(cal, next, NewHeldOutCache()); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCalibrate60 is one calibration of a full fit window (FitWindow
// clean passes): the unit the held-out scoring repeats.
func BenchmarkCalibrate60(b *testing.B) {
	g := gen{rng: rand.New(rand.NewPCG(1, 2)), truth: DefaultParams(Natural), car: testCar}
	passes := g.season(3, 20)
	now := passes[len(passes)-1].Time.Add(time.Hour)
	cal := CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: now}
	for b.Loop() {
		if _, err := Calibrate(cal); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSimulate is one simulated quarter-mile pass of the test car: the
// unit every calibration repeats.
func BenchmarkSimulate(b *testing.B) {
	v := NewVehicle(testCar, 0)
	env := NewEnv(j1349Air, testTrack.HeadingDeg, 1, v.MassKg)
	p := DefaultParams(Natural)
	for b.Loop() {
		Simulate(&v, p, env, 1320)
	}
}
