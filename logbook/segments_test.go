package logbook

import (
	"math"
	"strings"
	"testing"

	"github.com/shopspring/decimal"
)

func near(got, want, tol float64) bool { return math.Abs(got-want) <= tol }

// The worked arithmetic: common practice, no source.
func TestAverageGWorkedFigures(t *testing.T) {
	cases := []struct {
		name      string
		got, want float64
		tol       float64
		source    string
	}{
		{"0-30 mph in 1.0 s is 44 ft/s²", AverageG(30*FtSPerMPH, 1.0) * StandardGravityFtS2, 44, 1e-9, "common practice (no source)"},
		{"0-30 mph in 1.0 s is 1.37 g", AverageG(30*FtSPerMPH, 1.0), 1.37, 0.005, "common practice (no source)"},
		{"0-60 mph in 2.3 s is about 1.19 g", AverageG(60*FtSPerMPH, 2.3), 1.19, 0.005, "common practice (no source)"},
		{"30-60 mph in 1.3 s is about 1.05 g", AverageG(30*FtSPerMPH, 1.3), 1.05, 0.005, "common practice (no source)"},
		{"a 1.50 s 60 ft from rest is 53.3 ft/s²", LaunchG(60, 1.50) * StandardGravityFtS2, 53.3, 0.05, "common practice (no source)"},
		{"a 1.50 s 60 ft from rest is 1.66 g", LaunchG(60, 1.50), 1.66, 0.005, "common practice (no source)"},
		{"0-60 mph in 3.0 s is 0.91 g", AverageG(60*FtSPerMPH, 3.0), 0.91, 0.005, "REFERENCE.md kinematic checks (physics)"},
		{"0-60 mph in 4.0 s is 0.68 g", AverageG(60*FtSPerMPH, 4.0), 0.68, 0.005, "REFERENCE.md kinematic checks (physics)"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if !near(tc.got, tc.want, tc.tol) {
				t.Errorf("%s: got %.4f, want %.4f ± %g (%s)", tc.name, tc.got, tc.want, tc.tol, tc.source)
			}
		})
	}
}

// Standard gravity 9.80665 m/s² (ISO 80000-3, CODATA) is 32.174 ft/s²;
// 60 mph is 88 ft/s (REFERENCE.md, exact).
func TestSegmentConstants(t *testing.T) {
	if !near(StandardGravityFtS2, 32.174, 0.0001) { // ISO 80000-3 / CODATA, over 0.3048 m/ft
		t.Errorf("g = %v ft/s², want 32.174", StandardGravityFtS2)
	}
	if !near(60*FtSPerMPH, 88, 1e-12) { // exact: 5280 ft/mile
		t.Errorf("60 mph = %v ft/s, want 88", 60*FtSPerMPH)
	}
	if !math.IsNaN(AverageG(10, 0)) || !math.IsNaN(LaunchG(60, 0)) || !math.IsNaN(LaunchG(60, -1)) || !math.IsNaN(AirCarry(0, 1)) {
		t.Error("a zero or negative time or factor must give NaN")
	}
}

func slip(ets [5]string, trap660, trap1320 string) Pass {
	var p Pass
	for i, s := range ets {
		if s != "" {
			p.ET[i] = decimal.NewNullDecimal(decimal.RequireFromString(s))
		}
	}
	if trap660 != "" {
		p.MPH660 = decimal.NewNullDecimal(decimal.RequireFromString(trap660))
	}
	if trap1320 != "" {
		p.MPH1320 = decimal.NewNullDecimal(decimal.RequireFromString(trap1320))
	}
	return p
}

func TestSegmentsOfASlip(t *testing.T) {
	// An invented slip (the demo's car's kind of pass).
	p := slip([5]string{"1.500", "4.600", "7.200", "9.450", "11.400"}, "95.00", "118.00")
	pr := Segments(p, 1320)
	if len(pr.Segments) != 5 {
		t.Fatalf("%d segments, want 5", len(pr.Segments))
	}
	// Times are the differences of the timers; speeds length over time
	// (the definition of average speed, physics).
	wantTime := []float64{1.5, 3.1, 2.6, 2.25, 1.95}
	wantLen := []float64{60, 270, 330, 340, 320}
	for i, s := range pr.Segments {
		if !s.Timed || !near(s.Time, wantTime[i], 1e-9) || !near(s.SpeedFtS, wantLen[i]/wantTime[i], 1e-9) {
			t.Errorf("segment %s: %+v, want %.3f s at %.3f ft/s (definition of average speed)", s.Name(), s, wantTime[i], wantLen[i]/wantTime[i])
		}
	}
	// The launch: a 1.50 s 60 ft from rest is 1.66 g (common practice, no source).
	if !pr.HasLaunch || !near(pr.LaunchG, 1.658, 0.001) || !near(pr.Segments[0].AccelG, pr.LaunchG, 1e-12) {
		t.Errorf("launch %.4f g (segment %.4f), want 1.658 g", pr.LaunchG, pr.Segments[0].AccelG)
	}
	// 60→330: (270/3.1 − 40) ft/s over (1.5+3.1)/2 s (definition of average acceleration).
	want := (270/3.1 - 40) / 2.3 / 32.174
	if !near(pr.Segments[1].AccelG, want, 1e-4) {
		t.Errorf("60–330 ft: %.4f g, want %.4f", pr.Segments[1].AccelG, want)
	}
	if pr.Trap660 != 95 || pr.Trap1320 != 118 {
		t.Errorf("traps %v, %v", pr.Trap660, pr.Trap1320)
	}
	if got := pr.Segments[1].MPH(); !near(got, 270/3.1/(5280.0/3600), 1e-9) {
		t.Errorf("mph %v", got)
	}
}

func TestSegmentsMissingTimers(t *testing.T) {
	cases := []struct {
		name     string
		ets      [5]string
		distance float64
		n        int
		missing  map[int]string
	}{
		{"no 330-ft timer", [5]string{"1.600", "", "7.300", "9.550", "11.450"}, 1320, 5,
			map[int]string{1: "no 330-ft time on this slip", 2: "no 330-ft time on this slip"}},
		{"finish only", [5]string{"", "", "", "", "11.450"}, 1320, 5,
			map[int]string{0: "no 60-ft time", 1: "no 60-ft time", 2: "no 330-ft time", 3: "no 660-ft time", 4: "no 1000-ft time"}},
		{"an eighth-mile car", [5]string{"1.600", "4.700", "7.300", "", ""}, 660, 3, nil},
		{"a 330 typed before the 60", [5]string{"1.600", "1.500", "7.300", "9.550", "11.450"}, 1320, 5,
			map[int]string{1: "the 330-ft time is not after the 60-ft time"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			pr := Segments(slip(tc.ets, "", ""), tc.distance)
			if len(pr.Segments) != tc.n {
				t.Fatalf("%d segments, want %d", len(pr.Segments), tc.n)
			}
			for i, s := range pr.Segments {
				want, gap := tc.missing[i]
				if gap != !s.Timed || (gap && !strings.Contains(s.Missing, want)) {
					t.Errorf("segment %s: timed %v missing %q, want %q", s.Name(), s.Timed, s.Missing, want)
				}
				if !s.Timed && (!math.IsNaN(s.Time) || s.HasAccel) {
					t.Errorf("segment %s is not timed but has figures: %+v", s.Name(), s)
				}
			}
			// The segment after a gap has no acceleration: it needs the one before.
			if tc.name == "no 330-ft timer" && (pr.Segments[3].HasAccel || !pr.Segments[4].HasAccel) {
				t.Error("660–1000 ft follows the untimed 330–660 ft (no acceleration); 1000–1320 ft follows a timed one (one)")
			}
		})
	}
}

func TestCompareAPassWithItselfGivesZeros(t *testing.T) {
	pr := Segments(slip([5]string{"1.612", "4.683", "7.301", "9.566", "11.482"}, "94.10", "118.02"), 1320)
	for _, carry := range []float64{math.NaN(), 1} { // the same air: a factor of exactly 1
		for _, d := range Compare(pr, pr, carry) {
			if !d.OK || d.Diff != 0 {
				t.Errorf("%s: diff %v, want 0 (a pass against itself)", d.This.Name(), d.Diff)
			}
			if carry == 1 && d.Carried != 0 {
				t.Errorf("%s: carried %v, want 0", d.This.Name(), d.Carried)
			}
		}
	}
	if AirCarry(1.02, 1.02) != 1 { // the same air carries nothing
		t.Error("AirCarry of equal factors is not 1")
	}
}

func TestCompareFindsTheSegment(t *testing.T) {
	a := Segments(slip([5]string{"1.600", "4.700", "7.300", "9.550", "11.450"}, "", ""), 1320)
	b := Segments(slip([5]string{"1.580", "4.680", "7.300", "9.520", "11.420"}, "", ""), 1320)
	d := Compare(a, b, AirCarry(1.0, 1.03))
	// Segment times: a 1.6, 3.1, 2.6, 2.25, 1.9; b 1.58, 3.1, 2.62, 2.22, 1.9.
	want := []float64{0.02, 0, -0.02, 0.03, 0}
	for i, x := range d {
		if !near(x.Diff, want[i], 1e-9) {
			t.Errorf("%s: diff %.4f, want %.4f (arithmetic)", x.This.Name(), x.Diff, want[i])
		}
		// Worse air for a (CF 1.03 against 1.0): b's time carried grows by
		// the cube root, 1.00990 (SAE J1349 ratio, cube-root law).
		if c := x.This.Time - x.Other.Time*math.Cbrt(1.03); !near(x.Carried, c, 1e-12) {
			t.Errorf("%s: carried %.5f, want %.5f", x.This.Name(), x.Carried, c)
		}
	}
	if i := Largest(d, false); i != 3 {
		t.Errorf("largest difference at %d, want 3 (660–1000 ft)", i)
	}
}

// FuzzSegments: any timer set cuts without a panic, and every figure a
// segment claims is finite (nothing prints as NaN).
func FuzzSegments(f *testing.F) {
	f.Add("1.612", "4.683", "7.301", "9.566", "11.482", "94.1", "118.0", 1320.0)
	f.Add("", "", "", "", "11.482", "", "", 1320.0)
	f.Add("1.6", "", "7.3", "", "", "90", "", 660.0)
	f.Add("5", "1", "0", "-1", "1e3", "x", "", 1000.0)
	f.Fuzz(func(t *testing.T, e60, e330, e660, e1000, e1320, t660, t1320 string, dist float64) {
		var p Pass
		for i, s := range []string{e60, e330, e660, e1000, e1320} {
			if d, err := ParseSeconds("et", s); err == nil {
				p.ET[i] = decimal.NewNullDecimal(d)
			}
		}
		if d, err := ParseSeconds("mph660", t660); err == nil {
			p.MPH660 = decimal.NewNullDecimal(d)
		}
		if d, err := ParseSeconds("mph1320", t1320); err == nil {
			p.MPH1320 = decimal.NewNullDecimal(d)
		}
		pr := Segments(p, dist)
		finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
		for _, s := range pr.Segments {
			if s.Timed != (s.Missing == "") {
				t.Fatalf("%s: timed %v with missing %q", s.Name(), s.Timed, s.Missing)
			}
			if s.Timed && (!finite(s.Time) || !(s.Time > 0) || !finite(s.SpeedFtS) || !finite(s.MPH())) {
				t.Fatalf("%s: timed with %+v", s.Name(), s)
			}
			if s.HasAccel && !finite(s.AccelG) {
				t.Fatalf("%s: acceleration %v", s.Name(), s.AccelG)
			}
			if strings.Contains(s.Name(), "NaN") || strings.Contains(s.Missing, "NaN") {
				t.Fatalf("NaN in words: %q %q", s.Name(), s.Missing)
			}
		}
		if pr.HasLaunch && !finite(pr.LaunchG) {
			t.Fatalf("launch %v", pr.LaunchG)
		}
		for _, d := range Compare(pr, pr, 1) {
			if d.OK && (d.Diff != 0 || d.Carried != 0) {
				t.Fatalf("a pass against itself: %+v", d)
			}
		}
	})
}
