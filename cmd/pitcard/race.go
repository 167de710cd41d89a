package main

import (
	"encoding/json"
	"fmt"
	"pitcard/internal/text"

	"github.com/jedib0t/go-pretty/v6/table"
	"github.com/shopspring/decimal"
	"github.com/spf13/cobra"

	"pitcard/bracket"
	"pitcard/event"
	"pitcard/logbook"
	"pitcard/prep"
)

type raceLane struct {
	Dial, RT, ET, MPH string
	Foul              bool
}

type raceOptions struct {
	g           *globalOptions
	s           *IOStreams
	left, right raceLane
	Format      string
}

func newRaceCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &raceOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "race",
		Short: "Settle one race from the two slips: who won, why, and by how much",
		Long: `Settles a bracket race exactly, in decimal, from each lane's dial-in, reaction
time and ET (and finish speed, for the margin in feet). The slower dial starts
first by the difference; first to the finish wins unless it broke out; both
out, the smaller breakout wins; a red light or a boundary foul loses before
any breakout counts. --tree and --rt-zero say how the slips' reaction times
read (settings tree and rt_zero).`,
		Example: `  pitcard race --left-dial 14.20 --left-rt .520 --left-et 14.32 --right-dial 13.00 --right-rt .550 --right-et 13.10 --rt-zero amber
  pitcard race --left-dial 11.52 --left-rt .021 --left-et 11.538 --left-mph 116.79 --right-dial 12.10 --right-rt .034 --right-et 12.118 --format json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error { return raceRun(cmd, o) },
	}
	for _, l := range []struct {
		name string
		lane *raceLane
	}{{"left", &o.left}, {"right", &o.right}} {
		fl := cmd.Flags()
		fl.StringVar(&l.lane.Dial, l.name+"-dial", "", l.name+" lane's dial-in, s")
		fl.StringVar(&l.lane.RT, l.name+"-rt", "", l.name+" lane's reaction time, s, as the slip shows it")
		fl.StringVar(&l.lane.ET, l.name+"-et", "", l.name+" lane's elapsed time at the finish, s")
		fl.StringVar(&l.lane.MPH, l.name+"-mph", "", l.name+" lane's finish speed, mph (for the margin in feet)")
		fl.BoolVar(&l.lane.Foul, l.name+"-foul", false, l.name+" lane crossed the boundary or centerline")
	}
	cmd.Flags().String("tree", "", "full or pro (setting tree; default full)")
	cmd.Flags().String("rt-zero", "", "green (perfect .000, red light negative) or amber (perfect .500 full / .400 pro) (setting rt_zero)")
	cmd.Flags().StringVar(&o.Format, "format", "text", "text or json")
	withOut(cmd, s)
	return cmd
}

func (l raceLane) run(name string) (bracket.LaneRun, error) {
	var r bracket.LaneRun
	var err error
	// Each lane's figures are read and range-checked as a slip's are.
	for _, f := range []struct {
		flag, v string
		dst     *decimal.Decimal
		valid   [2]float64
	}{{"dial", l.Dial, &r.Dial, logbook.DialRange}, {"rt", l.RT, &r.RT, logbook.RTRange}, {"et", l.ET, &r.ET, logbook.DialRange}} {
		if f.v == "" {
			return r, userErrf("--%s-%s is required", name, f.flag)
		}
		if *f.dst, err = logbook.ParseSlipTime("--"+name+"-"+f.flag, f.v, f.valid); err != nil {
			return r, err
		}
	}
	if l.MPH != "" {
		m, err := logbook.ParseSeconds("--"+name+"-mph", l.MPH)
		if err != nil || !m.IsPositive() {
			return r, userErrf("--%s-mph %q is not a speed in mph", name, l.MPH)
		}
		r.MPH = decimal.NewNullDecimal(m)
	}
	r.Foul = l.Foul
	return r, nil
}

type raceLaneJSON struct {
	Dial     json.Number `json:"dial"`
	RT       json.Number `json:"rt"`
	ET       json.Number `json:"et"`
	Start    json.Number `json:"start_s"`
	Reaction json.Number `json:"reaction_from_green"`
	Finish   json.Number `json:"finish_s"`
	OverDial json.Number `json:"et_minus_dial"`
	Package  json.Number `json:"total_against_dial"`
	RedLight bool        `json:"red_light"`
	Breakout bool        `json:"breakout"`
	Foul     bool        `json:"foul"`
}

type raceJSON struct {
	Winner      string       `json:"winner"`
	Reason      string       `json:"reason"`
	Explanation string       `json:"explanation"`
	First       string       `json:"first_to_finish"`
	MarginS     json.Number  `json:"margin_s"`
	MarginFt    *float64     `json:"margin_ft"`
	Tree        string       `json:"tree"`
	RTZero      string       `json:"rt_zero"`
	Left        raceLaneJSON `json:"left"`
	Right       raceLaneJSON `json:"right"`
}

func raceRun(cmd *cobra.Command, o *raceOptions) error {
	if err := checkFormat(o.Format, "text", "json"); err != nil {
		return err
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	left, err := o.left.run("left")
	if err != nil {
		return err
	}
	right, err := o.right.run("right")
	if err != nil {
		return err
	}
	rules := bracket.RaceRules{Tree: e.Settings.Tree, RTZero: e.Settings.RTZero}
	out, err := bracket.Settle(left, right, rules)
	if err != nil {
		return err
	}
	laneJSON := func(r bracket.LaneRun, x bracket.LaneResult) raceLaneJSON {
		// numbers with the slip's digits: 0.520, 14.20
		f := func(d decimal.Decimal) json.Number { return json.Number(logbook.FormatSeconds(d, 3)) }
		return raceLaneJSON{Dial: json.Number(prep.DialText(r.Dial, e.Settings.DialStep)), RT: f(r.RT), ET: f(r.ET), Start: f(x.Start), Reaction: f(x.Reaction),
			Finish: f(x.Finish), OverDial: f(x.OverDial), Package: f(x.Package), RedLight: x.RedLight, Breakout: x.Breakout, Foul: x.Foul}
	}
	j := raceJSON{Winner: string(out.Winner), Reason: out.Reason, Explanation: out.Explanation, First: string(out.First),
		MarginS: json.Number(logbook.FormatSeconds(out.MarginS, 3)), MarginFt: event.OptFloat(out.MarginFt, out.HasMarginFt, 1),
		Tree: string(rules.Tree), RTZero: string(rules.RTZero), Left: laneJSON(left, out.Left), Right: laneJSON(right, out.Right)}
	if o.Format == "json" {
		return writeJSON(o.s.Out, j)
	}
	headline := "Tie"
	if out.Winner != "" {
		headline = "Winner: " + string(out.Winner) + " lane"
	} else if out.Reason == bracket.ReasonDoubleFoul {
		headline = "No winner on the slips"
	}
	margin := string(j.MarginS) + " s"
	if j.MarginFt != nil {
		margin += fmt.Sprintf(" (%.1f ft)", *j.MarginFt)
	}
	fmt.Fprintln(o.s.Out, text.Wrap(fmt.Sprintf("%s (%s): %s.", headline, out.Reason, out.Explanation), o.s.width(), "  "))
	fmt.Fprintf(o.s.Out, "At the finish: %s apart.\n", margin)
	t := newTable(o.s, "")
	// Two-line headers over figures of five or six characters: the table
	// fits an 80-column terminal.
	t.AppendHeader(table.Row{"Lane", "Dial", "RT", "ET", "Green\nat", "Reaction", "Finish\nat", "ET −\ndial", "Total vs\ndial", ""})
	for _, l := range []struct {
		name string
		j    raceLaneJSON
	}{{"left", j.Left}, {"right", j.Right}} {
		flags := ""
		switch {
		case l.j.RedLight:
			flags = "RED LIGHT"
		case l.j.Foul:
			flags = "FOUL"
		case l.j.Breakout:
			flags = "BREAKOUT"
		}
		t.AppendRow(table.Row{l.name, l.j.Dial, l.j.RT, l.j.ET, l.j.Start, l.j.Reaction, l.j.Finish, l.j.OverDial, l.j.Package, flags})
	}
	configs := alignRight(2, 9)
	compact(t)
	render(o.s, t, "text", configs...)
	fmt.Fprintln(o.s.Out, text.Wrap(fmt.Sprintf("Tree %s; reaction times count from the %s. Times in seconds after the first green.", rules.Tree, rules.RTZero), o.s.width(), "  "))
	return nil
}
