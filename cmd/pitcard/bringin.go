package main

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"slices"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"pitcard/bringin"
	"pitcard/colmap"
	"pitcard/entry"
	"pitcard/event"
	"pitcard/internal/safefile"
	"pitcard/internal/text"
	"pitcard/logbook"
	"pitcard/weather"
)

// mapFlags are the flags of a command that reads a file in another layout.
type mapFlags struct {
	Map, WriteMap string
	Yes           bool
}

func (f *mapFlags) bind(cmd *cobra.Command, guess bool) {
	cmd.Flags().StringVar(&f.Map, "map", "", "a column map (YAML): which column of FILE is which pitcard field, in which unit")
	if guess {
		cmd.Flags().BoolVar(&f.Yes, "yes", false, "use the map pitcard guesses from FILE's header (printed first)")
		cmd.Flags().StringVar(&f.WriteMap, "write-map", "", "save the guessed map to this file, to edit and use with --map")
	}
}

// readMap reads --map for kind.
func readMap(path string, kind colmap.Kind) (*colmap.Map, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, userErrf("--map %s: cannot read it: %v", path, err)
	}
	return colmap.Read(data, path, kind)
}

// source is how to read FILE: pitcard's own columns, --map, or a guess the
// crew has confirmed with --yes.
func (f *mapFlags) source(s *IOStreams, e *eventFolder, path string, kind colmap.Kind) (bringin.Source, error) {
	data, err := bringin.ReadSourceFile(path)
	if err != nil {
		return bringin.Source{}, err
	}
	src := bringin.Source{Path: path, Data: data}
	if f.Map != "" {
		m, err := readMap(f.Map, kind)
		if err != nil {
			return src, err
		}
		fmt.Fprintf(s.Err, "pitcard: reading %s through %s (%s)\n", path, f.Map, m.Layout(data))
		src.Map = m
		return src, nil
	}
	if bringin.OwnLayout(data, kind) {
		return src, nil
	}
	defaults := map[string]string{}
	if trk, err := e.Track(); err == nil {
		defaults["track"] = trk.Name
	}
	guess, notes := colmap.Guess(data, path, kind, defaults)
	mapText := guess.YAML()
	fmt.Fprintf(s.Out, "%s is not in pitcard's columns. The map pitcard guesses from its header (%s):\n\n%s\n",
		path, colmap.Sniff(data), indent(string(mapText)))
	for _, n := range notes {
		fmt.Fprintln(s.Out, "  note:", n)
	}
	if f.WriteMap != "" {
		if err := safefile.WriteNoBackup(f.WriteMap, mapText); err != nil {
			return src, fmt.Errorf("writing %s: %w", f.WriteMap, err)
		}
		fmt.Fprintf(s.Out, "Wrote the map to %s: edit it and import with --map %s.\n", f.WriteMap, f.WriteMap)
	}
	m, err := colmap.Read(mapText, "the guessed map", kind)
	if f.WriteMap != "" && !f.Yes { // the map was asked for, and written: done
		if err != nil {
			fmt.Fprintf(s.Out, "Nothing was imported: the map is not enough yet (%v); complete it, then import with --map %s.\n", err, f.WriteMap)
		} else {
			fmt.Fprintf(s.Out, "Nothing was imported: check it, then import with --map %s (or run again with --yes).\n", f.WriteMap)
		}
		return src, errOnlyTheMap
	}
	if err != nil {
		return src, userErrf("the guessed map is not enough to import %s: %v\nSave it with --write-map MAP.yaml, complete it and use --map", path, err)
	}
	if !f.Yes {
		return src, userErrf("nothing was imported: check the guessed map above, then run again with --yes to use it (or --write-map MAP.yaml to save and edit it)")
	}
	src.Map = m
	return src, nil
}

// errOnlyTheMap ends an import whose --write-map was all that was asked:
// the command did it, and exits 0.
var errOnlyTheMap = errors.New("only the map was asked for")

func indent(s string) string {
	return "  " + strings.ReplaceAll(strings.TrimRight(s, "\n"), "\n", "\n  ")
}

type weatherImportOptions struct {
	g            *globalOptions
	s            *IOStreams
	maps         mapFlags
	SkipExisting bool
	Elevation    string
}

func newWeatherImportCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &weatherImportOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "import FILE",
		Short: "Import readings from a CSV: weather.csv's columns, a meter's export through a map (all or nothing)",
		Long: `Reads FILE, checks every reading, and adds them all to weather.csv, or none.
FILE may be in weather.csv's columns, or in any layout with --map MAP.yaml (a
column map: which column is which field, in which unit and date layout; comma,
semicolon or tab separated; decimal point or comma, detected when the map
leaves them out). Without --map pitcard guesses a map from FILE's header,
prints it, and imports with it only when given --yes.

A reading in a minute weather.csv already has is refused; with
--skip-existing an equal one is skipped (and counted) and a different one is a
conflict: both versions are listed and nothing is written.`,
		Example: `  pitcard weather import meter-export.csv --map meter-map.yaml
  pitcard weather import crewmate/weather.csv --skip-existing
  pitcard weather import export.txt --write-map meter-map.yaml`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			e, err := o.g.open(cmd)
			if err != nil {
				return err
			}
			if err := e.Writable(); err != nil {
				return err
			}
			elev, _, err := entry.SiteElevation(e, entry.ReadingFields{Elevation: o.Elevation})
			if err != nil {
				return err
			}
			src, err := o.maps.source(o.s, e, args[0], colmap.Weather)
			if errors.Is(err, errOnlyTheMap) {
				return nil
			}
			if err != nil {
				return err
			}
			log, err := src.Readings(elev)
			if err != nil {
				return fmt.Errorf("%w\nNothing was imported", err)
			}
			if len(log) == 0 {
				return userErrf("%s has no readings to import", args[0])
			}
			im, err := bringin.ImportReadings(e, log, args[0], elev, o.SkipExisting)
			added, skipped, total := im.Added, im.Skipped, im.Total
			if err != nil {
				return err
			}
			fmt.Fprintf(o.s.Out, "Imported %s from %s", text.Plural(added, "reading"), args[0])
			if skipped > 0 {
				fmt.Fprintf(o.s.Out, " (%s already logged, skipped)", text.Plural(skipped, "reading"))
			}
			fmt.Fprintf(o.s.Out, "; %s now holds %d.\n", e.Name(event.WeatherFile), total)
			return nil
		},
	}
	o.maps.bind(cmd, true)
	cmd.Flags().BoolVar(&o.SkipExisting, "skip-existing", false, "skip readings already logged with the same values (a different one stops the import)")
	cmd.Flags().StringVar(&o.Elevation, "elevation", "", "track elevation, e.g. 2240ft (default: track.yaml)")
	return cmd
}

type logDiffOptions struct {
	g    *globalOptions
	s    *IOStreams
	maps mapFlags
}

func newLogDiffCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &logDiffOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "diff OTHER.csv",
		Short: "What another copy of the logbook has that this one lacks, and where the two disagree",
		Long: `Compares OTHER.csv (a crewmate's logbook, or any file through --map) with this
folder's logbook, pass by pass (date, time to the minute, track, lane): the
passes only OTHER has (what 'log import --skip-existing OTHER.csv' would add),
how many both have alike, and the conflicts: the same pass with a different
value in some field, both versions shown. It writes nothing.`,
		Example: `  pitcard log diff ../theo-laptop/logbook.csv
  pitcard log diff season.csv --map spreadsheet-map.yaml`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			e, err := o.g.open(cmd)
			if err != nil {
				return err
			}
			src := bringin.Source{Path: args[0]}
			if o.maps.Map != "" {
				if src.Map, err = readMap(o.maps.Map, colmap.Logbook); err != nil {
					return err
				}
			}
			// Compared a block of rows at a time: counts and lines are kept, not the passes.
			m, leftOut := bringin.DiffLogbook(e, src)
			if !event.OnlyLeftOut(leftOut) {
				return leftOut
			}
			fmt.Fprintf(o.s.Out, "%s against %s: %s only in %s, %s alike in both, %s.\n", args[0], e.Name(event.LogbookFile),
				text.Plural(len(m.New), "pass"), args[0], text.Plural(m.Same, "pass"), text.Plural(len(m.Conflicts), "conflict"))
			if len(m.New) > 0 {
				fmt.Fprintf(o.s.Out, "\nOnly in %s:\n", args[0])
				for _, p := range m.New {
					et, ft, _ := p.Finish()
					fmt.Fprintf(o.s.Out, "  line %d: %s %s, %s lane, %s, %s s at %.0f ft\n", p.Line, p.Time.Format("2006-01-02 15:04"),
						p.Session, p.Lane, p.Track, logbook.FormatSeconds(et, 3), ft)
				}
			}
			if len(m.Conflicts) > 0 {
				c := &event.Conflicts{List: m.Conflicts, Ours: e.Name(event.LogbookFile), TheirsIn: args[0]}
				fmt.Fprintf(o.s.Out, "\n%s and %s disagree on %s:\n%s\n", c.Ours, c.TheirsIn, text.Plural(len(c.List), "entry"), c.Entries())
			}
			if len(m.TheirBad) > 0 {
				fmt.Fprintf(o.s.Err, "pitcard: warning: %s has %s pitcard cannot read, left out of the comparison:\n%v\n", args[0],
					text.Plural(len(m.TheirBad), "row"), m.TheirBad)
			}
			return leftOut
		},
	}
	o.maps.bind(cmd, false)
	return cmd
}

type logExportOptions struct {
	g            *globalOptions
	s            *IOStreams
	Since, Track string
	Map          string
	Out          string
}

func newLogExportCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &logExportOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "export",
		Short: "Write the logbook (or part of it) as CSV for a spreadsheet, in pitcard's columns or a map's",
		Long: `Writes the logbook's passes as CSV: every column of logbook.csv, or with --map
the map's columns in its order, units, date layouts, separator and decimal
mark (the same maps 'log import --map' reads, so an export imports back).`,
		Example: `  pitcard log export --since 2026-06-01 --track "Juniper Bend Raceway" --out june.csv
  pitcard log export --map spreadsheet-map.yaml --out season.csv`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			e, passes, leftOut, err := o.g.openLogbook(cmd)
			if err != nil {
				return err
			}
			passes, err = bounded(passes, o.Since, 0, o.Track)
			if err != nil {
				return err
			}
			var buf bytes.Buffer
			// The setup columns go out too: a map may name them (and its
			// export keeps only the map's columns).
			if err := logbook.WriteWith(&buf, passes, setupColumns(e)); err != nil {
				return err
			}
			out := buf.Bytes()
			if o.Map != "" {
				m, err := readMap(o.Map, colmap.Logbook)
				if err != nil {
					return err
				}
				var mapped bytes.Buffer
				if err := m.Export(&mapped, out); err != nil {
					return err
				}
				out = mapped.Bytes()
			}
			if o.Out != "" {
				if err := safefile.WriteNoBackup(o.Out, out); err != nil {
					return fmt.Errorf("writing %s: %w", o.Out, err)
				}
				fmt.Fprintf(o.s.Out, "Wrote %s to %s.\n", text.Plural(len(passes), "pass"), o.Out)
				return leftOut
			}
			if _, err := o.s.Out.Write(out); err != nil {
				return err
			}
			return leftOut
		},
	}
	cmd.Flags().StringVar(&o.Since, "since", "", "only passes on or after this date, YYYY-MM-DD")
	cmd.Flags().StringVar(&o.Track, "track", "", "only passes at this track (its name as logged)")
	cmd.Flags().StringVar(&o.Map, "map", "", "write in this column map's layout")
	cmd.Flags().StringVar(&o.Out, "out", "", "write to this file instead of the screen")
	return cmd
}

// bounded keeps the passes on or after since (YYYY-MM-DD), at track, and
// then the last n (0: all).
func bounded(passes []logbook.Pass, since string, n int, track string) ([]logbook.Pass, error) {
	var from time.Time
	if since != "" {
		t, err := time.ParseInLocation(weather.DateLayout, strings.TrimSpace(since), time.Local)
		if err != nil {
			return nil, &weather.InputError{Field: "--since", Value: since, Reason: "is not a date (use YYYY-MM-DD, e.g. 2026-06-01)"}
		}
		from = t
	}
	if n < 0 {
		return nil, &weather.InputError{Field: "--last", Value: fmt.Sprint(n), Reason: "is negative (0 for all)"}
	}
	name := logbook.TrackName(track)
	match := func(p logbook.Pass) bool {
		return (since == "" || !p.Time.Before(from)) && (track == "" || strings.EqualFold(name, p.Track))
	}
	if n > 0 { // the last n, found from the end: the rest is not looked at
		var out []logbook.Pass
		for i := len(passes) - 1; i >= 0 && len(out) < n; i-- {
			if match(passes[i]) {
				out = append(out, passes[i])
			}
		}
		slices.Reverse(out)
		return out, nil
	}
	var out []logbook.Pass
	for _, p := range passes {
		if match(p) {
			out = append(out, p)
		}
	}
	return out, nil
}
