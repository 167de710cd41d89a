package main

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"github.com/jedib0t/go-pretty/v6/table"
	"github.com/jedib0t/go-pretty/v6/text"
	"github.com/shopspring/decimal"
	"github.com/spf13/cobra"

	"pitcard/engine"
	"pitcard/event"
	"pitcard/prep"
	"pitcard/weather"
)

type dialOptions struct {
	g       *globalOptions
	s       *IOStreams
	cond    conditionFlags
	Prep    string
	ET, SD  string
	Last    int
	Rows    int
	Format  string
	OppDial string
	opp     opponentFlags
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
	cmd.Flags().IntVar(&o.Last, "last", 10, "clean passes to use from the logbook")
	cmd.Flags().IntVar(&o.Rows, "rows", 5, "candidates either side of the recommendation")
	cmd.Flags().String("breakout-risk", "", "largest breakout chance to accept, a fraction (setting breakout_risk)")
	cmd.Flags().String("dial-step", "", "dial-in step, s (setting dial_step)")
	cmd.Flags().StringVar(&o.Format, "format", "text", "text, markdown, json or csv")
	cmd.Flags().StringVar(&o.OppDial, "opponent-dial", "", "the other lane's dial-in, s: adds each dial's chance to win")
	o.opp.bind(cmd)
	withOut(cmd, s)
	return cmd
}

type dialOptionJSON struct {
	Dial           string   `json:"dial"`
	BreakoutChance float64  `json:"breakout_chance"`
	GiveawayS      float64  `json:"expected_giveaway_s"`
	Recommended    bool     `json:"recommended"`
	WinChance      *float64 `json:"win_chance,omitempty"`
}

type bestForWinJSON struct {
	Dial      string  `json:"dial"`
	WinChance float64 `json:"win_chance"`
}

type dialJSON struct {
	PredictedET float64          `json:"predicted_et"`
	SD          float64          `json:"sd"`
	Basis       string           `json:"basis"`
	Step        string           `json:"step"`
	Risk        float64          `json:"breakout_risk"`
	Recommended string           `json:"recommended_dial"`
	Options     []dialOptionJSON `json:"options"`
	BestForWin  *bestForWinJSON  `json:"best_for_win,omitempty"`
	HeadStartS  *float64         `json:"head_start_s,omitempty"`
}

func dialRun(cmd *cobra.Command, o *dialOptions) error {
	if err := checkFormat(o.Format, "text", "markdown", "json", "csv"); err != nil {
		return err
	}
	if o.Rows < 1 || o.Rows > 50 {
		return &weather.InputError{Field: "--rows", Value: fmt.Sprint(o.Rows), Reason: "is outside 1..50"}
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	var est engine.Estimate
	var leftOut error // logbook rows that could not be read: reported after the table
	switch {
	case o.ET != "" || o.SD != "":
		if o.ET == "" || o.SD == "" {
			return userErrf("give --et and --sd together (the predicted ET and its spread)")
		}
		et, err := strconv.ParseFloat(o.ET, 64)
		if err != nil {
			return &weather.InputError{Field: "--et", Value: o.ET, Reason: "is not a time in seconds"}
		}
		sd, err := strconv.ParseFloat(o.SD, 64)
		if err != nil || !(sd > 0 && sd < 2) {
			return &weather.InputError{Field: "--sd", Value: o.SD, Reason: "is not a spread in seconds (0..2, e.g. 0.025)"}
		}
		est = engine.Estimate{ET: et, SD: sd, Basis: "the --et and --sd given"}
	default:
		useModel := o.cond.Given() || o.cond.Latest || o.cond.At != "" || e.Demo
		if !useModel {
			if elev, _, err := e.SiteElevation(o.cond.ReadingFields); err == nil {
				if log, err := e.WeatherLog(elev); err == nil && len(log) > 0 {
					o.cond.Latest, useModel = true, true
				}
			}
		}
		if useModel {
			n, err := forecastNext(e, o.cond, o.Prep, "", o.s.Now())
			if err != nil {
				return err
			}
			for _, w := range n.Cond.Warnings {
				fmt.Fprintln(o.s.Err, "pitcard: warning:", w)
			}
			est = n.Pred.Estimate()
			est.Basis += ", in " + n.Cond.Source
			leftOut = n.LeftOut
			if ok, why := n.Pred.DialReady(); !ok {
				// No dial table from too few passes: the estimate is a guide.
				return noDial(o, est, why, leftOut)
			}
			break
		}
		car, err := e.Car()
		if err != nil {
			return err
		}
		passes, lo := e.Logbook()
		if !event.OnlyLeftOut(lo) {
			return lo
		}
		leftOut = lo
		if est, _, err = engine.RecentEstimate(passes, car.DistanceFt, o.Last, e.Settings.AbortWords); err != nil {
			return userErr(err)
		}
	}
	plan, err := engine.PlanDial(est, e.Settings.DialStep, e.Settings.BreakoutRisk, o.Rows)
	if err != nil {
		return err
	}
	j := dialJSON{PredictedET: round(est.ET, 4), SD: round(est.SD, 4), Basis: est.Basis, Step: plan.Step.String(),
		Risk: plan.Risk, Recommended: dialText(plan)}
	// Against the other lane: the chance to win of every option.
	var oppDial decimal.NullDecimal
	if o.OppDial != "" {
		d, err := engine.ParseSeconds("--opponent-dial", o.OppDial)
		if err != nil {
			return err
		}
		if err := event.RangeErr("--opponent-dial", d, engine.DialRange); err != nil {
			return err
		}
		oppDial = decimal.NewNullDecimal(d)
	}
	var wins []engine.WinOption
	var opp *engine.Opponent
	if oppDial.Valid {
		passes, _ := e.RecentLogbook()
		var usRT engine.RTModel
		if opp, usRT, err = o.opp.Build(e.Settings, oppDial, passes); err != nil {
			return err
		}
		var ds []decimal.Decimal
		for _, op := range plan.Options {
			ds = append(ds, op.Dial)
		}
		wins = engine.WinChances(engine.WinInput{Us: est, UsRT: usRT, Opp: *opp, Seed: 1}, ds)
		best := engine.BestForWin(wins)
		j.BestForWin = &bestForWinJSON{Dial: best.Dial.StringFixed(stepPlaces(plan)), WinChance: round(best.Win, 4)}
		h := engine.HeadStart(plan.Recommended, opp.Dial).InexactFloat64()
		j.HeadStartS = &h
	}
	for i, op := range plan.Options {
		oj := dialOptionJSON{Dial: op.Dial.StringFixed(stepPlaces(plan)), BreakoutChance: round(op.BreakoutChance, 4),
			GiveawayS: round(op.Giveaway, 4), Recommended: op.Recommended}
		if wins != nil {
			w := round(wins[i].Win, 4)
			oj.WinChance = &w
		}
		j.Options = append(j.Options, oj)
	}
	if o.Format == "json" {
		if err := writeJSON(o.s.Out, j); err != nil {
			return err
		}
		return leftOut
	}
	if o.Format == "csv" {
		rows := [][]string{{"dial", "breakout_chance", "expected_giveaway_s", "win_chance", "recommended", "predicted_et", "sd"}}
		for _, op := range j.Options {
			win := ""
			if op.WinChance != nil {
				win = fmt.Sprint(*op.WinChance)
			}
			rows = append(rows, []string{op.Dial, fmt.Sprint(op.BreakoutChance), fmt.Sprint(op.GiveawayS), win, fmt.Sprint(op.Recommended),
				fmt.Sprint(j.PredictedET), fmt.Sprint(j.SD)})
		}
		return errors.Join(writeCSV(o.s.Out, rows), leftOut)
	}
	fmt.Fprintln(o.s.Out, prep.Wrap(fmt.Sprintf("Predicted ET %.3f s ± %.3f (one standard deviation): %s.", est.ET, est.SD, est.Basis), o.s.width(), "  "))
	t := newTable(o.s, fmt.Sprintf("Dial-ins (step %s s, risk ≤ %.0f %%)", plan.Step, plan.Risk*100))
	header := table.Row{"Dial", "Breakout chance", "Time given away", ""}
	if wins != nil {
		header = table.Row{"Dial", "Breakout chance", "Time given away", "Chance to win", ""}
	}
	t.AppendHeader(header)
	for _, op := range j.Options {
		mark := ""
		dial := op.Dial
		if op.Recommended {
			mark = "← post this"
			if o.s.Terminal && o.Format == "text" { // no colour codes in a document
				dial = text.Colors{text.Bold, text.FgHiWhite, text.BgBlue}.Sprint(" " + dial + " ")
			}
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
	configs := alignRight(1, len(header)-1)
	render(o.s, t, o.Format, configs...)
	fmt.Fprintf(o.s.Out, "Recommended dial: %s (the slowest dial with at most a %.0f %% chance of breaking out).\n", j.Recommended, plan.Risk*100)
	if opp != nil {
		fmt.Fprintln(o.s.Out, prep.Wrap(fmt.Sprintf("Against the other lane's %s: %s; the dial that wins most is %s (%.1f %% to win). Chances from %d races drawn per dial, good to ±0.5 points.",
			opp.Dial.StringFixed(2), prep.HeadStartWords(plan.Recommended, opp.Dial), j.BestForWin.Dial, 100*j.BestForWin.WinChance, engine.WinDraws), o.s.width(), "  "))
		best := engine.BestForWin(wins)
		if bo := engine.BreakoutChance(est, best.Dial); bo > plan.Risk {
			var rule engine.WinOption
			for _, w := range wins {
				if w.Dial.Equal(plan.Recommended) {
					rule = w
				}
			}
			fmt.Fprintln(o.s.Out, prep.Wrap(fmt.Sprintf("The choice: %s breaks out %.1f %% of the time, more than the %.0f %% you accept; over %s it gains %.1f points of winning for %.1f points more breakout risk. Posted stays your rule's unless post_dial: best-for-win.",
				j.BestForWin.Dial, 100*bo, 100*plan.Risk, j.Recommended, 100*(best.Win-rule.Win), 100*(bo-engine.BreakoutChance(est, plan.Recommended))), o.s.width(), "  "))
		}
	}
	return leftOut
}

// noDial prints the estimate as a guide when there are too few passes to
// post a dial from (engine.MinPassesForDial).
func noDial(o *dialOptions, est engine.Estimate, why string, leftOut error) error {
	if o.Format == "csv" {
		return errors.Join(writeCSV(o.s.Out, [][]string{{"predicted_et", "sd", "no_dial"}, {fmt.Sprint(round(est.ET, 4)), fmt.Sprint(round(est.SD, 4)), why}}), leftOut)
	}
	if o.Format == "json" {
		if err := writeJSON(o.s.Out, map[string]any{"predicted_et": round(est.ET, 4), "sd": round(est.SD, 4), "basis": est.Basis,
			"recommended": nil, "no_dial": why}); err != nil {
			return err
		}
		return leftOut
	}
	fmt.Fprintf(o.s.Out, "No dial yet: %s.\nGuide: %.2f s ± %.2f (one standard deviation), %s.\nFor a table anyway, give your own estimate: --et and --sd.\n",
		why, est.ET, est.SD, est.Basis)
	return leftOut
}

// stepPlaces is the number of decimals of the dial step: 2 for 0.01.
func stepPlaces(p engine.DialPlan) int32 {
	if e := -p.Step.Exponent(); e > 2 {
		return e
	}
	return 2
}

func dialText(p engine.DialPlan) string { return p.Recommended.StringFixed(stepPlaces(p)) }
