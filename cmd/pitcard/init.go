package main

import (
	"fmt"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"pitcard/event"
)

type initOptions struct {
	g    *globalOptions
	s    *IOStreams
	Dir  string
	Demo bool
}

func newInitCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &initOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "init DIR",
		Short: "Write a commented starter event folder (or, with --demo, a copy of the demo event)",
		Long: `Creates DIR with a commented pitcard.yaml, car.yaml and track.yaml, an empty
logbook and weather log, and the rules that ship with pitcard. Edit car.yaml
and track.yaml for your car and track, then run pitcard commands inside DIR
(or with --dir DIR). With --demo, DIR gets a copy of the built-in demo event to
change and see the results change. Existing files are never overwritten.`,
		Example: "  pitcard init my-car\n  pitcard init --demo demo-event",
		Args:    cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Dir, o.Demo = args[0], o.g.Demo
			return initRun(o)
		},
	}
	return cmd
}

func initRun(o *initOptions) error {
	what := "starter"
	if o.Demo {
		what = "demo"
	}
	files, err := event.Create(o.Dir, o.Demo, o.s.Now())
	if err != nil {
		return err
	}
	fmt.Fprintf(o.s.Out, "Wrote the %s event folder %s (%d files: %s).\n", what, o.Dir, len(files), strings.Join(files, ", "))
	fmt.Fprintf(o.s.Out, "The rules in %s are yours to change: each file says what it does.\n", filepath.Join(o.Dir, event.RulesDir))
	if o.Demo {
		fmt.Fprintf(o.s.Out, "Next: cd %s && pitcard air --latest\n", o.Dir)
	} else {
		fmt.Fprintf(o.s.Out, "Next: edit %s, %s and %s for your car, track and race day, then add a reading:\n  cd %s && pitcard weather add --temp 85F --baro 28.90inHg --humidity 40%%\nand print the card for the next round: pitcard card\n",
			filepath.Join(o.Dir, event.CarFile), filepath.Join(o.Dir, event.TrackFile), filepath.Join(o.Dir, event.ScheduleFile), o.Dir)
	}
	return nil
}
