package main

import (
	"fmt"
	"io"
	"os"
	"slices"
	"strings"
	"time"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"pitcard/event"
	"pitcard/logbook"
	"pitcard/weather"
)

// globalOptions are the flags every command has.
type globalOptions struct {
	Dir   string // the event folder
	Demo  bool   // read the built-in demo event instead
	Units string // imperial or metric; overrides pitcard.yaml
	// Files in place of the folder's car.yaml, track.yaml and logbook.csv,
	// for every command that reads them.
	CarFile, TrackFile, LogbookFile string
	// now is the clock; its zone is the folder's (time.Now's is time.Local).
	now func() time.Time
}

func newRootCmd(s *IOStreams) *cobra.Command {
	g := &globalOptions{now: s.Now}
	root := &cobra.Command{
		Use:   "pitcard",
		Short: "Race-day prep for bracket drag racers: the air, the logbook, the prediction, the dial-in, the card",
		Long: `pitcard turns fresh weather and track readings into a prediction for your car,
helps pick the dial-in, runs your crew's rules and prints a prep card per round.

Run it inside an event folder (see 'pitcard init'), or point --dir at one.
Try it on the built-in demo event first: pitcard card --demo`,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	// Every command's warnings go to standard error; standard output carries
	// only what the command prints (a card, JSON, CSV) and help.
	root.PersistentPreRun = func(c *cobra.Command, _ []string) { warnDeprecated(c, s.Err) }
	root.SetIn(s.In)
	root.SetOut(s.Out)
	root.SetErr(s.Err)
	dir := os.Getenv("PITCARD_DIR")
	if dir == "" {
		dir = "."
	}
	root.PersistentFlags().StringVar(&g.Dir, "dir", dir, "event folder (env PITCARD_DIR)")
	root.PersistentFlags().BoolVar(&g.Demo, "demo", false, "use the built-in demo event (read-only)")
	root.PersistentFlags().StringVar(&g.Units, "units", "", "imperial or metric: how bare numbers are read and results shown (setting units)")
	root.PersistentFlags().StringVar(&g.CarFile, "car-file", "", "read this file in place of the folder's car.yaml")
	root.PersistentFlags().StringVar(&g.TrackFile, "track-file", "", "read this file in place of the folder's track.yaml")
	root.PersistentFlags().StringVar(&g.LogbookFile, "logbook-file", "", "read (and write) this file in place of the folder's logbook.csv")
	_ = root.MarkPersistentFlagDirname("dir")
	root.Version = versionString()
	root.SetVersionTemplate("pitcard {{.Version}}\n")
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return userErrf("%v (see '%s --help')", err, c.CommandPath())
	})
	root.AddCommand(
		newVersionCmd(s),
		newInitCmd(s, g),
		newAirCmd(s, g),
		newWeatherCmd(s, g),
		newLogCmd(s, g),
		newRaceCmd(s, g),
		newDialCmd(s, g),
		newPredictCmd(s, g),
		newRulesCmd(s, g),
		newCardCmd(s, g),
		newRoundCmd(s, g),
		newServeCmd(s, g),
	)
	registerCompletions(root)
	return root
}

// eventFolder is the event package's: the folder and its
// settings live there, so every front end reads and writes them the same way.
type eventFolder = event.Folder

// open opens the event folder and loads its settings: flags > PITCARD_*
// environment > pitcard.yaml > defaults.
func (g *globalOptions) open(cmd *cobra.Command) (*eventFolder, error) {
	o := event.OpenOptions{Dir: g.Dir, Demo: g.Demo, CarFile: g.CarFile, TrackFile: g.TrackFile, LogbookFile: g.LogbookFile,
		Set: map[string]string{}, Env: os.Getenv, Environ: os.Environ}
	if g.now != nil {
		o.Loc = g.now().Location() // one zone for the clock and the folder's times
	}
	for _, key := range []string{"units", "dial_step", "breakout_risk", "tree", "rt_zero"} {
		if f := cmd.Flag(strings.ReplaceAll(key, "_", "-")); f != nil && f.Changed {
			o.Set[key] = f.Value.String()
		}
	}
	return event.Open(o)
}

// openLogbook opens the event folder and reads its whole logbook. Rows left
// out (bad lines, named in leftOut) do not stop it: the good passes are
// returned, and the caller returns leftOut after its output so the rows are
// still named and the exit code still says so. Any other trouble (no
// folder, an unreadable file) is err, and nothing else is returned with it.
// It does not filter the passes (--since, --last, --track are the caller's).
func (g *globalOptions) openLogbook(cmd *cobra.Command) (e *eventFolder, passes []logbook.Pass, leftOut, err error) {
	e, err = g.open(cmd)
	if err != nil {
		return nil, nil, nil, err
	}
	passes, leftOut = e.Logbook()
	if !event.OnlyLeftOut(leftOut) {
		return nil, nil, nil, leftOut
	}
	return e, passes, leftOut, nil
}

// checkFormat refuses a --format the command does not print.
func checkFormat(format string, allowed ...string) error {
	if slices.Contains(allowed, format) {
		return nil
	}
	return &weather.InputError{Field: "--format", Value: format, Reason: "is not a format of this command (use " + strings.Join(allowed, ", ") + ")"}
}

// deprecatedFlag annotates a flag kept under an old name; its value says
// what to use instead.
const deprecatedFlag = "pitcard-deprecated"

// deprecate keeps an old flag name working, hidden from help, with a warning
// on standard error when it is used. Not pflag's MarkDeprecated: cobra prints
// that warning to the command's output stream, which is standard output here
// (help, JSON and CSV go there), so a script's JSON would start with it.
func deprecate(fs *pflag.FlagSet, name, use string) {
	fs.Lookup(name).Hidden = true
	_ = fs.SetAnnotation(name, deprecatedFlag, []string{use})
}

// warnDeprecated says on w which old flag names the command line used.
func warnDeprecated(c *cobra.Command, w io.Writer) {
	c.Flags().Visit(func(f *pflag.Flag) {
		if use := f.Annotations[deprecatedFlag]; use != nil {
			fmt.Fprintf(w, "pitcard: warning: flag --%s is deprecated: %s\n", f.Name, use[0])
		}
	})
}
