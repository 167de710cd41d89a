package bracket

import (
	"fmt"
	"math"
	"testing"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/internal/stats"
	"pitcard/logbook"
)

// Breakout chance is the normal table value at (dial − ET)/SD; the expected
// giveaway at a dial equal to the mean is σ/√(2π) (standard result for the
// normal partial expectation).
func TestBreakoutChanceAndGiveaway(t *testing.T) {
	est := Estimate{ET: 11.500, SD: 0.030}
	cases := []struct {
		dial string
		p    float64
	}{{"11.500", 0.5}, {"11.470", 0.1587}, {"11.530", 0.8413}, {"11.440", 0.0228}}
	for _, tc := range cases {
		t.Run(fmt.Sprintf("dial %s", tc.dial), func(t *testing.T) {
			if got := BreakoutChance(est, d(tc.dial)); math.Abs(got-tc.p) > 0.0001 {
				t.Errorf("dial %s: breakout chance %.4f, table %.4f", tc.dial, got, tc.p)
			}
		})
	}
	if g := Giveaway(est, d("11.500")); math.Abs(g-0.030/math.Sqrt(2*math.Pi)) > 1e-12 {
		t.Errorf("giveaway at the mean %.6f", g)
	}
	// far below the mean the giveaway is the whole difference
	if g := Giveaway(est, d("11.300")); math.Abs(g-0.200) > 1e-9 {
		t.Errorf("giveaway 0.2 s under %.6f", g)
	}
}

func TestPlanDial(t *testing.T) {
	est := Estimate{ET: 11.500, SD: 0.030}
	p, err := PlanDial(est, d("0.01"), 0.10, 5)
	if err != nil {
		t.Fatal(err)
	}
	// 11.500 − 1.2816·0.030 = 11.4616 → 11.46 on a 0.01 step (normal table: z = −1.2816 at 10 %)
	if !p.Recommended.Equal(d("11.46")) {
		t.Errorf("recommended %s, want 11.46", p.Recommended)
	}
	if len(p.Options) != 11 || !p.Options[5].Recommended || !p.Options[5].Dial.Equal(p.Recommended) {
		t.Errorf("options %+v", p.Options)
	}
	for i, o := range p.Options {
		if i > 0 && !(o.BreakoutChance > p.Options[i-1].BreakoutChance && o.Giveaway < p.Options[i-1].Giveaway) {
			t.Errorf("a higher dial must break out more and give away less: %+v", p.Options)
		}
		if o.Dial.String() != o.Dial.Round(2).String() {
			t.Errorf("dial %s is not on the 0.01 step", o.Dial)
		}
	}
	if p.Options[5].BreakoutChance > 0.10 || p.Options[6].BreakoutChance <= 0.10 {
		t.Errorf("the recommendation is not the slowest dial within the risk: %+v", p.Options[4:7])
	}
	thou, _ := PlanDial(est, d("0.001"), 0.10, 3)
	if !thou.Recommended.Equal(d("11.461")) {
		t.Errorf("thousandths step: %s", thou.Recommended)
	}
	if _, err := PlanDial(est, d("0.01"), 0.9, 3); err == nil {
		t.Error("risk 0.9 accepted")
	}
	if _, err := PlanDial(Estimate{ET: 11.5}, d("0.01"), 0.1, 3); err == nil {
		t.Error("zero spread accepted")
	}
}

// Exact decimal rounding to the step: no 10.119999 (IEEE 754 binary floats
// cannot hold 10.12).
func TestRoundToStep(t *testing.T) {
	cases := []struct{ in, step, want string }{
		{"10.119999", "0.01", "10.12"}, {"10.125", "0.01", "10.13"}, {"10.1249", "0.01", "10.12"}, {"9.9996", "0.001", "10"},
		{"11.46", "0.05", "11.45"},
	}
	for _, tc := range cases {
		t.Run(fmt.Sprintf("%s to %s", tc.in, tc.step), func(t *testing.T) {
			if got := RoundToStep(d(tc.in), d(tc.step)); !got.Equal(d(tc.want)) {
				t.Errorf("RoundToStep(%s, %s) = %s, want %s", tc.in, tc.step, got, tc.want)
			}
		})
	}
	if got := RoundDownToStep(10.12, d("0.01")); got.String() != "10.12" {
		t.Errorf("RoundDownToStep(10.12) = %s", got)
	}
}

// Common practice (no source): lifted and pedaled runs are not the car's
// time; a typo far from the rest is left out too.
func TestRecentEstimate(t *testing.T) {
	base := time.Date(2026, 6, 13, 12, 0, 0, 0, time.UTC)
	mk := func(i int, et string, notes string) logbook.Pass {
		p := logbook.Pass{Time: base.Add(time.Duration(i) * time.Hour), Notes: notes}
		p.ET[4] = decimal.NewNullDecimal(d(et))
		return p
	}
	passes := []logbook.Pass{mk(0, "11.50", ""), mk(1, "11.52", ""), mk(2, "12.90", "lifted at 1000"), mk(3, "11.48", ""), mk(4, "13.40", ""), mk(5, "11.51", "")}
	est, used, err := RecentEstimate(passes, 1320, 10, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(used) != 4 || math.Abs(est.ET-11.5025) > 1e-9 || est.SD < MinSD {
		t.Errorf("estimate %+v from %d passes", est, len(used))
	}
	if _, _, err := RecentEstimate(passes[:1], 1320, 10, nil); err == nil {
		t.Error("one pass gave an estimate")
	}
}

// RecentEstimate leaves out a pass beyond 4 robust deviations of the median
// (4 × 1.4826 × MAD, the 1.4826 making the MAD a standard deviation for
// normal scatter: a statistics identity; the 4 is common practice for a
// robust cut, from memory), QUICK or slow, and keeps one inside. Five clean
// passes 11.48–11.52 s have a MAD of 0.015 s, so 1.4826 × MAD = 0.0222 s
// and the cut is 0.0890 s from the median (hand arithmetic): a pass 0.13 s
// out is 5.8 deviations (left out; an 8-deviation rule would keep it), one
// 0.075 s out is 3.4 (kept; a rule on the MAD alone would drop it).
func TestRecentEstimateCut(t *testing.T) {
	base := time.Date(2026, 6, 13, 12, 0, 0, 0, time.UTC)
	clean := []string{"11.50", "11.52", "11.48", "11.51", "11.49"}
	cases := []struct {
		name  string
		extra string
		kept  bool
	}{
		{"slow by 5.8 deviations: left out", "11.635", false},
		{"quick by 5.4 deviations (a timing fault): left out", "11.375", false},
		{"slow by 3.4 deviations: kept", "11.580", true},
		{"quick by 3.4 deviations: kept", "11.420", true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var passes []logbook.Pass
			for i, et := range append(append([]string(nil), clean...), tc.extra) {
				p := logbook.Pass{Time: base.Add(time.Duration(i) * time.Hour)}
				p.ET[4] = decimal.NewNullDecimal(d(et))
				passes = append(passes, p)
			}
			est, used, err := RecentEstimate(passes, 1320, 10, nil)
			if err != nil {
				t.Fatal(err)
			}
			want := []float64{11.50, 11.52, 11.48, 11.51, 11.49}
			if tc.kept {
				want = append(want, d(tc.extra).InexactFloat64())
			}
			m, sd := stats.MeanSD(want)
			if len(used) != len(want) || math.Abs(est.ET-m) > 1e-9 {
				t.Errorf("used %d passes, mean %.4f; want %d passes, mean %.4f", len(used), est.ET, len(want), m)
			}
			// the spread of a next pass from a sample of k: sd·√(1 + 1/k)
			// (the prediction interval of a normal sample, statistics),
			// here above MinSD
			if next := sd * math.Sqrt(1+1/float64(len(want))); next <= MinSD || math.Abs(est.SD-next) > 1e-9 {
				t.Errorf("spread %.5f, want %.5f (sample SD %.5f of %d)", est.SD, next, sd, len(want))
			}
		})
	}
}

// RecentEstimate takes the last n clean passes, no more, and two are enough
// (pitcard's own rule, dial.go).
func TestRecentEstimateTakesN(t *testing.T) {
	base := time.Date(2026, 6, 13, 12, 0, 0, 0, time.UTC)
	var passes []logbook.Pass
	for i, et := range []string{"11.60", "11.50", "11.52", "11.48"} {
		p := logbook.Pass{Time: base.Add(time.Duration(i) * time.Hour)}
		p.ET[4] = decimal.NewNullDecimal(d(et))
		passes = append(passes, p)
	}
	est, used, err := RecentEstimate(passes, 1320, 3, nil)
	if err != nil || len(used) != 3 || math.Abs(est.ET-11.50) > 1e-9 {
		t.Errorf("last 3: %d used, mean %v, %v; want 3, 11.50", len(used), est.ET, err)
	}
	est, used, err = RecentEstimate(passes[2:], 1320, 10, nil)
	if err != nil || len(used) != 2 || math.Abs(est.ET-11.50) > 1e-9 {
		t.Errorf("two passes: %d used, mean %v, %v; want 2, 11.50", len(used), est.ET, err)
	}
}
