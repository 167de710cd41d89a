package prep

import (
	"fmt"
	"math"
	"strings"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/bracket"
	"pitcard/engine"
	"pitcard/internal/printable"
	"pitcard/internal/text"
	"pitcard/scripts"
	"pitcard/weather"
)

// view is the card laid out in words and figures, in the crew's units: what
// every renderer but JSON prints. Renderers only arrange it.
type view struct {
	Title     string   // "Round 3, left lane"
	Subtitle  []string // track and date; call time; car; opponent
	Dial      string   // the dial to post, or "" when there is none
	DialLines []string // how the dial was reached
	DialAlert string   // the rules' total flagged, if it is
	// Stop is the failed checks, in the dial box's words ("A CHECK
	// FAILED: ET limit: …"): the dial box leads with it, in the dial's own
	// type, and the dial is not to be posted as it stands.
	Stop        string
	NoDial      string // why there is no dial, when it is not a problem of the files
	Guide       string // the estimate shown instead of a dial, in words
	Air         table
	AirNote     string
	Prediction  table
	Basis       []string
	Options     table
	OptionsNote string
	Rules       table
	Checks      []checkRow
	Notes       []string
	Record      table
	RecordNote  string
	// RecordHint points the terminal's and Markdown's reader to the
	// segment comparison; the HTML card leaves it out (one printed page).
	RecordHint string
	Problems   []string
	Cautions   []string
}

// MaxPassNotes is the most characters of a pass's notes the card prints
// (in the record of today and where a pass is left out for its notes): a
// cell of a one-page card. A 3 MB note made a 13 MB card; the whole notes
// stay in the logbook, shown by `pitcard log list`.
const MaxPassNotes = 120

// passNotes is a pass's notes (or a text quoting them) cut at MaxPassNotes
// characters, saying where the whole is. The cut is a copy, so the card
// does not keep the whole notes alive.
func passNotes(s string) string {
	if len(s) > 4*MaxPassNotes {
		s = s[:4*MaxPassNotes] // ≥ MaxPassNotes characters; the rest is cut below
	}
	s = printable.Line(s)       // a crewmate's logbook writes no control codes into a terminal
	if len(s) <= MaxPassNotes { // bytes ≥ characters
		return s
	}
	n := 0
	for i := range s {
		if n == MaxPassNotes {
			return s[:i] + "… (cut: `pitcard log list` shows the pass's whole notes)"
		}
		n++
	}
	return s
}

type table struct {
	Title  string
	Header []string
	Rows   [][]string
	Marked int // index of the row to emphasize, or -1
}

type checkRow struct {
	Status, Label, Note, File string
	Ticked                    string // when the crew ticked it, "21:02"; "" if not
}

// word is how the row's status reads on paper: a ticked box for an item
// the crew ticked.
func (ch checkRow) word() string {
	if ch.Status == "confirm" && ch.Ticked != "" {
		return "[x]"
	}
	return statusWord(ch.Status)
}

// line is the item with its note and when it was ticked.
func (ch checkRow) line() string {
	l := ch.Label
	if ch.Note != "" {
		l += ": " + ch.Note
	}
	if ch.Ticked != "" {
		l += " (ticked " + ch.Ticked + ")"
	}
	return l
}

// newView lays the card out in words and figures, a section at a time, in
// the card's order. It computes nothing: Gather did.
func newView(c Card) view {
	v := view{Title: c.Title, Cautions: c.Cautions}
	v.Subtitle = subtitleLines(c)
	v.dialBox(c)
	v.airTable(c)
	v.predictionTable(c)
	v.optionsTable(c)
	v.rulesAndChecks(c)
	v.Notes = c.Notes
	v.recordTable(c)
	v.Problems = c.Problems
	return v
}

// subtitleLines is the card's subtitle: the track and day, the call time
// and how far off it is, the car and the other lane's dial.
func subtitleLines(c Card) []string {
	in := c.Input
	day := in.Call.Format("Mon 2006-01-02")
	out := []string{fmt.Sprintf("%s · %s", text.OrDash(in.Track.Name), day)}
	call := "called " + in.Call.Format("15:04")
	switch m := math.Round(c.MinutesToGo); {
	case m > 0:
		call += " (in " + minutes(time.Duration(m)*time.Minute) + ")"
	case m == 0:
		call += " (now)"
	default:
		call += " (" + minutes(time.Duration(-m)*time.Minute) + " ago)"
	}
	out = append(out, call)
	car := text.OrDash(in.Car.Name)
	if in.OpponentDial.Valid {
		car += " · the other lane dials " + DialText(in.OpponentDial.Decimal, in.Settings.DialStep)
	}
	return append(out, car)
}

// dialBox fills the dial's box: the dial and how it was reached, the
// rules' alert, the failed checks, or why there is no dial and the guide
// shown instead. It does not decide the dial: Gather did.
func (v *view) dialBox(c Card) {
	if c.HasFinal {
		v.Dial = dialText(c.FinalDial, c.Input.Settings.DialStep)
		v.DialLines = dialLines(c, v.Dial)
	}
	v.DialAlert = c.AdjustFlag
	if c.CrossFlag != "" {
		v.DialAlert = strings.TrimPrefix(v.DialAlert+"; "+c.CrossFlag, "; ")
	}
	if len(c.Failed) > 0 {
		v.Stop = failedWords(c.Failed)
	}
	if c.NoDial != "" {
		v.NoDial = text.UpperFirst(c.NoDial) + "."
		if f := c.Prediction; len(f.Timers) > 0 {
			t := f.Finish()
			v.Guide = fmt.Sprintf("Guide from %s: %s %.2f s, 95 %% interval %.2f–%.2f s. Not a dial-in.", GuideFrom(f), TimerName(t.DistanceFt), t.ET, t.Low, t.High)
		}
	}
}

// dialLines says how the final dial (dial, as printed) was reached: the
// breakout rule's pick and its chance, the race against the other lane,
// each rule's adjustment, the final chance and the cross-check.
func dialLines(c Card, dial string) []string {
	in := c.Input
	step := in.Settings.DialStep
	rec := fmt.Sprintf("before the rules %s: %.1f %% chance of breaking out (risk accepted %.0f %%)",
		dialText(c.Plan.Recommended, step), 100*bracket.BreakoutChance(c.Plan.Estimate, c.Plan.Recommended), 100*c.Plan.Risk)
	out := []string{rec}
	if c.FewPasses != "" {
		out = append(out, "NOTE: "+c.FewPasses)
	}
	if len(c.Win) > 0 {
		out = append(out, winLines(c)...)
	}
	for _, a := range c.Adjustments {
		out = append(out, fmt.Sprintf("%s s %s (%s)", SignedDialText(a.Adjust, step), a.Reason, a.File))
	}
	if len(c.Adjustments) > 0 {
		chance := bracket.BreakoutChance(c.Plan.Estimate, c.FinalDial)
		line := fmt.Sprintf("final %s: %.1f %% chance of breaking out", dial, 100*chance)
		if chance > c.Plan.Risk {
			line += fmt.Sprintf(", more than the %.0f %% you accept: the rules dialed past the recommendation", 100*c.Plan.Risk)
		}
		out = append(out, line)
	}
	if c.HasCross && c.CrossFlag == "" {
		out = append(out, fmt.Sprintf("cross-check %.3f s, the latest %s carried by the air alone: the model agrees within %.2f s",
			c.Cross.ET, text.Plural(len(c.Cross.Passes), "pass"), crossLimit(in.Settings)))
	}
	return out
}

// winLines is the race against the other lane, for the dial's box: who
// leaves first, the chance to win on the recommended dial and the dial
// that wins most, and the trade between them.
func winLines(c Card) []string {
	in := c.Input
	step := in.Settings.DialStep
	out := []string{HeadStartWords(c.Plan.Recommended, in.Opponent.Dial)}
	if w, ok := winOf(c, c.Plan.Recommended); ok {
		out = append(out, fmt.Sprintf("against the other lane: %.1f %% to win on %s; the dial that wins most is %s (%.1f %% to win, %.1f %% breakout)%s",
			100*w, dialText(c.Plan.Recommended, step), dialText(c.BestForWin.Dial, step), 100*c.BestForWin.Win,
			100*bracket.BreakoutChance(c.Plan.Estimate, c.BestForWin.Dial), postedWords(in.PostBestForWin)))
	}
	if c.WinTrade != "" {
		out = append(out, "CHOICE: "+c.WinTrade)
	}
	return out
}

// airTable fills the air now and at the call, a row per figure, and the
// note saying where the call's air came from.
func (v *view) airTable(c Card) {
	in := c.Input
	u := in.Settings.Units
	v.Air = table{Title: "Air", Header: []string{"", airNowHead(c), "at the call " + in.Call.Format("15:04")}, Marked: -1}
	row := func(name string, f func(weather.Air, weather.Reading) string) {
		v.Air.Rows = append(v.Air.Rows, []string{name, f(c.LatestAir, c.LatestReading), f(c.AirCall, in.Air)})
	}
	row("Density altitude", func(a weather.Air, _ weather.Reading) string {
		return a.DensityAltitude.FormatDensityAltitude(u.Length)
	})
	row("Relative air density", func(a weather.Air, _ weather.Reading) string { return fmt.Sprintf("%.1f %%", a.RelativeDensity) })
	row("Air temperature", func(_ weather.Air, r weather.Reading) string { return r.Temp.Format(u.Temp, 1) })
	row("Station pressure", func(a weather.Air, _ weather.Reading) string { return a.Station.Format(u.Pressure) })
	row("Humidity / dew point", func(a weather.Air, _ weather.Reading) string {
		return fmt.Sprintf("%.0f %% / %s", a.RH*100, a.DewPoint.Format(u.Temp, 0))
	})
	row("Track temperature", func(_ weather.Air, r weather.Reading) string {
		if !r.HasTrack {
			return "not read"
		}
		return r.TrackTemp.Format(u.Temp, 0)
	})
	row("Wind", func(_ weather.Air, r weather.Reading) string { return windWords(r, in.Track.HeadingDeg, u) })
	row("CF SAE J1349 / STD", func(a weather.Air, _ weather.Reading) string { return fmt.Sprintf("%.4f / %.4f", a.CFJ1349, a.CFSTD) })
	row("CF J1349 (2004) / DIN", func(a weather.Air, _ weather.Reading) string {
		return fmt.Sprintf("%.4f / %.4f", a.CFJ1349v2004, a.CFDIN)
	})
	v.AirNote = "Air at the call: " + in.AirSource
	if in.Forecast != nil && !in.Forecast.Trusted {
		v.AirNote += " (NOT trusted)"
	}
}

// airNowHead heads the air-now column: when the reading was taken and how
// old it is, or the time now when nothing was read.
func airNowHead(c Card) string {
	nowHead := "now " + c.LatestReading.Time.Format("15:04")
	if c.Input.LatestReading != nil {
		nowHead = "read " + c.LatestReading.Time.Format("15:04") + ", " + minutes(c.ReadingAge) + " ago"
		if c.ReadingAge < time.Minute {
			nowHead = "read " + c.LatestReading.Time.Format("15:04") + ", just now"
		}
		if c.StaleReading != "" {
			nowHead += " (OLD)"
		}
	}
	return nowHead
}

// predictionTable fills the prediction, a row per timer with its trap
// speed, and the lines saying what it rests on. Nothing when there is no
// prediction.
func (v *view) predictionTable(c Card) {
	u := c.Input.Settings.Units
	p := c.Prediction
	if len(p.Timers) == 0 {
		return
	}
	v.Prediction = table{Title: "Prediction (95 % interval)", Header: []string{"Timer", "ET", "interval", "Trap", "interval"}, Marked: len(p.Timers) - 1}
	for _, t := range p.Timers {
		r := []string{TimerName(t.DistanceFt), fmt.Sprintf("%.3f", t.ET), fmt.Sprintf("%.3f–%.3f", t.Low, t.High), "", ""}
		for _, tr := range p.Traps {
			if tr.DistanceFt == t.DistanceFt {
				r[3] = weather.MPH(tr.MPH).Format(u.Speed, 2)
				lo, hi := weather.MPH(tr.Low).In(u.Speed), weather.MPH(tr.High).In(u.Speed)
				r[4] = fmt.Sprintf("%.2f–%.2f", lo, hi)
			}
		}
		v.Prediction.Rows = append(v.Prediction.Rows, r)
	}
	v.Basis = Explain(p, c.Fit, u)
	if l := RestsOnLine(p, c.Fit, u); l != "" {
		// One line, as the blend's note was: the card is at its page limit.
		v.Basis = append(v.Basis, "Leaned on "+l+".")
	}
}

// optionsTable fills the dial options, a row per dial with its marks
// (the one to post, the breakout rule's, the one that wins most), and the
// note on the other lane's figures. Nothing when there is no plan.
func (v *view) optionsTable(c Card) {
	in := c.Input
	step := in.Settings.DialStep
	if c.PlanErr != nil || len(c.Plan.Options) == 0 {
		return
	}
	v.Options = table{Title: "Dial options", Header: []string{"Dial", "Breakout", "Over dial (exp.)", ""}, Marked: -1}
	if len(c.Win) > 0 {
		v.Options.Header = []string{"Dial", "Breakout", "Over dial (exp.)", "To win", ""}
	}
	for i, o := range c.Plan.Options {
		row := []string{dialText(o.Dial, step), fmt.Sprintf("%.1f %%", 100*o.BreakoutChance), fmt.Sprintf("%.3f s", o.Giveaway)}
		if len(c.Win) > 0 {
			w, _ := winOf(c, o.Dial)
			row = append(row, fmt.Sprintf("%.1f %%", 100*w))
		}
		v.Options.Rows = append(v.Options.Rows, append(row, strings.Join(v.optionMarks(c, i, o), ", ")))
	}
	if len(c.Win) > 0 {
		v.OptionsNote = fmt.Sprintf("To win: against the other lane's %s dial, its car %+.3f s over its dial (± %.3f) and its driver's reaction %.3f ± %.3f s; %d races drawn per dial (good to ±0.5 points).",
			dialText(in.Opponent.Dial, step), in.Opponent.Margin, in.Opponent.MarginSD, in.Opponent.RT.Mean, in.Opponent.RT.SD, bracket.WinDraws)
		if in.Opponent.From != "" { // a named car: where its figures came from
			v.OptionsNote += " Its figures: " + in.Opponent.From + "."
		}
	}
}

// optionMarks is the marks of option i, o, and marks its row as the one
// to emphasize when it is the dial to post (or, without a final dial, the
// breakout rule's pick).
func (v *view) optionMarks(c Card, i int, o bracket.DialOption) []string {
	// The row to post is the final dial, after the rules; the
	// breakout rule's pick is labeled as what it is.
	var marks []string
	final := c.HasFinal && o.Dial.Equal(c.FinalDial)
	switch {
	case final && len(c.Failed) > 0:
		marks, v.Options.Marked = append(marks, "final (a check failed)"), i
	case final:
		marks, v.Options.Marked = append(marks, "post this"), i
	case o.Recommended:
		marks = append(marks, "before the rules")
		if !c.HasFinal {
			v.Options.Marked = i
		}
	}
	if len(c.Win) > 0 && o.Dial.Equal(c.BestForWin.Dial) {
		marks = append(marks, "wins most")
	}
	return marks
}

// rulesAndChecks fills the rules' table, a row per rule file with its
// adjustment or its first error, and the checklist with when each item
// was ticked.
func (v *view) rulesAndChecks(c Card) {
	in := c.Input
	v.Rules = table{Title: "Rules", Header: []string{"Rule", "Defines", "Dial", "Result"}, Marked: -1}
	for _, r := range c.Rules {
		adj, result := "", "ok"
		if r.HasAdjust {
			adj, result = SignedDialText(r.Adjust, in.Settings.DialStep), r.Reason
		}
		if len(r.Errors) > 0 {
			result = "FAILED: " + r.Errors[0].Error()
		}
		v.Rules.Rows = append(v.Rules.Rows, []string{strings.TrimPrefix(r.File, "rules/"), strings.Join(r.Defines, ", "), adj, result})
	}
	for _, ch := range c.Checks {
		row := checkRow{Status: ch.Status, Label: ch.Label, Note: ch.Note, File: ch.File}
		if at, ok := in.Ticked[ch.Label]; ok {
			row.Ticked = at.Format("15:04")
		}
		v.Checks = append(v.Checks, row)
	}
}

// recordTable fills today's record, predicted against actual, with the
// day's mean miss. Nothing before today's first pass.
func (v *view) recordTable(c Card) {
	if len(c.Record) == 0 {
		return
	}
	v.Record = table{Title: "Today so far: predicted against actual", Header: []string{"Round", "Time", "Lane", "Predicted", "Ran", "Off by", "Notes"}, Marked: -1}
	for _, r := range c.Record {
		pred, off := "–", ""
		if !math.IsNaN(r.Predicted) {
			pred, off = fmt.Sprintf("%.3f", r.Predicted), fmt.Sprintf("%+.3f", r.Error)
		}
		v.Record.Rows = append(v.Record.Rows, []string{r.Pass.Session.String(), r.Pass.Time.Format("15:04"), string(r.Pass.Lane), pred,
			fmt.Sprintf("%.3f", r.Actual), off, passNotes(r.Pass.Notes)})
	}
	if !math.IsNaN(c.RecordMAE) {
		v.RecordNote = fmt.Sprintf("Mean miss today: %.3f s (each predicted from the passes before it).", c.RecordMAE)
	}
	v.RecordHint = compareHint
}

// compareHint points from today's record to the segment comparison.
const compareHint = "See 'pitcard log compare' for where each pass gained or lost time."

// GuideFrom says what a no-dial guide was made from: "physics and
// car.yaml", "2 passes carried to this air" (too few to fit anything: they
// are carried by the air) or "the model on 5 passes". The card's guide and
// dial's say it alike.
func GuideFrom(p engine.Prediction) string {
	switch n := p.Passes; {
	case n > 0 && p.Blend.ColdStart:
		return fmt.Sprintf("%s carried to this air", text.Plural(n, "pass"))
	case n > 0:
		return fmt.Sprintf("the model on %s", text.Plural(n, "pass"))
	}
	return "physics and car.yaml"
}

// Explain says, in lines, why a prediction is what it is: physics alone or
// not, what each change of conditions is worth to the car today, the passes
// it leaned on most, those it left out and why, and its notes but those
// RestsOn says (the blend, the change, today outside the logbook).
func Explain(p engine.Prediction, f engine.Fit, u weather.Units) []string {
	var out []string
	if p.PhysicsOnly {
		out = append(out, "Physics from car.yaml alone: no logbook passes with their weather to calibrate to, so the interval is wide.")
	}
	out = append(out, sensitivityWords(p.Sensitivity, u))
	switch {
	case len(p.Leaned) > 0 && p.Blend.ColdStart:
		// Nothing is fitted on so few: the passes are carried by the air
		// alone, so neither a calibration nor the model's weights apply.
		var parts []string
		for i, l := range p.Leaned {
			if i == 2 {
				break
			}
			parts = append(parts, fmt.Sprintf("%s %s (ran %.3f)", l.Pass.Time.Format("01-02"), l.Pass.Session.Long(), l.ET))
		}
		out = append(out, fmt.Sprintf("Carried by the air from %s.", strings.Join(parts, "; ")))
	case len(p.Leaned) > 0:
		var parts []string
		for i, l := range p.Leaned {
			if i == 2 {
				break
			}
			parts = append(parts, fmt.Sprintf("%s %s (ran %.3f; %.3f in this round's conditions; %.0f %% of the weight)",
				l.Pass.Time.Format("01-02"), l.Pass.Session.Long(), l.ET, l.Carried, 100*l.Share))
		}
		out = append(out, fmt.Sprintf("Calibrated to %s. It leans most on: %s.", text.Plural(len(f.Samples), "pass"), strings.Join(parts, "; ")))
	}
	for i, o := range p.Outliers {
		if i == 1 {
			break
		}
		more := ""
		if len(p.Outliers) > 1 {
			more = fmt.Sprintf(" (and %d more left out)", len(p.Outliers)-1)
		}
		out = append(out, fmt.Sprintf("Left out %s %s: %s%s.", o.Pass.Time.Format("01-02"), o.Pass.Session.Long(), passNotes(o.Reason), more))
	}
	for _, n := range p.Notes {
		if k := kindOf(p, f, n); k == noteCalibration || said(p, k) {
			continue // said above, or by RestsOn
		}
		out = append(out, text.UpperFirst(n)+".")
	}
	return out
}

// sensitivityWords says what each change of conditions, alone, is worth to
// the car today, in the crew's units and in words (quicker or slower).
func sensitivityWords(s engine.Sensitivity, u weather.Units) string {
	effect := func(v float64) string {
		switch {
		case math.Abs(v) < 0.0005:
			return "no change"
		case v < 0:
			return fmt.Sprintf("%.3f s quicker", -v)
		}
		return fmt.Sprintf("%.3f s slower", v)
	}
	// Per the metric steps, scaled from the imperial ones (the model is
	// smooth over steps this small): 5 °C = 9 °F, 3 hPa = 0.0886 inHg,
	// 15 km/h = 9.32 mph, 300 m = 984 ft.
	warm, baro, hot, wind, da := "10 °F warmer air", "0.10 inHg lower barometer", "a 10 °F hotter track", "10 mph more headwind", "1000 ft of density altitude"
	kT, kP, kW, kDA := 1.0, 1.0, 1.0, 1.0
	if u.Temp == weather.DegC {
		warm, hot, kT = "5 °C warmer air", "a 5 °C hotter track", 0.9
	}
	if u.Pressure == weather.UnitHPa {
		baro, kP = "3 hPa lower barometer", 3*100/weather.PaPerInHg/0.1
	}
	if u.Speed == weather.UnitKMH {
		wind, kW = "15 km/h more headwind", 15/1.609344/10
	}
	if u.Length == weather.UnitM {
		da, kDA = "300 m of density altitude", 300/weather.MetrePerFt/1000
	}
	return fmt.Sprintf("This car today, each change alone: %s %s; %s %s; 10 %% more humidity %s; %s %s; %s %s. "+
		"(%s from the barometer alone: %s.)",
		warm, effect(kT*s.Per10FAir), baro, effect(kP*s.PerTenthInHg), effect(s.Per10PctRH), hot, effect(kT*s.Per10FTrack),
		wind, effect(kW*s.Per10Headwind), text.UpperFirst(da), effect(kDA*s.PerKDA))
}

// HeadStartWords says who leaves first, and by how much.
func HeadStartWords(us, opp decimal.Decimal) string {
	h := bracket.HeadStart(us, opp)
	switch {
	case h.IsPositive():
		return fmt.Sprintf("you leave %s s after the other lane (its dial is slower)", DialText(h, hundredth))
	case h.IsNegative():
		return fmt.Sprintf("you leave %s s before the other lane (your dial is slower)", DialText(h.Neg(), hundredth))
	}
	return "you leave together: the same dial"
}

func postedWords(best bool) string {
	if best {
		return "; posted: the dial that wins most (setting post_dial)"
	}
	return "; posted: your breakout rule's (setting post_dial)"
}

// TimerName names a timer: "60 ft", "1/8 mile", "1/4 mile".
// crossLimit is the cross-check's allowance in force.
func crossLimit(s Settings) float64 {
	if s.CrossCheckMax > 0 {
		return s.CrossCheckMax
	}
	return engine.DefaultCrossCheckMax
}

// TimerName names a timer by its distance in feet ("60 ft", "1/8 mile").
func TimerName(ft float64) string {
	switch ft {
	case 660:
		return "1/8 mile"
	case 1320:
		return "1/4 mile"
	}
	return fmt.Sprintf("%.0f ft", ft)
}

func windWords(r weather.Reading, heading float64, u weather.Units) string {
	if r.WindUnknown {
		return "not read"
	}
	if r.Wind.MPH() < 0.5 {
		return "calm"
	}
	if r.WindDirUnknown {
		return r.Wind.Format(u.Speed, 0) + ", direction not read"
	}
	return fmt.Sprintf("%s from %03.0f° (%s)", r.Wind.Format(u.Speed, 0), r.WindFrom, HeadwindWords(r, heading, u))
}

// HeadwindWords is the wind along the strip, one way on every screen:
// "0.6 mph tailwind", "2.1 km/h headwind" (a tenth: a light wind's
// component is often under one).
func HeadwindWords(r weather.Reading, heading float64, u weather.Units) string {
	hw := r.HeadwindComponent(heading)
	if hw < 0 {
		return weather.Speed(-hw).Format(u.Speed, 1) + " tailwind"
	}
	return weather.Speed(hw).Format(u.Speed, 1) + " headwind"
}

// dialText is DialText, as the card's layout calls it.
func dialText(d, step decimal.Decimal) string { return DialText(d, step) }

// statusWord is how a check's status reads on paper.
func statusWord(s string) string {
	switch s {
	case scripts.Pass:
		return "PASS"
	case scripts.Warn:
		return "WARN"
	case scripts.Fail:
		return "FAIL"
	}
	return "[ ]"
}
