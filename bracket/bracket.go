package bracket

import (
	"fmt"
	"strings"

	"github.com/shopspring/decimal"

	"pitcard/logbook"
	"pitcard/weather"
)

// The bracket-racing rules pitcard settles races by (common practice; tracks
// publish their own rules, and where they differ it is a setting):
//
//   - Each car posts a dial-in. The slower dial gets the green first, by the
//     difference of the dials. First to the finish wins, unless it broke out
//     (ran quicker than its dial).
//   - Fouls come before everything: a red light (leaving before the green)
//     loses, even against a car that broke out; so does a boundary or
//     centerline foul. When both foul, the first foul loses: a red light
//     happens at the start, so it is always first against a boundary foul;
//     of two red lights the one that left earlier in time loses.
//   - One breakout loses to a car that did not break out. Both break out: the
//     smaller breakout wins; equal breakouts go to the first to the finish.
//   - Otherwise the first to the finish wins; the same thousandth is a tie.
//
// All of it is exact decimal arithmetic, as the slips are.

// Tree is the starting tree: on a full (sportsman) tree three ambers count
// down 0.5 s apart and the green follows the last by 0.5 s; on a pro tree all
// ambers light together and the green follows 0.4 s later.
type Tree string

// Trees.
const (
	FullTree Tree = "full"
	ProTree  Tree = "pro"
)

// Delay is the time from the last amber to the green.
func (t Tree) Delay() decimal.Decimal {
	if t == ProTree {
		return decimal.New(4, -1)
	}
	return decimal.New(5, -1)
}

// ParseTree reads full (also sportsman) or pro.
func ParseTree(s string) (Tree, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "full", "sportsman", ".5", "0.5":
		return FullTree, nil
	case "pro", ".4", "0.4":
		return ProTree, nil
	}
	return "", &weather.InputError{Field: "tree", Value: s, Reason: "is not a tree (full or pro)"}
}

// RTZero is what a slip's reaction time counts from.
type RTZero string

// Reaction-time conventions.
const (
	// FromGreen: perfect is .000 and a red light is negative (modern systems).
	FromGreen RTZero = "green"
	// FromAmber: counted from the last amber, so perfect is the tree's delay
	// (.500 full, .400 pro) and a red light is below it.
	FromAmber RTZero = "amber"
)

// ParseRTZero reads green or amber.
func ParseRTZero(s string) (RTZero, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "green", "0", ".000":
		return FromGreen, nil
	case "amber", "last-amber", "last_amber":
		return FromAmber, nil
	}
	return "", &weather.InputError{Field: "rt-zero", Value: s, Reason: "is not a reaction-time convention (green: perfect .000; amber: perfect .500 full / .400 pro)"}
}

// RaceRules are the settings a race is settled by.
type RaceRules struct {
	Tree   Tree
	RTZero RTZero
}

// LaneRun is one lane's slip in a race.
type LaneRun struct {
	Dial decimal.Decimal     // dial-in, s
	RT   decimal.Decimal     // reaction time as the slip shows it, s
	ET   decimal.Decimal     // elapsed time at the finish, s
	MPH  decimal.NullDecimal // finish-line trap speed, for the margin in feet
	Foul bool                // boundary or centerline foul
}

// LaneResult is what the race made of one lane.
type LaneResult struct {
	Start    decimal.Decimal // its green, s after the first green
	Reaction decimal.Decimal // reaction from its own green, s (negative = red light)
	Finish   decimal.Decimal // reached the finish, s after the first green
	OverDial decimal.Decimal // ET − dial: negative is a breakout
	Package  decimal.Decimal // reaction + ET − dial: the total against the dial
	RedLight bool
	Breakout bool
	Foul     bool
}

// Reasons a race was decided.
const (
	ReasonFirstToFinish  = "first to the finish"
	ReasonBreakout       = "breakout"
	ReasonDoubleBreakout = "double breakout"
	ReasonRedLight       = "red light"
	ReasonFoul           = "foul"
	ReasonDoubleFoul     = "double foul"
	ReasonTie            = "tie"
)

// Outcome is a settled race.
type Outcome struct {
	Winner      logbook.Lane // "" for a tie or a double foul nobody wins
	Reason      string       // one of the Reason constants
	Explanation string       // the decision in words
	Left, Right LaneResult
	First       logbook.Lane    // first to the finish ("" when level)
	MarginS     decimal.Decimal // difference at the finish, s (≥ 0)
	MarginFt    float64         // MarginS at the trailing car's speed, ft; 0 without a speed
	HasMarginFt bool
}

// Settle decides a race from two slips. It refuses slips that cannot be
// (a dial or an ET not positive).
func Settle(left, right LaneRun, rules RaceRules) (Outcome, error) {
	for _, l := range []struct {
		name string
		run  LaneRun
	}{{"left", left}, {"right", right}} {
		if !l.run.Dial.IsPositive() {
			return Outcome{}, &weather.InputError{Field: l.name + "-dial", Value: l.run.Dial.String(), Reason: "must be a positive time in seconds"}
		}
		if !l.run.ET.IsPositive() {
			return Outcome{}, &weather.InputError{Field: l.name + "-et", Value: l.run.ET.String(), Reason: "must be a positive time in seconds"}
		}
	}
	if rules.Tree == "" {
		rules.Tree = FullTree
	}
	if rules.RTZero == "" {
		rules.RTZero = FromGreen
	}
	maxDial := decimal.Max(left.Dial, right.Dial)
	lane := func(r LaneRun) LaneResult {
		var x LaneResult
		x.Start = maxDial.Sub(r.Dial)
		x.Reaction = r.RT
		if rules.RTZero == FromAmber {
			x.Reaction = r.RT.Sub(rules.Tree.Delay())
		}
		x.Finish = x.Start.Add(x.Reaction).Add(r.ET)
		x.OverDial = r.ET.Sub(r.Dial)
		x.Package = x.Reaction.Add(x.OverDial)
		x.RedLight = x.Reaction.IsNegative()
		x.Breakout = x.OverDial.IsNegative()
		x.Foul = r.Foul
		return x
	}
	o := Outcome{Left: lane(left), Right: lane(right)}
	o.MarginS = o.Left.Finish.Sub(o.Right.Finish).Abs()
	switch o.Left.Finish.Cmp(o.Right.Finish) {
	case -1:
		o.First = logbook.Left
	case 1:
		o.First = logbook.Right
	}
	trailing := right.MPH
	if o.First == logbook.Right {
		trailing = left.MPH
	}
	if !trailing.Valid {
		trailing = decimal.NullDecimal{Decimal: decimal.Max(left.MPH.Decimal, right.MPH.Decimal), Valid: left.MPH.Valid || right.MPH.Valid}
	}
	if trailing.Valid {
		o.MarginFt = o.MarginS.InexactFloat64() * trailing.Decimal.InexactFloat64() * 5280 / 3600
		o.HasMarginFt = true
	}
	L, R := o.Left, o.Right
	f := raceFacts{
		L:      laneFacts{RedLight: L.RedLight, Breakout: L.Breakout, Foul: L.Foul},
		R:      laneFacts{RedLight: R.RedLight, Breakout: R.Breakout, Foul: R.Foul},
		Finish: L.Finish.Cmp(R.Finish), OverDial: L.OverDial.Cmp(R.OverDial),
		Leave: L.Start.Add(L.Reaction).Cmp(R.Start.Add(R.Reaction)),
	}
	o.Winner, o.Reason = decide(f)
	o.Explanation = explain(o, f, left, right)
	return o, nil
}

// laneFacts are what the rules look at in one lane.
type laneFacts struct{ RedLight, Breakout, Foul bool }

// raceFacts are what the rules compare between the lanes: −1 when left's is
// less (earlier to the finish, a smaller over-dial, left first off the
// line), 0 level, +1 right's less.
type raceFacts struct {
	L, R                    laneFacts
	Finish, OverDial, Leave int
}

// decide is the bracket rules themselves, the one place they are written:
// Settle applies them to two slips, WinChances to every draw of a race not
// yet run.
func decide(f raceFacts) (logbook.Lane, string) {
	L, R := f.L, f.R
	switch { // fouls first: red lights, then boundary fouls
	case L.RedLight && R.RedLight:
		switch f.Leave {
		case -1:
			return logbook.Right, ReasonRedLight
		case 1:
			return logbook.Left, ReasonRedLight
		}
		return "", ReasonDoubleFoul
	case L.RedLight:
		return logbook.Right, ReasonRedLight
	case R.RedLight:
		return logbook.Left, ReasonRedLight
	case L.Foul && R.Foul:
		return "", ReasonDoubleFoul
	case L.Foul:
		return logbook.Right, ReasonFoul
	case R.Foul:
		return logbook.Left, ReasonFoul
	}
	first := logbook.Lane("")
	switch f.Finish {
	case -1:
		first = logbook.Left
	case 1:
		first = logbook.Right
	}
	switch {
	case L.Breakout && R.Breakout:
		switch f.OverDial {
		case 1:
			return logbook.Left, ReasonDoubleBreakout
		case -1:
			return logbook.Right, ReasonDoubleBreakout
		}
		if first != "" {
			return first, ReasonDoubleBreakout
		}
		return "", ReasonTie
	case L.Breakout:
		return logbook.Right, ReasonBreakout
	case R.Breakout:
		return logbook.Left, ReasonBreakout
	}
	if first == "" {
		return "", ReasonTie
	}
	return first, ReasonFirstToFinish
}

// explain says a settled race's decision in words.
func explain(o Outcome, f raceFacts, left, right LaneRun) string {
	L, R := o.Left, o.Right
	rt := func(x LaneResult) string { return logbook.FormatSeconds(x.Reaction, 3) }
	bo := func(x LaneResult, r LaneRun) string {
		return fmt.Sprintf("%s (%s on a %s dial)", logbook.FormatSeconds(x.OverDial.Abs(), 3), logbook.FormatSeconds(r.ET, 3), logbook.FormatSeconds(r.Dial, 2))
	}
	switch o.Reason {
	case ReasonRedLight:
		if L.RedLight && R.RedLight {
			if o.Winner == logbook.Right {
				return fmt.Sprintf("both red-lit; left left first (reaction %s) and loses", rt(L))
			}
			return fmt.Sprintf("both red-lit; right left first (reaction %s) and loses", rt(R))
		}
		if o.Winner == logbook.Right {
			return fmt.Sprintf("left red-lit (reaction %s)", rt(L))
		}
		return fmt.Sprintf("right red-lit (reaction %s)", rt(R))
	case ReasonDoubleFoul:
		if L.RedLight && R.RedLight {
			return "both red-lit at the same instant: the track decides"
		}
		return "both lanes fouled: the first to foul loses, and the track's officials decide who that was"
	case ReasonFoul:
		if o.Winner == logbook.Right {
			return "left fouled (boundary or centerline)"
		}
		return "right fouled (boundary or centerline)"
	case ReasonDoubleBreakout:
		switch f.OverDial {
		case 1:
			return fmt.Sprintf("both broke out; left by less: %s against %s", bo(L, left), bo(R, right))
		case -1:
			return fmt.Sprintf("both broke out; right by less: %s against %s", bo(R, right), bo(L, left))
		}
		return fmt.Sprintf("both broke out by the same %s; %s reached the finish first", logbook.FormatSeconds(L.OverDial.Abs(), 3), o.First)
	case ReasonBreakout:
		if o.Winner == logbook.Right {
			return fmt.Sprintf("left broke out by %s", bo(L, left))
		}
		return fmt.Sprintf("right broke out by %s", bo(R, right))
	case ReasonTie:
		if L.Breakout && R.Breakout {
			return "both broke out by the same amount and reached the finish together"
		}
		return "both reached the finish at the same thousandth"
	}
	return fmt.Sprintf("%s reached the finish first by %s s; neither broke out", o.First, logbook.FormatSeconds(o.MarginS, 3))
}
