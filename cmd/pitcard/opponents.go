package main

import (
	"fmt"

	"github.com/jedib0t/go-pretty/v6/table"
	"github.com/spf13/cobra"

	"pitcard/bracket"
	"pitcard/bringin"
	"pitcard/event"
	"pitcard/internal/text"
)

type logOpponentsOptions struct {
	g      *globalOptions
	s      *IOStreams
	Format string
}

func newLogOpponentsCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &logOpponentsOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "opponents",
		Short: "List the other cars raced: their slips kept in opponents.csv, and the figures the card uses",
		Long: `Lists each other car of opponents.csv (the other lane's slips entered with
'log add --opponent', 'round' or the pit page): its passes, the days it raced,
its ET over its dial (mean ± spread) and its driver's reaction time, as the
card uses them against it (its own figures shrunk toward the settings'
opponent_margin, opponent_margin_sd, opponent_rt_mean and opponent_rt_sd).`,
		Example: "  pitcard log opponents\n  pitcard log opponents --format json",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, _ []string) error { return logOpponentsRun(cmd, o) },
	}
	cmd.Flags().StringVar(&o.Format, "format", "text", "text, markdown or json")
	withOut(cmd, s)
	return cmd
}

// opponentJSON is one car of 'log opponents --format json'.
type opponentJSON struct {
	Car        string  `json:"car"`
	Passes     int     `json:"passes"`
	Events     int     `json:"events"`
	MarginS    float64 `json:"margin_s"`
	MarginSDS  float64 `json:"margin_sd_s"`
	RTMeanS    float64 `json:"rt_mean_s"`
	RTSDS      float64 `json:"rt_sd_s"`
	LastRaced  string  `json:"last_raced"`
	MarginUsed int     `json:"margin_passes"` // passes whose notes do not say the run was aborted
}

func logOpponentsRun(cmd *cobra.Command, o *logOpponentsOptions) error {
	if err := checkFormat(o.Format, "text", "markdown", "json"); err != nil {
		return err
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	book, err := e.OpponentBook()
	if err != nil {
		return err
	}
	st := e.Settings
	var out []opponentJSON
	for _, h := range book.Cars(st.AbortWords) {
		m, msd := bracket.Shrunk(h.Margins, st.OppMargin, st.OppMarginSD, bracket.PriorPasses)
		rt, rtsd := bracket.Shrunk(h.RTs, st.OppRTMean, st.OppRTSD, bracket.PriorPasses)
		last := ""
		for _, p := range book.Passes {
			if event.SameCar(p.Car, h.Car) && p.Date > last {
				last = p.Date
			}
		}
		out = append(out, opponentJSON{Car: h.Car, Passes: h.Passes, Events: h.Events, MarginS: round(m, 4), MarginSDS: round(msd, 4),
			RTMeanS: round(rt, 4), RTSDS: round(rtsd, 4), LastRaced: last, MarginUsed: len(h.Margins)})
	}
	bad := book.BadRows()
	if o.Format == "json" {
		if out == nil {
			out = []opponentJSON{}
		}
		if err := writeJSON(o.s.Out, out); err != nil {
			return err
		}
		return bad
	}
	if len(out) == 0 {
		fmt.Fprintf(o.s.Out, "%s holds no other car yet: name it with --opponent when you log the other lane's slip ('pitcard log add').\n", e.Name(event.OpponentsFile))
		return bad
	}
	t := newTable(o.s, fmt.Sprintf("The other cars (%s), %s", e.Name(event.OpponentsFile), text.Plural(len(out), "car")))
	t.AppendHeader(table.Row{"Car", "Passes", "Events", "Over its dial, s", "Reaction, s", "Last raced"})
	for _, x := range out {
		t.AppendRow(table.Row{x.Car, x.Passes, x.Events, fmt.Sprintf("%+.3f ± %.3f", x.MarginS, x.MarginSDS), fmt.Sprintf("%.3f ± %.3f", x.RTMeanS, x.RTSDS), x.LastRaced})
	}
	compact(t)
	render(o.s, t, o.Format, alignRight(2, 5)...)
	fmt.Fprintln(o.s.Out, text.Wrap(fmt.Sprintf("As the card races them: each car's own figures shrunk toward the settings' (%+.3f ± %.3f over the dial, reaction %.3f ± %.3f s) as if those were %d more passes, so a car seen once stays near them. Name one with 'pitcard card --opponent CAR'.",
		st.OppMargin, st.OppMarginSD, st.OppRTMean, st.OppRTSD, bracket.PriorPasses), o.s.width(), ""))
	return bad
}

// importOpponents imports FILE into the opponent book when it is one (its
// header is opponents.csv's): done says it was, and err how it went.
func importOpponents(s *IOStreams, e *eventFolder, path string, skipExisting bool) (done bool, err error) {
	data, err := bringin.ReadSourceFile(path)
	if err != nil || !event.IsOpponentBook(data) {
		return false, nil // the logbook's import reads it and says what is wrong
	}
	added, skipped, err := e.ImportOpponents(data, path, skipExisting)
	if err != nil {
		return true, err
	}
	fmt.Fprintf(s.Out, "Imported %s of the other lane from %s into %s", text.Plural(added, "slip"), path, e.Name(event.OpponentsFile))
	if skipped > 0 {
		fmt.Fprintf(s.Out, " (%s already there, skipped)", text.Plural(skipped, "slip"))
	}
	fmt.Fprintln(s.Out, ".")
	return true, nil
}
