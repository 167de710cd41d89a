package engine

import (
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"pitcard/weather"
)

// A race night past midnight is one day for the model: a pass at 00:30
// after an evening's passes is not the first of a day, and leans on the
// evening's offset; with the day starting at midnight it is (synthetic
// truth as in calibrate_test.go; the race day is pitcard's own rule, and
// that a race night is one day is common practice, no source).
func TestRaceNightIsOneDayForTheModel(t *testing.T) {
	g := gen{rng: rand.New(rand.NewPCG(9, 10)), truth: DefaultParams(Natural), car: testCar}
	passes := g.season(4, 10)
	last := passes[len(passes)-1]
	y, m, d := last.Time.Date()
	afterMidnight := time.Date(y, m, d+1, 0, 30, 0, 0, last.Time.Location())
	for _, tc := range []struct {
		name      string
		start     weather.DayStart
		firstPass bool
	}{
		{"day_starts 06:00", weather.DefaultDayStart, false},
		{"day_starts 00:00", 0, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			fit, err := Calibrate(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: afterMidnight, DayStart: tc.start})
			if err != nil {
				t.Fatal(err)
			}
			pr := Predict(fit, PredictInput{Air: last.Air, Prep: 1, Time: afterMidnight})
			if got := strings.Contains(strings.Join(pr.Notes, " "), "first pass of the day"); got != tc.firstPass {
				t.Errorf("first pass of the day: %v, want %v (notes %q)", got, tc.firstPass, pr.Notes)
			}
		})
	}
}
