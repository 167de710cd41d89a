package engine

import (
	"math/rand/v2"
	"testing"
	"time"

	"pitcard/logbook"
	"pitcard/weather"
)

// A calibration is a function of its input: the same logbook fitted again
// gives the same parameters to the last bit, whatever order Go's maps hand
// back the race days in (the held-out cache and the golden cards rely on
// it; common practice, no source).
func TestCalibrationIsReproducible(t *testing.T) {
	for _, tc := range []struct {
		name      string
		days, per int
	}{
		{"eight days of seven", 8, 7},
		{"twenty days of three", 20, 3},
	} {
		t.Run(tc.name, func(t *testing.T) {
			g := gen{rng: rand.New(rand.NewPCG(11, 12)), truth: DefaultParams(Natural), car: testCar}
			passes := g.season(tc.days, tc.per)
			in := CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: passes[len(passes)-1].Time.Add(time.Hour)}
			first, err := Calibrate(in)
			if err != nil {
				t.Fatal(err)
			}
			for range 10 {
				again, _ := Calibrate(in)
				if again.Params != first.Params || again.Cov != first.Cov {
					t.Fatalf("the same logbook fitted twice: %+v, then %+v", first.Params, again.Params)
				}
				for i := range first.Samples {
					if again.Samples[i].Nuisance != first.Samples[i].Nuisance {
						t.Fatalf("sample %d's day offsets: %v, then %v", i, first.Samples[i].Nuisance, again.Samples[i].Nuisance)
					}
				}
			}
		})
	}
}

// The weight model's sums run over the race days in order, not in a map's:
// the same weighed logbook gives the same burn and usual weight to the last
// bit (common practice, no source: a card printed twice is the same card).
func TestWeightModelIsReproducible(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	var passes []logbook.Pass
	start := time.Date(2026, 5, 1, 10, 0, 0, 0, time.UTC)
	for d := range 40 {
		for k := range 3 + d%5 { // days of three to seven weighed passes
			passes = append(passes, logbook.Pass{Time: start.AddDate(0, 0, d).Add(time.Duration(k) * time.Hour),
				WeightLb: 3300 + 40*rng.Float64() - (3.7+rng.Float64()/3)*float64(k*k) + 0.123456789*float64(d)})
		}
	}
	first := newWeightModel(testCar, passes, weather.DefaultDayStart)
	for range 50 {
		again := newWeightModel(testCar, passes, weather.DefaultDayStart)
		if again.burn != first.burn || again.usual != first.usual {
			t.Fatalf("the same weighed logbook twice: burn %v then %v, usual %v then %v", first.burn, again.burn, first.usual, again.usual)
		}
	}
}
