package main

import (
	"bytes"
	"errors"
	"fmt"

	"github.com/spf13/cobra"

	"pitcard/entry"
	"pitcard/event"
	"pitcard/internal/safefile"
	"pitcard/prep"
)

type cardOptions struct {
	g      *globalOptions
	s      *IOStreams
	round  roundFlags
	Format string
	Out    string
}

func newCardCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &cardOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "card",
		Short: "The prep card for a round: the air, the prediction, the dial to post, the rules, the checklist",
		Long: `Prints one round's prep card: the call time and the minutes to it; the air now
and forecast for the call; the predicted timers and traps with their interval
and what they leaned on; the dial options with their breakout chances; what
each of the crew's rules changed and why, and the final dial; the checklist;
setup notes; today's passes predicted against actual; and the cautions.

The round defaults to the next session of schedule.yaml without a pass in
the logbook, its call time to the schedule's. With --demo, the built-in demo
event with its clock at the demo day's last weather reading.`,
		Example: `  pitcard card --demo
  pitcard card --round 3 --lane left --opponent-dial 11.42
  pitcard card --round E4 --at 21:30 --format html --out round4.html`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error { return cardRun(cmd, o) },
	}
	o.round.bind(cmd)
	cmd.Flags().StringVar(&o.Format, "format", "text", "text, markdown, html or json")
	cmd.Flags().StringVar(&o.Out, "out", "", "write the card to this file instead of the screen")
	return cmd
}

func cardRun(cmd *cobra.Command, o *cardOptions) error {
	if err := checkFormat(o.Format, "text", "markdown", "html", "json"); err != nil {
		return err
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	now := o.s.Now()
	now = e.DemoClock(now)
	in, warnings, err := entry.GatherRound(e, o.round.request(), now)
	if !event.Usable(err) {
		return err
	}
	broken := err
	for _, w := range warnings {
		o.s.warn(w)
	}
	c := prep.Gather(in)
	keepHeldOut(e, o.s)
	if c.CrossFlag != "" {
		o.s.warn(c.CrossFlag)
	}
	var buf bytes.Buffer
	switch o.Format {
	case "markdown":
		err = prep.RenderMarkdown(&buf, c)
	case "html":
		err = prep.RenderHTML(&buf, c)
	case "json":
		err = prep.RenderJSON(&buf, c)
	default:
		width := prep.Width
		if o.Out == "" {
			width = o.s.width()
		}
		err = prep.RenderTextWidth(&buf, c, o.s.Terminal && o.Out == "", width)
	}
	if err != nil {
		return err
	}
	if o.Out != "" {
		if err := safefile.WriteNoBackup(o.Out, buf.Bytes()); err != nil {
			return fmt.Errorf("writing %s: %w", o.Out, err)
		}
		fmt.Fprintf(o.s.Out, "Wrote the %s card for %s to %s.\n", o.Format, c.Title, o.Out)
		return errors.Join(failedChecks(c.Failed), broken)
	}
	if _, err := o.s.Out.Write(buf.Bytes()); err != nil {
		return err
	}
	return errors.Join(failedChecks(c.Failed), broken)
}

// keepHeldOut writes the folder's cache of the model's held-out predictions
// when the card computed a new one; a cache that cannot be written costs
// only time, and the crew hears why.
func keepHeldOut(e *event.Folder, s *IOStreams) {
	if err := e.KeepHeldOut(); err != nil {
		s.warn(fmt.Sprintf("the model's cache in %s was not kept (%v): the next card computes it again", event.CacheDir, err))
	}
}
