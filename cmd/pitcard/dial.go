package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	words "pitcard/internal/text"
	"strconv"
	"strings"

	"github.com/jedib0t/go-pretty/v6/table"
	"github.com/jedib0t/go-pretty/v6/text"
	"github.com/shopspring/decimal"
	"github.com/spf13/cobra"

	"pitcard/bracket"
	"pitcard/engine"
	"pitcard/entry"
	"pitcard/event"
	"pitcard/logbook"
	"pitcard/prep"
	"pitcard/weather"
)

type dialOptions struct {
	g           *globalOptions
	s           *IOStreams
	cond        conditionFlags
	Prep        string
	ET, SD      string
	CleanPasses int
	Rows        int
	Format      string
	OppDial     string
	// Round and Lane pick the round whose card the dial is posted from
	// (default: the schedule's next, as the card's).
	Round, Lane string
	// Change is a change made to the car since its last pass and not yet
	// run: the interval carries it, as the card's --change.
	Change string
	// Set is the planned setup, name=value (as the card's --set).
	Set []string
	opp opponentFlags
}

func newDialCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &dialOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "dial",
		Short: "Candidate dial-ins with their breakout chance, and the one to post",
		Long: `Lists dial-ins on the posting step around the predicted ET with, for each, the
chance of breaking out and the time expected to be given away, and recommends
the slowest dial whose breakout chance is within the risk the crew accepts
(setting breakout_risk, default 0.10 = 10 %).

The prediction is the pass model's (see 'pitcard predict') in the air given by
the reading flags, --latest or --at, or by default the weather log's last
reading; --et with its spread --sd (one standard deviation) overrides it.
With no weather at all, it falls back to the mean of the car's recent clean
passes at the distance raced, not corrected for the air, and says so.`,
		Example: "  pitcard dial --at 21:40\n  pitcard dial --et 11.52 --sd 0.025 --breakout-risk 0.05\n  pitcard dial --demo --format json",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, _ []string) error { return dialRun(cmd, o) },
	}
	o.cond.bind(cmd)
	cmd.Flags().StringVar(&o.Prep, "prep", "", "track prep today: none, light, full or 0..1 (default: track.yaml's)")
	cmd.Flags().StringVar(&o.ET, "et", "", "predicted ET, s")
	cmd.Flags().StringVar(&o.SD, "sd", "", "its spread, one standard deviation, s")
	cmd.Flags().IntVar(&o.CleanPasses, "clean-passes", 10, "the latest clean passes the estimate rests on when there is no weather (or --et)")
	cmd.Flags().IntVar(&o.CleanPasses, "last", 10, "")
	deprecate(cmd.Flags(), "last", "use --clean-passes (on log list and log stats --last limits the passes shown)")
	cmd.Flags().IntVar(&o.Rows, "rows", 5, "candidates either side of the recommendation")
	cmd.Flags().String("breakout-risk", "", "largest breakout chance to accept, a fraction (setting breakout_risk)")
	cmd.Flags().String("dial-step", "", "dial-in step, s (setting dial_step)")
	cmd.Flags().StringVar(&o.Format, "format", "text", "text, markdown, json or csv")
	cmd.Flags().StringVar(&o.OppDial, "opponent-dial", "", "the other lane's dial-in, s: adds each dial's chance to win")
	cmd.Flags().StringVar(&o.Round, "round", "", roundFlagHelp+" (default: the schedule's next, as the card's)")
	cmd.Flags().StringVar(&o.Lane, "lane", "", "left or right (default: the schedule's)")
	cmd.Flags().StringVar(&o.Change, "change", "", "what was changed on the car since its last pass, in your words (widens the interval until a pass shows what it is worth)")
	cmd.Flags().StringArrayVar(&o.Set, "set", nil, "the planned setup, name=value, an item of car.yaml's setup: (as the card's --set: the dial is the card's with it)")
	o.opp.bind(cmd)
	withOut(cmd, s)
	return cmd
}

type dialOptionJSON struct {
	Dial           json.Number `json:"dial"`
	BreakoutChance float64     `json:"breakout_chance"`
	GiveawayS      float64     `json:"expected_giveaway_s"`
	Recommended    bool        `json:"recommended"` // the breakout rule's pick, before the crew's rules
	// Post marks the dial to post: the card's final, after the rules (or
	// the breakout rule's where no round was gathered).
	Post      bool     `json:"post"`
	WinChance *float64 `json:"win_chance,omitempty"`
}

type bestForWinJSON struct {
	Dial      json.Number `json:"dial"`
	WinChance float64     `json:"win_chance"`
}

type dialJSON struct {
	// Post is the dial to post: the card's final dial after the crew's
	// rules, "" when there is no round to gather (the recommendation is
	// then the breakout rule's alone). PostOK is false when a check failed.
	Post         json.Number `json:"post_dial,omitempty"`
	PostOK       bool        `json:"post"`
	ChecksFailed []string    `json:"checks_failed"`
	PredictedET  float64     `json:"predicted_et"`
	SD           float64     `json:"sd"`
	Basis        string      `json:"basis"`
	// Blend is what the estimate rests on (prep.BlendJSON), null when it
	// rests on no blend (--et and --sd, or passes without weather).
	Blend       map[string]any   `json:"blend"`
	Step        json.Number      `json:"step"`
	Risk        float64          `json:"breakout_risk"`
	Recommended json.Number      `json:"recommended_dial"`
	Options     []dialOptionJSON `json:"options"`
	BestForWin  *bestForWinJSON  `json:"best_for_win,omitempty"`
	HeadStartS  *float64         `json:"head_start_s,omitempty"`
}

// dialBasis is what the dial table is computed from: the estimate, what it
// rests on, the dial to post with its checks, and the logbook rows left out.
type dialBasis struct {
	est bracket.Estimate
	// post is the dial to post (the card's final, after the crew's rules)
	// and the checks it must pass; without a round to gather, the breakout
	// rule's pick labeled as before the rules, and pitcard's own safety
	// checks on the estimate.
	post dialPost
	// rests is what the estimate rests on, in one line and as JSON.
	rests restsOn
	// leftOut: logbook rows that could not be read, reported after the table.
	leftOut error
}

// dialAgainst is the table against the other lane: each option's chance
// to win, the other lane as raced, and the trade-off of the dial that wins
// most in words ("" when it keeps within the crew's risk).
type dialAgainst struct {
	wins  []bracket.WinOption
	opp   *bracket.Opponent
	trade string
}

// dialRun is the dial command: the estimate, the plan of dial-ins around
// it, the chances against the other lane, printed in the format asked.
func dialRun(cmd *cobra.Command, o *dialOptions) error {
	if err := checkFormat(o.Format, "text", "markdown", "json", "csv"); err != nil {
		return err
	}
	if o.Rows < 1 || o.Rows > 50 {
		return &weather.InputError{Field: "--rows", Value: fmt.Sprint(o.Rows), Reason: "is outside 1..50"}
	}
	change, err := logbook.ParseChange("--change", o.Change)
	if err != nil {
		return err
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	b, done, err := o.basis(e, change)
	if err != nil || done {
		return err
	}
	plan, err := bracket.PlanDial(b.est, e.Settings.DialStep, e.Settings.BreakoutRisk, o.Rows)
	if err != nil {
		return err
	}
	vs, err := o.against(e, b, plan)
	if err != nil {
		return err
	}
	j := dialJSONOf(b, plan, vs)
	switch o.Format {
	case "json":
		if err := writeJSON(o.s.Out, j); err != nil {
			return err
		}
	case "csv":
		if err := writeDialCSV(o.s.Out, j); err != nil {
			return err
		}
	default:
		o.writeText(b, plan, vs, j)
	}
	return errors.Join(failedChecks(b.post.failed), b.leftOut)
}

// basis is the estimate the dial rests on: --et and --sd as given; else
// the round's card (the model in the call's air, the crew's rules and
// checks), or the model alone with --latest; else, with no weather at all,
// the car's recent clean passes. done: too few passes for a dial table, and
// the guide was printed instead.
func (o *dialOptions) basis(e *eventFolder, change string) (b dialBasis, done bool, err error) {
	askedLatest := o.cond.Latest // useModel turns it on for a weather log: the card is still gathered
	switch {
	case o.ET != "" || o.SD != "":
		b.est, err = o.givenEstimate()
		if err != nil {
			return b, false, err
		}
	case o.useModel(e):
		var ok bool
		if b, ok, err = o.modelBasis(e, change, askedLatest); err != nil || !ok {
			return b, true, err
		}
	default:
		if len(o.Set) > 0 {
			return b, false, userErrf("--set moves the model's prediction, which needs the air: log a reading ('pitcard weather add') or give the reading flags")
		}
		car, err := e.Car()
		if err != nil {
			return b, false, err
		}
		passes, lo := e.Logbook()
		if !event.OnlyLeftOut(lo) {
			return b, false, lo
		}
		b.leftOut = lo
		if b.est, _, err = bracket.RecentEstimate(passes, car.DistanceFt, o.CleanPasses, e.Settings.AbortWords); err != nil {
			return b, false, userErr(err)
		}
	}
	if b.post.failed == nil && !b.post.hasFinal {
		// The estimate's quick end against the car's limits (no trap speed
		// from an ET alone: the checks say so).
		car, err := e.Car()
		if err != nil {
			return b, false, err
		}
		b.post.failed = prep.Failed(prep.SafetyChecks(prep.SafetyInput{Limits: car.Limits(), DistanceFt: car.DistanceFt,
			QuickET: b.est.ET - engine.IntervalZ*b.est.SD, Day: o.s.Now(), Units: e.Settings.Units}))
	}
	return b, false, nil
}

// givenEstimate is --et with its spread --sd.
func (o *dialOptions) givenEstimate() (bracket.Estimate, error) {
	if o.ET == "" || o.SD == "" {
		return bracket.Estimate{}, userErrf("give --et and --sd together (the predicted ET and its spread)")
	}
	if len(o.Set) > 0 {
		return bracket.Estimate{}, userErrf("--set moves the model's prediction and --et replaces it: give one of them")
	}
	et, err := strconv.ParseFloat(o.ET, 64)
	if err != nil {
		return bracket.Estimate{}, &weather.InputError{Field: "--et", Value: o.ET, Reason: "is not a time in seconds"}
	}
	sd, err := strconv.ParseFloat(o.SD, 64)
	if err != nil || !(sd > 0 && sd < 2) {
		return bracket.Estimate{}, &weather.InputError{Field: "--sd", Value: o.SD, Reason: "is not a spread in seconds (0..2, e.g. 0.025)"}
	}
	return bracket.Estimate{ET: et, SD: sd, Basis: "the --et and --sd given"}, nil
}

// useModel: the air is known (flags, --latest, --at, the demo, or a
// weather log with a reading), so the model predicts. A weather log found
// here turns --latest on.
func (o *dialOptions) useModel(e *eventFolder) bool {
	if o.cond.Given() || o.cond.Latest || o.cond.At != "" || e.Demo {
		return true
	}
	if elev, _, err := entry.SiteElevation(e, o.cond.ReadingFields); err == nil {
		if log, _, err := e.ReadableWeather(elev); err == nil && len(log) > 0 {
			o.cond.Latest = true
			return true
		}
	}
	return false
}

// modelBasis is the model's estimate, the round's card's where one is
// gathered (the same prediction, rules and checks as 'pitcard card', so
// both post one number; not with --latest asked, askedLatest). ok is false
// when there are too few passes for a dial table: the guide was printed
// instead.
func (o *dialOptions) modelBasis(e *eventFolder, change string, askedLatest bool) (b dialBasis, ok bool, err error) {
	n, err := forecastNext(e, o.cond, o.Prep, "", change, o.s.Now())
	if err != nil {
		return b, false, err
	}
	for _, w := range n.Cond.Warnings {
		o.s.warn(w)
	}
	b.est = n.Pred.Estimate()
	b.est.Basis += ", in " + n.Cond.Source
	b.leftOut = n.LeftOut
	b.rests = restsOnOf(n.Pred, n.Fit, n.Units)
	if ready, why := n.Pred.DialReady(); !ready {
		// No dial table from too few passes: the estimate is a guide, said
		// as the card's guide says what it is from.
		b.est.Basis = prep.GuideFrom(n.Pred) + ", in " + n.Cond.Source
		return b, false, noDial(o, b.est, why, b.rests, b.leftOut)
	}
	b.post = dialPost{failed: prep.Failed(prep.SafetyChecks(prep.SafetyFor(n.Car, n.Pred, n.When, e.Settings.Units)))}
	c, gathered, err := o.card(e, askedLatest, change)
	if err != nil {
		return b, false, err
	}
	if gathered {
		b.est = c.Plan.Estimate
		b.est.Basis += ", in " + c.Input.AirSource + " (the card's)"
		b.rests = restsOnOf(c.Prediction, c.Fit, c.Input.Settings.Units)
		b.post = dialPost{final: c.FinalDial, hasFinal: c.HasFinal, failed: c.Failed, adjustments: c.Adjustments, round: c.Title,
			opponent: c.Input.Opponent, usRT: c.Input.UsRT, bestForWin: c.Input.PostBestForWin && len(c.Win) > 0}
	}
	return b, true, nil
}

// against is every option's chance to win against the other lane: its
// dial given here (--opponent-dial, with --opponent's history), or the one
// the card races against (rounds.csv). None without either.
func (o *dialOptions) against(e *eventFolder, b dialBasis, plan bracket.DialPlan) (dialAgainst, error) {
	var vs dialAgainst
	var oppDial decimal.NullDecimal
	if o.OppDial != "" {
		d, err := logbook.ParseSeconds("--opponent-dial", o.OppDial)
		if err != nil {
			return vs, err
		}
		if err := event.RangeErr("--opponent-dial", d, logbook.DialRange); err != nil {
			return vs, err
		}
		oppDial = decimal.NewNullDecimal(d)
	}
	if !oppDial.Valid && b.post.opponent == nil {
		return vs, nil
	}
	var usRT bracket.RTModel
	if oppDial.Valid {
		passes, _ := e.RecentLogbook()
		book, _ := e.OpponentBook() // a bad book: the settings' figures (the card names its rows)
		var err error
		if vs.opp, usRT, err = o.opp.Build(e.Settings, oppDial, passes, book); err != nil {
			return vs, err
		}
	} else { // the other lane's dial the card races against (rounds.csv)
		vs.opp, usRT = b.post.opponent, b.post.usRT
	}
	var ds []decimal.Decimal
	for _, op := range plan.Options {
		ds = append(ds, op.Dial)
	}
	vs.wins = bracket.WinChances(bracket.WinInput{Us: b.est, UsRT: usRT, Opp: *vs.opp, Seed: 1}, ds)
	vs.trade = prep.WinTradeWords(b.est, plan.Risk, plan.Recommended, plan.Step, vs.wins)
	return vs, nil
}

// dialJSONOf is the dial table as the JSON answer gives it (and as the
// text and CSV print it).
func dialJSONOf(b dialBasis, plan bracket.DialPlan, vs dialAgainst) dialJSON {
	est, post := b.est, b.post
	j := dialJSON{PredictedET: round(est.ET, 4), SD: round(est.SD, 4), Basis: est.Basis, Step: json.Number(plan.Step.String()),
		Risk: plan.Risk, Recommended: json.Number(prep.DialText(plan.Recommended, plan.Step)), ChecksFailed: append([]string{}, post.failed...),
		Blend: b.rests.json}
	if post.hasFinal {
		j.Post = json.Number(prep.DialText(post.final, plan.Step))
	}
	j.PostOK = len(post.failed) == 0
	if vs.opp != nil {
		best := bracket.BestForWin(vs.wins)
		j.BestForWin = &bestForWinJSON{Dial: json.Number(prep.DialText(best.Dial, plan.Step)), WinChance: round(best.Win, 4)}
		h := bracket.HeadStart(plan.Recommended, vs.opp.Dial).InexactFloat64()
		j.HeadStartS = &h
	}
	for i, op := range plan.Options {
		oj := dialOptionJSON{Dial: json.Number(prep.DialText(op.Dial, plan.Step)), BreakoutChance: round(op.BreakoutChance, 4),
			GiveawayS: round(op.Giveaway, 4), Recommended: op.Recommended}
		oj.Post = post.hasFinal && oj.Dial == j.Post || !post.hasFinal && op.Recommended
		if vs.wins != nil {
			w := round(vs.wins[i].Win, 4)
			oj.WinChance = &w
		}
		j.Options = append(j.Options, oj)
	}
	return j
}

// writeDialCSV is the dial table as CSV, a row per option.
func writeDialCSV(w io.Writer, j dialJSON) error {
	rows := [][]string{{"dial", "breakout_chance", "expected_giveaway_s", "win_chance", "recommended", "post", "checks_failed", "predicted_et", "sd"}}
	for _, op := range j.Options {
		win := ""
		if op.WinChance != nil {
			win = fmt.Sprint(*op.WinChance)
		}
		rows = append(rows, []string{string(op.Dial), fmt.Sprint(op.BreakoutChance), fmt.Sprint(op.GiveawayS), win, fmt.Sprint(op.Recommended),
			fmt.Sprint(op.Post), strings.Join(j.ChecksFailed, "; "), fmt.Sprint(j.PredictedET), fmt.Sprint(j.SD)})
	}
	return writeCSV(w, rows)
}

// writeText prints the estimate, the table of options with the dial to
// post marked, the post line and the other lane's chances in words.
func (o *dialOptions) writeText(b dialBasis, plan bracket.DialPlan, vs dialAgainst, j dialJSON) {
	est, post := b.est, b.post
	fmt.Fprintln(o.s.Out, words.Wrap(fmt.Sprintf("Predicted ET %.3f s ± %.3f (one standard deviation): %s.", est.ET, est.SD, est.Basis), o.s.width(), "  "))
	b.rests.write(o.s)
	t := newTable(o.s, fmt.Sprintf("Dial-ins (step %s s, risk ≤ %.0f %%)", plan.Step, plan.Risk*100))
	header := table.Row{"Dial", "Breakout chance", "Over dial (exp.)", ""}
	if vs.wins != nil {
		header = table.Row{"Dial", "Breakout chance", "Over dial (exp.)", "To win", ""}
	}
	t.AppendHeader(header)
	for _, op := range j.Options {
		mark := ""
		dial := string(op.Dial)
		switch {
		case post.hasFinal && op.Dial == j.Post, !post.hasFinal && op.Recommended:
			mark = post.mark()
			if o.s.Terminal && o.Format == "text" { // no color codes in a document
				// A space before only: a space after would shift the dial left of the others in its right-aligned column.
				dial = text.Colors{text.Bold, text.FgHiWhite, text.BgBlue}.Sprint(" " + dial)
			}
		case op.Recommended:
			mark = "← before the rules"
		}
		if j.BestForWin != nil && op.Dial == j.BestForWin.Dial {
			mark = strings.TrimPrefix(mark+", wins most", ", ")
		}
		row := table.Row{dial, fmt.Sprintf("%.1f %%", op.BreakoutChance*100), fmt.Sprintf("%.3f s", op.GiveawayS)}
		if op.WinChance != nil {
			row = append(row, fmt.Sprintf("%.1f %%", *op.WinChance*100))
		}
		t.AppendRow(append(row, mark))
	}
	render(o.s, t, o.Format, alignRight(1, len(header)-1)...)
	post.write(o.s, j, plan)
	if vs.opp == nil {
		return
	}
	fmt.Fprintln(o.s.Out, words.Wrap(fmt.Sprintf("Against the other lane's %s: %s; the dial that wins most is %s (%.1f %% to win). Chances from %d races drawn per dial, good to ±0.5 points.",
		prep.DialText(vs.opp.Dial, plan.Step), prep.HeadStartWords(plan.Recommended, vs.opp.Dial), j.BestForWin.Dial, 100*j.BestForWin.WinChance, bracket.WinDraws), o.s.width(), "  "))
	if vs.opp.From != "" { // a named car (--opponent): where its figures came from
		fmt.Fprintln(o.s.Out, words.Wrap("The other lane's figures: "+vs.opp.From+".", o.s.width(), "  "))
	}
	if vs.trade != "" {
		posted := "Posted stays your rule's unless post_dial: best-for-win."
		if post.bestForWin {
			posted = "Posted is the dial that wins most (post_dial: best-for-win)."
		}
		fmt.Fprintln(o.s.Out, words.Wrap("The choice: "+vs.trade+". "+posted, o.s.width(), "  "))
	}
}

// dialPost is the dial to post and the checks it must pass.
type dialPost struct {
	final       decimal.Decimal
	hasFinal    bool // final is the card's, after the crew's rules
	failed      []string
	adjustments []prep.RuleLine
	round       string // the card's title: "Round 2, right lane"
	// opponent is the other lane the card races against (noted in
	// rounds.csv, or --opponent-dial), with our reaction times; bestForWin:
	// the card posts the dial that wins most (post_dial: best-for-win).
	opponent   *bracket.Opponent
	usRT       bracket.RTModel
	bestForWin bool
}

// mark is the table's word beside the dial to post.
func (p dialPost) mark() string {
	if len(p.failed) > 0 {
		return "← STOP: a check failed"
	}
	if !p.hasFinal {
		return "← post this (before the rules)"
	}
	return "← post this"
}

// write prints the post line: the dial to post, how the rules moved it, and
// any failed check in the same line's type.
func (p dialPost) write(s *IOStreams, j dialJSON, plan bracket.DialPlan) {
	rule := fmt.Sprintf("the slowest dial with at most a %.0f %% chance of breaking out", plan.Risk*100)
	switch {
	case p.hasFinal:
		var moves []string
		for _, a := range p.adjustments {
			moves = append(moves, fmt.Sprintf("%s s %s (%s)", a.Adjust.StringFixed(2), a.Reason, a.File))
		}
		how := "the crew's rules change nothing"
		if len(moves) > 0 {
			how = "then the crew's rules: " + strings.Join(moves, "; ")
		}
		lead := "Post this dial"
		if len(p.failed) > 0 {
			lead = "The dial once the failed checks are cleared"
		}
		if p.bestForWin {
			rule = "but the dial that wins most against the other lane is posted (post_dial: best-for-win)"
		}
		fmt.Fprintln(s.Out, words.Wrap(fmt.Sprintf("%s for %s: %s (the breakout rule's %s, %s; %s), as the card gives it.", lead, strings.ToLower(p.round[:1])+p.round[1:], j.Post, j.Recommended, rule, how), s.width(), "  "))
	default:
		fmt.Fprintln(s.Out, words.Wrap(fmt.Sprintf("Before the rules: %s (%s). The crew's rules run on the card: 'pitcard card' posts the final dial.", j.Recommended, rule), s.width(), "  "))
	}
	if len(p.failed) > 0 {
		fmt.Fprintln(s.Out, words.Wrap("STOP: "+checksFailed{p.failed}.Error()+".", s.width(), "  "))
	}
}

// card gathers the round's card as 'pitcard card' would, from the dial's
// flags: false when there is no round to gather (no schedule and no
// --at), or with --latest (the air of the last reading, not the call's).
// A round asked for (--round, --lane) that cannot be gathered is an error,
// not a quiet fall back to another number.
func (o *dialOptions) card(e *eventFolder, latest bool, change string) (prep.Card, bool, error) {
	asked := o.Round != "" || o.Lane != "" || len(o.Set) > 0
	if latest {
		if asked {
			return prep.Card{}, false, userErrf("--round, --lane and --set post the card's dial, in the air forecast for its call: drop --latest")
		}
		return prep.Card{}, false, nil
	}
	in, _, err := entry.GatherRound(e, entry.RoundRequest{Reading: o.cond.ReadingFields, At: o.cond.At, Prep: o.Prep, Round: o.Round, Lane: o.Lane,
		OpponentDial: o.OppDial, Opponent: o.opp.OpponentFields, Change: change, Set: o.Set}, e.DemoClock(o.s.Now()))
	if err != nil && !event.Usable(err) || err != nil && asked {
		if asked {
			return prep.Card{}, false, err
		}
		return prep.Card{}, false, nil
	}
	c := prep.Gather(in)
	_ = e.KeepHeldOut() // a cache that cannot be written costs only time
	if !c.HasFinal || c.PlanErr != nil {
		return prep.Card{}, false, nil
	}
	return c, true, nil
}

// noDial prints the estimate as a guide when there are too few passes to
// post a dial from (engine.MinPassesForDial).
func noDial(o *dialOptions, est bracket.Estimate, why string, rests restsOn, leftOut error) error {
	if o.Format == "csv" {
		return errors.Join(writeCSV(o.s.Out, [][]string{{"predicted_et", "sd", "no_dial"}, {fmt.Sprint(round(est.ET, 4)), fmt.Sprint(round(est.SD, 4)), why}}), leftOut)
	}
	if o.Format == "json" {
		if err := writeJSON(o.s.Out, map[string]any{"predicted_et": round(est.ET, 4), "sd": round(est.SD, 4), "basis": est.Basis,
			"recommended": nil, "no_dial": why, "blend": rests.json}); err != nil {
			return err
		}
		return leftOut
	}
	w := o.s.width()
	fmt.Fprintln(o.s.Out, words.Wrap(fmt.Sprintf("No dial yet: %s.", why), w, "  "))
	fmt.Fprintln(o.s.Out, words.Wrap(fmt.Sprintf("Guide from %s: %.2f s ± %.2f (one standard deviation).", est.Basis, est.ET, est.SD), w, "  "))
	rests.write(o.s)
	fmt.Fprintln(o.s.Out, "For a table anyway, give your own estimate: --et and --sd.")
	return leftOut
}

// restsOn is what dial's estimate rests on: the card's one line and the
// JSON object (prep.RestsOnLine, prep.BlendJSON); empty when it rests on
// no blend.
type restsOn struct {
	line string
	json map[string]any
}

func restsOnOf(p engine.Prediction, f engine.Fit, u weather.Units) restsOn {
	return restsOn{line: prep.RestsOnLine(p, f, u), json: prep.BlendJSON(p, f)}
}

// write prints the line, if there is one.
func (r restsOn) write(s *IOStreams) {
	if r.line != "" {
		fmt.Fprintln(s.Out, words.Wrap("Rests on "+r.line+".", s.width(), "  "))
	}
}
