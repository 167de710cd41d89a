package bracket

import (
	"fmt"
	"math"
	"testing"

	"github.com/shopspring/decimal"

	"pitcard/logbook"
)

func d(s string) decimal.Decimal { return decimal.RequireFromString(s) }

func run(dial, rt, et string) LaneRun { return LaneRun{Dial: d(dial), RT: d(rt), ET: d(et)} }

// Source: "How to Bracket Race", a widely reprinted club how-to (worked
// examples); the precedence rules are common practice (no source), as tracks
// publish their own.
func TestSettle(t *testing.T) {
	amberFull := RaceRules{Tree: FullTree, RTZero: FromAmber}
	green := RaceRules{Tree: FullTree, RTZero: FromGreen}
	cases := []struct {
		name        string
		left, right LaneRun
		rules       RaceRules
		winner      logbook.Lane
		reason      string
		margin      string
	}{
		{"how-to example 1: 14.20 car wins by .010 on a .500 full tree",
			run("14.20", ".520", "14.32"), run("13.00", ".550", "13.10"), amberFull, logbook.Left, ReasonFirstToFinish, "0.010"},
		{"how-to example 1, lanes swapped",
			run("13.00", ".550", "13.10"), run("14.20", ".520", "14.32"), amberFull, logbook.Right, ReasonFirstToFinish, "0.010"},
		{"how-to example 2: both break out, the 14.19 on 14.20 wins",
			run("14.20", ".520", "14.19"), run("13.00", ".510", "12.96"), amberFull, logbook.Left, ReasonDoubleBreakout, ""},
		{"one breakout loses even when first to the finish",
			run("12.00", ".010", "11.99"), run("12.00", ".200", "12.30"), green, logbook.Right, ReasonBreakout, ""},
		{"red light beats a breakout",
			run("12.00", "-.001", "12.05"), run("12.00", ".050", "11.90"), green, logbook.Right, ReasonRedLight, ""},
		{"red light on an amber-counted full tree is below .500",
			run("12.00", ".499", "12.05"), run("12.00", ".550", "12.10"), amberFull, logbook.Right, ReasonRedLight, ""},
		{"red light on an amber-counted pro tree is below .400",
			run("12.00", ".450", "12.05"), run("12.00", ".390", "12.10"), RaceRules{Tree: ProTree, RTZero: FromAmber}, logbook.Left, ReasonRedLight, ""},
		{"both red: the first to leave loses (the 14.00 car, green first, left at -.002 s; the 12.00 car at 2.00 - .050)",
			run("14.00", "-.002", "14.10"), run("12.00", "-.050", "12.10"), green, logbook.Right, ReasonRedLight, ""},
		{"red light before a boundary foul",
			run("12.00", "-.010", "12.10"), LaneRun{Dial: d("12.00"), RT: d(".02"), ET: d("12.1"), Foul: true}, green, logbook.Right, ReasonRedLight, ""},
		{"boundary foul loses",
			LaneRun{Dial: d("12.00"), RT: d(".02"), ET: d("12.01"), Foul: true}, run("12.00", ".08", "12.20"), green, logbook.Right, ReasonFoul, ""},
		{"first to the finish, no breakouts",
			run("10.50", ".030", "10.55"), run("11.20", ".045", "11.26"), green, logbook.Left, ReasonFirstToFinish, "0.025"},
		{"exact tie",
			run("10.50", ".030", "10.55"), run("11.20", ".020", "11.26"), green, "", ReasonTie, "0.000"},
		{"dead on the dial is not a breakout",
			run("10.50", ".030", "10.50"), run("10.50", ".040", "10.52"), green, logbook.Left, ReasonFirstToFinish, "0.030"},
		{"equal breakouts: first to the finish",
			run("10.50", ".030", "10.49"), run("10.50", ".040", "10.49"), green, logbook.Left, ReasonDoubleBreakout, "0.010"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			o, err := Settle(tc.left, tc.right, tc.rules)
			if err != nil {
				t.Fatalf("%s: %v", tc.name, err)
			}
			if o.Winner != tc.winner || o.Reason != tc.reason {
				t.Errorf("%s: winner %q (%s: %s), want %q (%s)", tc.name, o.Winner, o.Reason, o.Explanation, tc.winner, tc.reason)
			}
			if tc.margin != "" && !o.MarginS.Equal(d(tc.margin)) {
				t.Errorf("%s: margin %s s, want %s", tc.name, o.MarginS, tc.margin)
			}
		})
	}
}

// The margin in feet is the margin in seconds at the trailing car's speed
// (physics; 1 mph = 1.46667 ft/s by definition).
func TestMarginInFeet(t *testing.T) {
	l := run("14.20", ".520", "14.32")
	r := run("13.00", ".550", "13.10")
	r.MPH = decimal.NewNullDecimal(d("105.00"))
	o, _ := Settle(l, r, RaceRules{})
	if !o.HasMarginFt || math.Abs(o.MarginFt-0.010*105*5280/3600) > 1e-9 {
		t.Errorf("margin %v ft", o.MarginFt)
	}
}

// Decimal arithmetic: a float sum of .1 steps drifts; the slip's does not
// (IEEE 754 fact: 0.1 + 0.2 != 0.3 in binary floating point).
func TestSettleIsExact(t *testing.T) {
	o, _ := Settle(run("10.1", ".1", "10.2"), run("10.1", ".2", "10.1"), RaceRules{})
	if o.Reason != ReasonTie {
		t.Errorf("0.1 + 10.2 and 0.2 + 10.1 should tie exactly: %s %s", o.Reason, o.MarginS)
	}
}

func TestSettleRefusesImpossibleSlips(t *testing.T) {
	if _, err := Settle(run("0", ".1", "10"), run("10", ".1", "10"), RaceRules{}); err == nil {
		t.Error("a zero dial was settled")
	}
	if _, err := Settle(run("10", ".1", "10"), run("10", ".1", "-1"), RaceRules{}); err == nil {
		t.Error("a negative ET was settled")
	}
}

// Both lanes fouled: nobody wins on the slips (common practice, no source:
// the first to foul loses, and only the track's officials can say who that
// was). Dropping the double-foul case hands the race to the right lane.
func TestDoubleFoul(t *testing.T) {
	foul := func(dial, rt, et string) LaneRun { r := run(dial, rt, et); r.Foul = true; return r }
	cases := []struct {
		name        string
		left, right LaneRun
	}{
		{"both boundary fouls", foul("12.00", ".020", "12.05"), foul("12.00", ".030", "12.10")},
		{"both boundary fouls, lanes swapped", foul("12.00", ".030", "12.10"), foul("12.00", ".020", "12.05")},
		{"both boundary fouls, one also broke out", foul("12.00", ".020", "11.95"), foul("12.00", ".030", "12.10")},
		{"both red-lit at the same instant", run("12.00", "-.010", "12.05"), run("12.00", "-.010", "12.10")},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			o, err := Settle(tc.left, tc.right, RaceRules{})
			if err != nil {
				t.Fatal(err)
			}
			if o.Winner != "" || o.Reason != ReasonDoubleFoul {
				t.Errorf("winner %q (%s: %s), want none (%s)", o.Winner, o.Reason, o.Explanation, ReasonDoubleFoul)
			}
		})
	}
}

// The margin in feet is the margin in seconds at the TRAILING car's speed
// (physics: the distance the second car still has to cover; 1 mph =
// 5280/3600 ft/s by definition). Both lanes carry a speed, so taking the
// leader's or always one lane's speed gives a different number.
func TestMarginInFeetTrailingLane(t *testing.T) {
	withMPH := func(r LaneRun, mph string) LaneRun { r.MPH = decimal.NewNullDecimal(d(mph)); return r }
	cases := []struct {
		name        string
		left, right LaneRun
		first       logbook.Lane
		trailingMPH float64
	}{
		// how-to example 1: left first by .010 s; right (105 mph) trails
		{"left first, right trails", withMPH(run("14.20", ".520", "14.32"), "95"), withMPH(run("13.00", ".550", "13.10"), "105"), logbook.Left, 105},
		{"right first, left trails", withMPH(run("13.00", ".550", "13.10"), "105"), withMPH(run("14.20", ".520", "14.32"), "95"), logbook.Right, 105},
		{"right first, left trails (slower car trails)", withMPH(run("14.20", ".560", "14.32"), "95"), withMPH(run("13.00", ".550", "13.10"), "105"), logbook.Right, 95},
		{"only the leader's speed known: it stands in", run("14.20", ".520", "14.32"), withMPH(run("13.00", ".550", "13.10"), "105"), logbook.Left, 105},
		{"only the trailer's speed known", withMPH(run("14.20", ".520", "14.32"), "95"), run("13.00", ".550", "13.10"), logbook.Left, 95},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			o, err := Settle(tc.left, tc.right, RaceRules{RTZero: FromAmber})
			if err != nil {
				t.Fatal(err)
			}
			want := o.MarginS.InexactFloat64() * tc.trailingMPH * 5280 / 3600
			if o.First != tc.first || !o.HasMarginFt || math.Abs(o.MarginFt-want) > 1e-9 || o.MarginS.IsZero() {
				t.Errorf("first %q, margin %s s = %v ft, want first %q and %v ft (at %v mph)", o.First, o.MarginS, o.MarginFt, tc.first, want, tc.trailingMPH)
			}
		})
	}
}

// The explanation names the lane that lost and why, whichever lane it is
// (the same precedence as TestSettle; common practice, no source).
func TestExplanationNamesTheLane(t *testing.T) {
	foul := func(r LaneRun) LaneRun { r.Foul = true; return r }
	green := RaceRules{}
	cases := []struct {
		name        string
		left, right LaneRun
		want        string
	}{
		{"left red light", run("12.00", "-.001", "12.05"), run("12.00", ".050", "11.90"), "left red-lit (reaction -0.001)"},
		{"right red light", run("12.00", ".050", "11.90"), run("12.00", "-.001", "12.05"), "right red-lit (reaction -0.001)"},
		{"both red, left first", run("12.00", "-.050", "12.10"), run("12.00", "-.002", "12.10"), "both red-lit; left left first (reaction -0.050) and loses"},
		{"both red, right first", run("12.00", "-.002", "12.10"), run("12.00", "-.050", "12.10"), "both red-lit; right left first (reaction -0.050) and loses"},
		{"left foul", foul(run("12.00", ".02", "12.01")), run("12.00", ".08", "12.20"), "left fouled (boundary or centerline)"},
		{"right foul", run("12.00", ".08", "12.20"), foul(run("12.00", ".02", "12.01")), "right fouled (boundary or centerline)"},
		{"left breakout", run("12.00", ".010", "11.99"), run("12.00", ".200", "12.30"), "left broke out by 0.010 (11.990 on a 12.00 dial)"},
		{"right breakout", run("12.00", ".200", "12.30"), run("12.00", ".010", "11.99"), "right broke out by 0.010 (11.990 on a 12.00 dial)"},
		{"both break out, left by less", run("12.00", ".010", "11.99"), run("12.00", ".010", "11.95"), "both broke out; left by less: 0.010 (11.990 on a 12.00 dial) against 0.050 (11.950 on a 12.00 dial)"},
		{"both break out, right by less", run("12.00", ".010", "11.95"), run("12.00", ".010", "11.99"), "both broke out; right by less: 0.010 (11.990 on a 12.00 dial) against 0.050 (11.950 on a 12.00 dial)"},
		{"double foul", foul(run("12.00", ".02", "12.01")), foul(run("12.00", ".03", "12.01")), "both lanes fouled: the first to foul loses, and the track's officials decide who that was"},
		{"tie", run("10.50", ".030", "10.55"), run("11.20", ".020", "11.26"), "both reached the finish at the same thousandth"},
		{"first to the finish", run("10.50", ".030", "10.55"), run("11.20", ".045", "11.26"), "left reached the finish first by 0.025 s; neither broke out"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			o, err := Settle(tc.left, tc.right, green)
			if err != nil {
				t.Fatal(err)
			}
			if o.Explanation != tc.want {
				t.Errorf("explanation %q, want %q", o.Explanation, tc.want)
			}
		})
	}
}

// The tree's delay from the last amber to the green: 0.5 s on a full
// (sportsman) tree, 0.4 s on a pro tree (common practice, no source). On an
// amber-counted slip a perfect light is then .500 or .400: reaction .000,
// no red light.
func TestTreeDelay(t *testing.T) {
	if !FullTree.Delay().Equal(d("0.5")) || !ProTree.Delay().Equal(d("0.4")) {
		t.Fatalf("delays: full %s, pro %s", FullTree.Delay(), ProTree.Delay())
	}
	for _, tc := range []struct {
		tree    Tree
		perfect string
	}{{ProTree, ".400"}, {FullTree, ".500"}, {"", ".500"}} {
		t.Run(fmt.Sprintf("tree %q", tc.tree), func(t *testing.T) {
			o, err := Settle(run("12.00", tc.perfect, "12.05"), run("12.00", tc.perfect, "12.06"), RaceRules{Tree: tc.tree, RTZero: FromAmber})
			if err != nil {
				t.Fatal(err)
			}
			if !o.Left.Reaction.IsZero() || o.Left.RedLight || o.Winner != logbook.Left || o.Reason != ReasonFirstToFinish || !o.Left.Finish.Equal(d("12.05")) {
				t.Errorf("tree %q, light %s: reaction %s, red %v, %s %s, finish %s", tc.tree, tc.perfect, o.Left.Reaction, o.Left.RedLight, o.Winner, o.Reason, o.Left.Finish)
			}
		})
	}
}
