package engine

import (
	"math/rand/v2"
	"testing"
	"time"
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
