package logbook

import (
	"math"
	"testing"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/weather"
)

// Stats groups by race day (a night past midnight is the evening's day) and
// session kind; the spreads are sample standard deviations (definition);
// aborted runs and red lights stay out of the ET and RT figures (common
// practice, no source).
func TestStats(t *testing.T) {
	day := time.Date(2026, 6, 13, 21, 0, 0, 0, time.UTC) // the last two passes after midnight
	mk := func(h int, kind SessionKind, et, rt, sixty string, notes string) Pass {
		p := Pass{Time: day.Add(time.Duration(h) * time.Hour), Session: Session{kind, h + 1}, Notes: notes}
		p.ET[4] = decimal.NewNullDecimal(d(et))
		p.ET[0] = decimal.NewNullDecimal(d(sixty))
		p.RT = decimal.NewNullDecimal(d(rt))
		return p
	}
	passes := []Pass{
		mk(0, TimeTrial, "11.50", "0.020", "1.610", ""),
		mk(1, TimeTrial, "11.52", "0.040", "1.620", ""),
		mk(2, Elimination, "11.49", "-0.010", "1.600", ""),
		mk(3, Elimination, "12.40", "0.030", "1.700", "lifted"),
		mk(4, Elimination, "11.51", "0.050", "1.612", ""),
	}
	st := Stats(passes, nil, weather.DefaultDayStart, nil)
	if len(st) != 3 || !st[0].All || st[1].Kind != TimeTrial || st[2].Kind != Elimination || st[0].Day.Format("2006-01-02") != "2026-06-13" {
		t.Fatalf("groups %+v", st)
	}
	all := st[0]
	if all.Passes != 5 || all.Clean != 4 || math.Abs(all.ETMean-11.505) > 1e-9 {
		t.Errorf("day: %+v", all)
	}
	// sample SD of 11.50, 11.52, 11.49, 11.51 = 0.012910
	if math.Abs(all.ETSD-0.0129099) > 1e-6 {
		t.Errorf("ET SD %.7f", all.ETSD)
	}
	// the red light (-0.010) is not a reaction time to average
	if all.RTN != 4 || math.Abs(all.RTMean-0.035) > 1e-9 {
		t.Errorf("RT n %d mean %.4f", all.RTN, all.RTMean)
	}
	if got := Consistency(all.ETSD, all.Clean); got != "very consistent" {
		t.Errorf("consistency %q", got)
	}
	// the bands stats.go documents (common practice, no source): up to
	// 0.015 s very consistent, 0.03 consistent, 0.06 some scatter; each edge
	// belongs to the band below it; three passes are the fewest judged
	for sd, want := range map[float64]string{0.015: "very consistent", 0.0151: "consistent", 0.02: "consistent", 0.03: "consistent",
		0.0301: "some scatter", 0.05: "some scatter", 0.06: "some scatter", 0.0601: "inconsistent", 0.1: "inconsistent"} {
		if got := Consistency(sd, 5); got != want {
			t.Errorf("Consistency(%v) = %q, want %q", sd, got, want)
		}
	}
	if Consistency(0.001, 2) != "too few to judge" || Consistency(0.001, 3) != "very consistent" {
		t.Error("two passes judged, or three not")
	}
}
