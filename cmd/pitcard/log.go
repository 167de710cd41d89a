package main

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"github.com/jedib0t/go-pretty/v6/table"
	prettytext "github.com/jedib0t/go-pretty/v6/text"
	"github.com/shopspring/decimal"
	"github.com/spf13/cobra"

	"pitcard/bringin"
	"pitcard/colmap"
	"pitcard/engine"
	"pitcard/entry"
	"pitcard/event"
	"pitcard/internal/printable"
	"pitcard/internal/text"
	"pitcard/logbook"
	"pitcard/prep"
	"pitcard/weather"
)

func newLogCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	cmd := &cobra.Command{
		Use:   "log",
		Short: "The car's logbook: add a pass from its time slip, import, compare with a copy, export, list, stats",
		Long: `logbook.csv holds one row per pass: the time slip and the conditions it ran in.
Every row is checked; a bad one is refused with its file, line, column, value
and the rule it breaks, and nothing is written. Writes are atomic and keep the
previous logbook as logbook.csv.bak.`,
		Example: `  pitcard log add --round E1 --lane left --dial 11.52 --rt .021 --et60 1.612 --et1320 11.538 --mph1320 116.79
  pitcard log import season-2026.csv
  pitcard log import season.csv --map spreadsheet-map.yaml
  pitcard log diff ../theo-laptop/logbook.csv
  pitcard log export --since 2026-06-01 --out june.csv
  pitcard log list --last 10
  pitcard log stats --last 40
  pitcard log compare E2 --with best`,
	}
	cmd.AddCommand(newLogAddCmd(s, g), newLogImportCmd(s, g), newLogListCmd(s, g), newLogStatsCmd(s, g), newLogDiffCmd(s, g), newLogExportCmd(s, g),
		newLogCompareCmd(s, g), newLogOpponentsCmd(s, g), newLogSetupCmd(s, g))
	groupCmd(cmd)
	return cmd
}

type logAddOptions struct {
	g                               *globalOptions
	s                               *IOStreams
	reading                         readingFlags
	Date, Time, Track, Session      string
	Lane, Dial, RT, Weight, Notes   string
	ET60, ET330, ET660, ET1000, ET1 string
	MPH660, MPH1320                 string
	Change                          string
	// The other lane's slip, when it is entered too: what decided the round.
	OppDial      string
	OppRT, OppET []string
	OppCar       string   // the other car: its slip goes into opponents.csv
	Set          []string // the pass's setup, name=value
}

func newLogAddCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &logAddOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "add",
		Short: "Add one pass from its time slip",
		Long: `Adds one pass to logbook.csv. Give the slip's fields as flags; times are in
seconds as the slip prints them (.021, 11.538). The conditions default to the
weather log's reading nearest the pass (within an hour), and any reading flag
given replaces that field; the track defaults to track.yaml's name and the
weight to car.yaml's.`,
		Example: `  pitcard log add --round E1 --lane left --dial 11.52 --rt .021 --et60 1.612 --et330 4.689 \
      --et660 7.321 --mph660 92.44 --et1000 9.605 --et1320 11.538 --mph1320 116.79
  pitcard log add --round T2 --lane right --et60 1.65 --et1320 11.71 --mph1320 115.2 --notes "lifted early"
  pitcard log add --round T3 --lane left --et60 1.59 --et1320 11.42 --change "new converter, 5400 stall"`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error { return logAddRun(cmd, o) },
	}
	fl := cmd.Flags()
	fl.StringVar(&o.Date, "date", "", "date of the pass, YYYY-MM-DD (default: today)")
	fl.StringVar(&o.Time, "time", "", "time of the pass, HH:MM (default: now)")
	fl.StringVar(&o.Track, "track", "", "track name (default: track.yaml's)")
	fl.StringVar(&o.Session, "round", "", roundFlagHelp)
	fl.StringVar(&o.Session, "session", "", "")
	deprecate(fl, "session", "use --round (as on card, dial and round)")
	fl.StringVar(&o.Lane, "lane", "", "left or right")
	fl.StringVar(&o.Dial, "dial", "", "dial-in, s (blank for a time trial without one)")
	fl.StringVar(&o.RT, "rt", "", "reaction time, s, as the slip shows it (with rt_zero: green, perfect is .000 and a red light negative; amber: perfect is .500 full tree, .400 pro)")
	fl.StringVar(&o.ET60, "et60", "", "60-ft time, s")
	fl.StringVar(&o.ET330, "et330", "", "330-ft time, s")
	fl.StringVar(&o.ET660, "et660", "", "eighth-mile ET, s")
	fl.StringVar(&o.ET1000, "et1000", "", "1000-ft time, s")
	fl.StringVar(&o.ET1, "et1320", "", "quarter-mile ET, s")
	fl.StringVar(&o.MPH660, "mph660", "", "eighth-mile trap speed: 108.2mph or 174.1km/h, a bare number in the crew's units")
	fl.StringVar(&o.MPH1320, "mph1320", "", "quarter-mile trap speed: 116.8mph or 188.0km/h, a bare number in the crew's units")
	fl.StringVar(&o.Weight, "weight", "", "car and driver as run: 3300lb or 1500kg, a bare number in the crew's units (default: car.yaml's weight_lb)")
	fl.StringVar(&o.Notes, "notes", "", "free text: lifted, pedaled, new tires ...")
	fl.StringVar(&o.Change, "change", "", "what changed on the car before this pass: new converter, 4.10 gear, +2 psi boost ... (blank: nothing)")
	fl.StringVar(&o.OppDial, "opponent-dial", "", "the other lane's dial-in from its slip (with --opponent-rt and --opponent-et: what decided the round)")
	// A list, as on card and dial (the other lane's slips of the day), of
	// one value here: a pass has one slip.
	fl.StringSliceVar(&o.OppRT, "opponent-rt", nil, "the other lane's reaction time from its slip, s (a list on card and dial; one value here)")
	fl.StringSliceVar(&o.OppET, "opponent-et", nil, "the other lane's ET from its slip, s (a list on card and dial; one value here)")
	fl.StringVar(&o.OppCar, "opponent", "", "the other car's number or name (4471): with its slip, kept in opponents.csv for the next time you race it")
	fl.StringArrayVar(&o.Set, "set", nil, "a setup item of car.yaml's setup: and its value, name=value (repeat for each; an item not given keeps the last pass's value)")
	o.reading.bind(cmd)
	return cmd
}

func logAddRun(cmd *cobra.Command, o *logAddOptions) error {
	oppRT, err := oneValue("--opponent-rt", o.OppRT)
	if err != nil {
		return err
	}
	oppET, err := oneValue("--opponent-et", o.OppET)
	if err != nil {
		return err
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	lp, err := entry.AddPass(e, entry.NewPass{
		Date: o.Date, Time: o.Time, Track: o.Track, Session: o.Session, Lane: o.Lane, Dial: o.Dial, RT: o.RT,
		Weight: o.Weight, Notes: o.Notes, ET60: o.ET60, ET330: o.ET330, ET660: o.ET660, ET1000: o.ET1000, ET1: o.ET1,
		MPH660: o.MPH660, MPH1320: o.MPH1320, Change: o.Change, Reading: o.reading.ReadingFields,
		OppDial: o.OppDial, OppRT: oppRT, OppET: oppET, OppCar: o.OppCar, Set: o.Set,
	}, o.s.Now())
	if err != nil {
		return err
	}
	for _, w := range lp.Warnings {
		o.s.warn(w)
	}
	p := lp.Pass
	et, ft, _ := p.Finish()
	fmt.Fprintf(o.s.Out, "Logged %s %s, %s lane: %s s at %.0f ft (%s in %s).\n",
		p.Time.Format("2006-01-02 15:04"), p.Session.Long(), p.Lane, logbook.FormatSeconds(et, 3), ft, text.Plural(lp.Count, "pass"), e.Name(event.LogbookFile))
	if p.HasAir {
		fmt.Fprintf(o.s.Out, "Conditions from %s: %s, density altitude %s.\n", lp.Source,
			p.Air.Temp.Format(e.Settings.Units.Temp, 1), p.Air.Derive(lp.Elevation).DensityAltitude.FormatDensityAltitude(e.Settings.Units.Length))
	}
	if line := setupLine(e, p, o.Set); line != "" {
		fmt.Fprintln(o.s.Out, text.Wrap(line, o.s.width(), "  "))
	}
	if lp.Decided != "" {
		fmt.Fprintln(o.s.Out, text.Wrap(lp.Decided, o.s.width(), "  "))
	}
	if lp.Opponent != nil {
		fmt.Fprintf(o.s.Out, "The other lane's slip is kept in %s as car %s's.\n", e.Name(event.OpponentsFile), lp.Opponent.Car)
	}
	return lp.OpponentErr
}

// oneValue is the single value of a list flag that takes one slip's
// figure here: --opponent-et and --opponent-rt are lists on card and dial
// (the other lane's slips of the day), and log add reads one slip.
func oneValue(flag string, vs []string) (string, error) {
	switch len(vs) {
	case 0:
		return "", nil
	case 1:
		return vs[0], nil
	}
	return "", &weather.InputError{Field: flag, Value: strings.Join(vs, ","),
		Reason: "is one value on log add (this pass's slip); card and dial take the day's slips as a list"}
}

// altimeterLooking warns when rows' barometer figures look like sea-level
// (altimeter) settings for their track's elevation: the logbook holds
// station pressure, and mixing the two is the commonest weather mistake.
func altimeterLooking(e *eventFolder, passes []logbook.Pass, file string) string {
	trk, _ := e.Track()
	tracks, _ := e.OtherTracks()
	var lines []string
	for _, p := range passes {
		if !p.HasAir {
			continue
		}
		t, ok := tracks[strings.ToLower(p.Track)]
		if strings.EqualFold(p.Track, trk.Name) {
			t, ok = trk, true
		}
		if !ok {
			continue
		}
		r := weather.Reading{Temp: p.Air.Temp, Baro: p.Air.Baro, BaroKind: weather.StationPressure, RH: p.Air.RH}
		if r.PressureWarning(t.Elevation()) != "" {
			lines = append(lines, fmt.Sprint(p.Line))
		}
	}
	if len(lines) == 0 {
		return ""
	}
	shown := lines
	if len(shown) > 8 {
		shown = append(shown[:8:8], "...")
	}
	return fmt.Sprintf("%s: %s have baro_inhg figures that look like sea-level (altimeter) settings for their track's elevation (lines %s); "+
		"the logbook holds station pressure: convert them, or the air of those passes is wrong", file, text.Plural(len(lines), "row"), strings.Join(shown, ", "))
}

type logImportOptions struct {
	g            *globalOptions
	s            *IOStreams
	maps         mapFlags
	SkipExisting bool
}

func newLogImportCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &logImportOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "import FILE",
		Short: "Import passes from a CSV: logbook.csv's columns, a spreadsheet through a map (all or nothing)",
		Long: `Reads FILE, checks every row, and adds them all to the logbook, or none: when
any row is bad, or a pass is already in the logbook, every problem is listed
and nothing is written (a file already imported says so in one line). FILE
may be in logbook.csv's columns (the metric columns temp_c, baro_hpa,
track_temp_c, wind_kmh and weight_kg are accepted), or in any layout with --map MAP.yaml (which column is which field, in which
unit and date layout; comma, semicolon or tab separated; decimal point or
comma, detected when the map leaves them out). Without --map pitcard guesses
a map from FILE's header, prints it, and imports with it only when given
--yes.

With --skip-existing (a crewmate's copy of the logbook), a pass already
logged with the same values is skipped and counted; the same pass with
another value in any field is a conflict: both versions are listed and
nothing is written. 'pitcard log diff FILE' shows the same without writing.

A crewmate's opponents.csv (the other lane's slips; its header tells it) is
added to this folder's opponent book the same way: all or nothing, a slip
already there skipped with --skip-existing, another figure for the same car,
day and round a conflict.`,
		Example: `  pitcard log import season-2026.csv
  pitcard log import season.csv --map spreadsheet-map.yaml
  pitcard log import ../theo-laptop/logbook.csv --skip-existing`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error { return logImportRun(cmd, o, args[0]) },
	}
	o.maps.bind(cmd, true)
	cmd.Flags().BoolVar(&o.SkipExisting, "skip-existing", false, "skip passes already logged with the same values (a different one stops the import)")
	return cmd
}

// logImportRun imports file's passes into the logbook, or a crewmate's
// opponents.csv into the opponent book: all or nothing.
func logImportRun(cmd *cobra.Command, o *logImportOptions, file string) error {
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	if err := e.Writable(); err != nil {
		return err
	}
	if done, err := importOpponents(o.s, e, file, o.SkipExisting); done {
		return err
	}
	source, err := o.maps.source(o.s, e, file, colmap.Logbook)
	if errors.Is(err, errOnlyTheMap) {
		return nil
	}
	if err != nil {
		return err
	}
	if car, err := e.Car(); err == nil {
		source.Setup = car.Setup // the setup columns are checked as the logbook's are
	}
	src, err := source.Passes()
	if err != nil {
		return err
	}
	cur, _ := e.Logbook()
	merge := bringin.MergePasses(cur, src.Passes)
	if err := importRefused(e, src, merge, file, o.SkipExisting); err != nil {
		return err
	}
	passes := merge.New
	if len(passes) == 0 {
		if merge.Same > 0 {
			fmt.Fprintf(o.s.Out, "Nothing to import: the %s of %s are already in %s.\n", text.Plural(merge.Same, "pass"), file, e.Name(event.LogbookFile))
			return nil
		}
		return userErrf("%s has no passes to import", file)
	}
	if w := altimeterLooking(e, passes, file); w != "" {
		o.s.warn(w)
	}
	saved, err := e.SaveLogbook(passes, src.Extra...)
	n, kept := saved.Count, saved.Kept
	if err != nil {
		return err
	}
	if kept != nil {
		o.s.warn(kept.Error())
	}
	fmt.Fprintf(o.s.Out, "Imported %s from %s", text.Plural(len(passes), "pass"), file)
	if merge.Same > 0 {
		fmt.Fprintf(o.s.Out, " (%s already logged, skipped)", text.Plural(merge.Same, "pass"))
	}
	fmt.Fprintf(o.s.Out, "; %s now holds %d.\n", e.Name(event.LogbookFile), n)
	return nil
}

// importRefused is why nothing of file may be imported, or nil: a file
// already imported whole (said in one line), bad rows or passes already
// logged without --skip-existing (every one listed, the duplicates past
// shownDuplicates counted), or a pass logged with another value (a
// conflict). It writes nothing.
func importRefused(e *eventFolder, src *logbook.Logbook, merge bringin.PassMerge, file string, skipExisting bool) error {
	if len(src.Bad) == 0 && len(src.Passes) > 0 && merge.Same == len(src.Passes) && !skipExisting {
		// A file already imported: said in one line, not a line per pass.
		return userErrf("nothing new in %s: its %s are already in %s, alike (the same pass entered twice); nothing was imported (give --skip-existing to leave out the passes already logged)",
			file, text.Plural(merge.Same, "pass"), e.Name(event.LogbookFile))
	}
	if len(src.Bad) > 0 || (len(merge.Logged) > 0 && !skipExisting) {
		// All or nothing: list every bad row, and the good rows that are already logged.
		problems := append(logbook.RowErrors(nil), src.Bad...)
		for i, l := range merge.Logged {
			if i == shownDuplicates { // the rest counted, not listed
				problems = append(problems, &weather.InputError{File: file, Field: fmt.Sprintf("%d more passes", len(merge.Logged)-i),
					Reason: fmt.Sprintf("are already in %s too (not listed)", e.Name(event.LogbookFile))})
				break
			}
			problems = append(problems, event.DuplicateOf(src.Passes[l.Index], logbook.Pass{Line: l.OursLine}, e.Name(event.LogbookFile)))
		}
		if len(src.Bad) == 0 {
			return fmt.Errorf("%w\nNothing was imported (give --skip-existing to leave out the passes already logged)", problems)
		}
		return fmt.Errorf("%w\nNothing was imported", problems)
	}
	if len(merge.Conflicts) > 0 {
		return &event.Conflicts{List: merge.Conflicts, Ours: e.Name(event.LogbookFile), TheirsIn: file}
	}
	return nil
}

// shownDuplicates is how many passes already logged an import lists one
// by one; the rest are counted.
const shownDuplicates = 20

type logListOptions struct {
	g      *globalOptions
	s      *IOStreams
	Last   int
	Wide   bool
	Format string
}

func newLogListCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &logListOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:     "list",
		Short:   "List the logbook's passes",
		Example: "  pitcard log list --last 10\n  pitcard log list --demo --format json",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, _ []string) error { return logListRun(cmd, o) },
	}
	cmd.Flags().IntVar(&o.Last, "last", 20, "show the last N passes (0 = all)")
	cmd.Flags().BoolVar(&o.Wide, "wide", false, "show every timer (330 and 1000 ft too)")
	cmd.Flags().StringVar(&o.Format, "format", "text", "text, markdown, json or csv")
	withOut(cmd, s)
	return cmd
}

func logListRun(cmd *cobra.Command, o *logListOptions) error {
	if err := checkFormat(o.Format, "text", "markdown", "json", "csv"); err != nil {
		return err
	}
	e, passes, leftOut, err := o.g.openLogbook(cmd)
	if err != nil {
		return err
	}
	trk, _ := e.Track()
	if o.Last > 0 && len(passes) > o.Last {
		passes = passes[len(passes)-o.Last:]
	}
	switch o.Format {
	case "csv":
		if err := logbook.Write(o.s.Out, passes); err != nil {
			return err
		}
		return leftOut
	case "json":
		out := make([]event.PassJSON, len(passes))
		for i, p := range passes {
			out[i] = event.PassAsJSON(p, trk)
		}
		if err := writeJSON(o.s.Out, out); err != nil {
			return err
		}
		return leftOut
	}
	if len(passes) == 0 {
		fmt.Fprintf(o.s.Out, "%s has no passes yet: add one with 'pitcard log add' or 'pitcard log import'.\n", e.Name(event.LogbookFile))
		return leftOut
	}
	renderLogList(o, e, passes, trk)
	if o.Format == "text" {
		fmt.Fprintf(o.s.Out, "Round: T time trial, E elimination. DA: density altitude, %s.\n--wide adds the 330 and 1000 ft timers.\n", e.Settings.Units.Length)
	}
	return leftOut
}

// listColumns says how the list's table is laid out: the crew's units,
// whether every timer is shown (--wide), and whether the notes go under
// the table rather than in its last column.
type listColumns struct {
	u          weather.Units
	wide       bool
	notesBelow bool
}

// header is the list's header row: trap speeds and density altitude in
// the crew's units, the unit in the header.
func (l listColumns) header() table.Row {
	spd, daHead := l.u.Speed.String(), "DA "+l.u.Length.String()
	header := table.Row{"Date", "Time", "Round", "Lane", "Dial", "RT", "60 ft", "1/8", spd, "1/4", spd, daHead, "Notes"}
	if l.wide {
		header = table.Row{"Date", "Time", "Round", "Lane", "Dial", "RT", "60 ft", "330", "1/8", spd, "1000", "1/4", spd, daHead, "Notes"}
	}
	if l.notesBelow {
		header = header[:len(header)-1]
	}
	return header
}

// trap is a trap speed in the crew's unit, or "" when not timed.
func (l listColumns) trap(d decimal.NullDecimal) string {
	if !d.Valid || l.u.Speed == weather.UnitMPH {
		return sec(d, 2)
	}
	return strconv.FormatFloat(weather.MPH(d.Decimal.InexactFloat64()).In(l.u.Speed), 'f', 2, 64)
}

// row is one pass's row of the list, its notes in the last column unless
// they go under the table. It does not print the notes that go below.
func (l listColumns) row(p logbook.Pass, trk engine.Track) table.Row {
	da := ""
	if p.HasAir {
		da = p.Air.Derive(event.ElevationFor(p, trk)).DensityAltitude.FormatDensityAltitude(l.u.Length)
	}
	row := table.Row{p.Time.Format("2006-01-02"), p.Time.Format("15:04"), p.Session.String(), p.Lane, sec(p.Dial, 2), sec(p.RT, 3)}
	for i, ft := range logbook.TimerDistancesFt {
		if !l.wide && (ft == 330 || ft == 1000) {
			continue
		}
		row = append(row, sec(p.ET[i], 3))
		if ft == 660 {
			row = append(row, l.trap(p.MPH660))
		}
	}
	row = append(row, l.trap(p.MPH1320), strings.TrimSuffix(da, " "+l.u.Length.String()))
	if !l.notesBelow {
		row = append(row, printable.Line(passNotes(p)))
	}
	return row
}

// renderLogList prints the passes as a text or markdown table. Narrower
// than the list with its notes (a terminal under 100 columns), the notes go
// under the table, each with its pass. It prints no key to the columns.
func renderLogList(o *logListOptions, e *eventFolder, passes []logbook.Pass, trk engine.Track) {
	l := listColumns{u: e.Settings.Units, wide: o.Wide, notesBelow: o.Format == "text" && o.s.width() < prep.Width}
	t := newTable(o.s, fmt.Sprintf("Logbook (%s), last %s", e.Name(event.LogbookFile), text.Plural(len(passes), "pass")))
	header := l.header()
	t.AppendHeader(header)
	var below []string
	for _, p := range passes {
		if notes := passNotes(p); l.notesBelow && notes != "" {
			below = append(below, text.Wrap(fmt.Sprintf("%s %s: %s", p.Time.Format("2006-01-02 15:04"), p.Session, printable.Line(notes)), o.s.width(), "  "))
		}
		t.AppendRow(l.row(p, trk))
	}
	n := len(header)
	configs := append([]table.ColumnConfig{{Number: n, WidthMax: 16}}, alignRight(5, n-1)...)
	if l.notesBelow {
		configs = alignRight(5, n)
	}
	compact(t)
	render(o.s, t, o.Format, configs...)
	if len(below) > 0 {
		fmt.Fprintln(o.s.Out, "Notes:\n"+strings.Join(below, "\n"))
	}
}

func alignRight(from, to int) []table.ColumnConfig {
	var c []table.ColumnConfig
	for n := from; n <= to; n++ {
		c = append(c, table.ColumnConfig{Number: n, Align: prettytext.AlignRight})
	}
	return c
}

// listChangeRunes is how much of a pass's change the list shows: enough to
// know the car changed and how; 'log list --format json' has it whole.
const listChangeRunes = 24

// passNotes is a pass's notes as the list shows them: its change first,
// briefly ("changed: new converter; good launch").
func passNotes(p logbook.Pass) string {
	if p.Change == "" {
		return p.Notes
	}
	c := p.Change
	if r := []rune(c); len(r) > listChangeRunes {
		c = string(r[:listChangeRunes-1])
		if i := strings.LastIndex(c, " "); i > 0 { // cut at a word
			c = c[:i]
		}
		c = strings.TrimRight(c, " ,;") + "…"
	}
	if p.Notes == "" {
		return "changed: " + c
	}
	return "changed: " + c + "; " + p.Notes
}

// sec prints a slip time with at least places decimals, or "" when not timed.
func sec(d decimal.NullDecimal, places int) string {
	if !d.Valid {
		return ""
	}
	return logbook.FormatSeconds(d.Decimal, places)
}

type logStatsOptions struct {
	g            *globalOptions
	s            *IOStreams
	Format       string
	Since, Track string
	Last         int
}

func newLogStatsCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &logStatsOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "stats",
		Short: "Consistency per day and session: ET, reaction-time and 60-ft spread",
		Long: `For every day of the logbook, and within it for time trials, eliminations and
tests: the number of passes, the ET mean, spread (one standard deviation) and
range of the clean passes, the reaction-time mean and spread, the 60-ft
spread, and the car's consistency in words. With car.yaml and the passes'
weather, the ET spread is also given corrected for each pass's air and track
(the calibrated model's), and consistency is judged on that.`,
		Example: "  pitcard log stats --since 2026-06-01\n  pitcard log stats --last 40 --track \"Juniper Bend Raceway\"\n  pitcard log stats --demo --format csv",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, _ []string) error { return logStatsRun(cmd, o) },
	}
	cmd.Flags().StringVar(&o.Format, "format", "text", "text, markdown, json or csv")
	cmd.Flags().StringVar(&o.Since, "since", "", "only passes on or after this date, YYYY-MM-DD")
	cmd.Flags().IntVar(&o.Last, "last", 0, "only the last N passes (0 = all)")
	cmd.Flags().StringVar(&o.Track, "track", "", "only passes at this track (its name as logged)")
	withOut(cmd, s)
	return cmd
}

type statsJSON struct {
	Day         string   `json:"day"`
	Sessions    string   `json:"sessions"`
	Passes      int      `json:"passes"`
	Clean       int      `json:"clean"`
	FinishFt    float64  `json:"finish_ft"`
	ETMean      *float64 `json:"et_mean"`
	ETSD        *float64 `json:"et_sd"`
	ETMin       *float64 `json:"et_min"`
	ETMax       *float64 `json:"et_max"`
	RTMean      *float64 `json:"rt_mean"`
	RTSD        *float64 `json:"rt_sd"`
	SixtySD     *float64 `json:"et60_sd"`
	CorrectedSD *float64 `json:"et_sd_corrected"`
	Consistency string   `json:"consistency"`
}

func logStatsRun(cmd *cobra.Command, o *logStatsOptions) error {
	if err := checkFormat(o.Format, "text", "markdown", "json", "csv"); err != nil {
		return err
	}
	e, passes, leftOut, err := o.g.openLogbook(cmd)
	if err != nil {
		return err
	}
	shown, err := bounded(passes, o.Since, o.Last, o.Track)
	if err != nil {
		return err
	}
	residual, corrected := airResiduals(e, passes, shown)
	stats := logbook.Stats(shown, residual, e.Settings.DayStart, e.Settings.AbortWords)
	if o.Format == "json" || o.Format == "csv" {
		return writeStatsData(o, statsAsJSON(stats, corrected), leftOut)
	}
	if len(shown) == 0 {
		if len(passes) > 0 {
			fmt.Fprintf(o.s.Out, "No pass of %s matches --since, --last and --track.\n", e.Name(event.LogbookFile))
			return leftOut
		}
		fmt.Fprintf(o.s.Out, "%s has no passes yet.\n", e.Name(event.LogbookFile))
		return leftOut
	}
	renderStatsTable(o, stats, corrected)
	printStatsNotes(o, stats, corrected)
	return leftOut
}

// airResiduals takes the air out of the spread, with car.yaml and the
// weather of the passes: the model is fitted as a card's is (on the latest
// passes, of the last RecentPasses), and only the passes shown are
// simulated. It returns each shown pass's ET less the model's, and whether
// the fit was made; without car.yaml or a fit it returns nil, false (the
// spread is then given as run). It does not judge consistency.
func airResiduals(e *eventFolder, passes, shown []logbook.Pass) (map[string]float64, bool) {
	car, err := e.Car()
	if err != nil || len(passes) == 0 || len(shown) == 0 {
		return nil, false
	}
	trk, _ := e.Track()
	tracks, _ := e.OtherTracks()
	recent := passes[max(0, len(passes)-event.RecentPasses):]
	in := engine.CalibrateInput{Car: car, Track: trk, Tracks: tracks, Passes: recent, Now: passes[len(passes)-1].Time, DayStart: e.Settings.DayStart, Aborts: e.Settings.AbortWords, Changes: e.Settings.ChangeWords}
	fit, err := engine.Calibrate(in)
	if err != nil || len(fit.Samples) == 0 {
		return nil, false
	}
	in.Passes = shown
	return fit.Residuals(in), true
}

// statsConsistency is a group's consistency in words, judged on the spread
// corrected for the air when there is one, else on the spread as run.
func statsConsistency(s logbook.GroupStats, corrected bool) string {
	if corrected && s.CorrectedN > 0 {
		return logbook.Consistency(s.CorrectedSD, s.CorrectedN)
	}
	return logbook.Consistency(s.ETSD, s.Clean)
}

// statsAsJSON is the stats as 'log stats --format json' writes them, one
// entry per day and per session within it; a figure without enough passes
// behind it is null.
func statsAsJSON(stats []logbook.GroupStats, corrected bool) []statsJSON {
	out := []statsJSON{}
	for _, s := range stats {
		sessions := s.Kind.String()
		if s.All {
			sessions = "all"
		}
		out = append(out, statsJSON{Day: s.Day.Format("2006-01-02"), Sessions: sessions, Passes: s.Passes, Clean: s.Clean, FinishFt: s.Finish,
			ETMean: event.OptFloat(s.ETMean, s.Clean > 0, 4), ETSD: event.OptFloat(s.ETSD, s.Clean > 1, 4),
			ETMin: event.OptFloat(s.ETMin, s.Clean > 0, 4), ETMax: event.OptFloat(s.ETMax, s.Clean > 0, 4),
			RTMean: event.OptFloat(s.RTMean, s.RTN > 0, 4), RTSD: event.OptFloat(s.RTSD, s.RTN > 1, 4),
			SixtySD: event.OptFloat(s.SixtySD, s.SixtyN > 1, 4), CorrectedSD: event.OptFloat(s.CorrectedSD, s.CorrectedN > 1, 4), Consistency: statsConsistency(s, corrected)})
	}
	return out
}

// writeStatsData writes the stats as JSON or, with --format csv, as CSV
// with the JSON's names for columns (null is an empty cell), then returns
// leftOut (the rows left out of the logbook) joined with any write error.
func writeStatsData(o *logStatsOptions, out []statsJSON, leftOut error) error {
	if o.Format != "csv" {
		if err := writeJSON(o.s.Out, out); err != nil {
			return err
		}
		return leftOut
	}
	opt := func(v *float64) string {
		if v == nil {
			return ""
		}
		return fmt.Sprint(*v)
	}
	rows := [][]string{{"day", "sessions", "passes", "clean", "finish_ft", "et_mean", "et_sd", "et_min", "et_max", "rt_mean", "rt_sd", "et60_sd", "et_sd_corrected", "consistency"}} // the JSON's names
	for _, x := range out {
		rows = append(rows, []string{x.Day, x.Sessions, fmt.Sprint(x.Passes), fmt.Sprint(x.Clean), fmt.Sprint(x.FinishFt), opt(x.ETMean), opt(x.ETSD),
			opt(x.ETMin), opt(x.ETMax), opt(x.RTMean), opt(x.RTSD), opt(x.SixtySD), opt(x.CorrectedSD), x.Consistency})
	}
	return errors.Join(writeCSV(o.s.Out, rows), leftOut)
}

// renderStatsTable prints the stats as a text or markdown table. The day
// and its sessions share a column (the day's date on the row of all its
// passes): the table fits an 80-column terminal. It prints no notes.
func renderStatsTable(o *logStatsOptions, stats []logbook.GroupStats, corrected bool) {
	t := newTable(o.s, "Consistency by day and session")
	t.AppendHeader(table.Row{"Day,\nsessions", "Passes", "ET\nmean", "ET\nspread", "spread\ncorrected", "RT\nmean", "RT\nspread", "60 ft\nspread", "Consistency"})
	f3 := func(v float64, ok bool) string {
		if !ok {
			return ""
		}
		return fmt.Sprintf("%.3f", v)
	}
	for _, s := range stats {
		day := s.Kind.String()
		if s.All {
			day = s.Day.Format("2006-01-02")
			t.AppendSeparator()
		}
		passes := fmt.Sprint(s.Passes)
		if s.Clean != s.Passes {
			passes = fmt.Sprintf("%d (%d out)", s.Passes, s.Passes-s.Clean)
		}
		t.AppendRow(table.Row{day, passes, f3(s.ETMean, s.Clean > 0), f3(s.ETSD, s.Clean > 1), f3(s.CorrectedSD, s.CorrectedN > 1),
			f3(s.RTMean, s.RTN > 0), f3(s.RTSD, s.RTN > 1), f3(s.SixtySD, s.SixtyN > 1), statsConsistency(s, corrected)})
	}
	configs := alignRight(3, 8)
	compact(t)
	render(o.s, t, o.Format, configs...)
}

// printStatsNotes prints what the table's figures mean under it, and on
// the error stream a hint to bound the days when more than 30 are shown
// unbounded.
func printStatsNotes(o *logStatsOptions, stats []logbook.GroupStats, corrected bool) {
	note := "Spreads are one standard deviation, as run (no car.yaml or no weather in the logbook): the air moving through a day counts as scatter."
	if corrected {
		note = "Spreads are one standard deviation. Corrected: the ET spread once the air and track of each pass are taken out (each ET less the calibrated model's for its conditions); consistency is judged on it."
	}
	fmt.Fprintln(o.s.Out, text.Wrap(note+` Passes "7 (1 out)": 7 logged, 1 left out of the figures because its notes say it was not a full run (lifted, spun ...; see 'pitcard log list').`, o.s.width(), ""))
	fmt.Fprintln(o.s.Out, "Very consistent (≤ 0.015 s): dial it with confidence. Consistent (≤ 0.030).\nSome scatter (≤ 0.060): check the notes, tires, routine.\nInconsistent: look for lifted or spinning runs.")
	if days := countDays(stats); days > 30 && o.Since == "" && o.Last == 0 {
		fmt.Fprintf(o.s.Err, "pitcard: %d days shown: bound them with --since DATE, --last N or --track NAME\n", days)
	}
}

func countDays(stats []logbook.GroupStats) int {
	n := 0
	for _, s := range stats {
		if s.All {
			n++
		}
	}
	return n
}
