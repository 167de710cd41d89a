package main

import (
	"errors"
	"fmt"
	"math"
	"os"
	"strings"
	"time"

	"github.com/jedib0t/go-pretty/v6/table"
	"github.com/jedib0t/go-pretty/v6/text"
	"github.com/shopspring/decimal"
	"github.com/spf13/cobra"

	"pitcard/engine"
	"pitcard/event"
	"pitcard/prep"
	"pitcard/weather"
)

func newLogCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	cmd := &cobra.Command{
		Use:   "log",
		Short: "The car's logbook: add a pass from its time slip, import a season, list, stats",
		Long: `logbook.csv holds one row per pass: the time slip and the conditions it ran in.
Every row is checked; a bad one is refused with its file, line, column, value
and the rule it breaks, and nothing is written. Writes are atomic and keep the
previous logbook as logbook.csv.bak.`,
		Example: `  pitcard log add --session E1 --lane left --dial 11.52 --rt .021 --et60 1.612 --et1320 11.538 --mph1320 116.79
  pitcard log import season-2026.csv
  pitcard log list --last 10
  pitcard log stats`,
	}
	cmd.AddCommand(newLogAddCmd(s, g), newLogImportCmd(s, g), newLogListCmd(s, g), newLogStatsCmd(s, g))
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
	// The other lane's slip, when it is entered too: what decided the round.
	OppDial, OppRT, OppET string
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
		Example: `  pitcard log add --session E1 --lane left --dial 11.52 --rt .021 --et60 1.612 --et330 4.689 \
      --et660 7.321 --mph660 92.44 --et1000 9.605 --et1320 11.538 --mph1320 116.79
  pitcard log add --session T2 --lane right --et60 1.65 --et1320 11.71 --mph1320 115.2 --notes "lifted early"`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error { return logAddRun(cmd, o) },
	}
	fl := cmd.Flags()
	fl.StringVar(&o.Date, "date", "", "date of the pass, YYYY-MM-DD (default: today)")
	fl.StringVar(&o.Time, "time", "", "time of the pass, HH:MM (default: now)")
	fl.StringVar(&o.Track, "track", "", "track name (default: track.yaml's)")
	fl.StringVar(&o.Session, "session", "", "T1, T2 ... for time trials, E1, E2 ... for rounds, or test")
	fl.StringVar(&o.Lane, "lane", "", "left or right")
	fl.StringVar(&o.Dial, "dial", "", "dial-in, s (blank for a time trial without one)")
	fl.StringVar(&o.RT, "rt", "", "reaction time, s (negative = red light)")
	fl.StringVar(&o.ET60, "et60", "", "60-ft time, s")
	fl.StringVar(&o.ET330, "et330", "", "330-ft time, s")
	fl.StringVar(&o.ET660, "et660", "", "eighth-mile ET, s")
	fl.StringVar(&o.ET1000, "et1000", "", "1000-ft time, s")
	fl.StringVar(&o.ET1, "et1320", "", "quarter-mile ET, s")
	fl.StringVar(&o.MPH660, "mph660", "", "eighth-mile trap speed, mph")
	fl.StringVar(&o.MPH1320, "mph1320", "", "quarter-mile trap speed, mph")
	fl.StringVar(&o.Weight, "weight", "", "car and driver as run, lb (default: car.yaml's weight_lb)")
	fl.StringVar(&o.Notes, "notes", "", "free text: lifted, pedaled, new tires ...")
	fl.StringVar(&o.OppDial, "opponent-dial", "", "the other lane's dial-in from its slip (with --opponent-rt and --opponent-et: what decided the round)")
	fl.StringVar(&o.OppRT, "opponent-rt", "", "the other lane's reaction time from its slip, s")
	fl.StringVar(&o.OppET, "opponent-et", "", "the other lane's ET from its slip, s")
	o.reading.bind(cmd)
	return cmd
}

func logAddRun(cmd *cobra.Command, o *logAddOptions) error {
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	if err := e.Writable(); err != nil {
		return err
	}
	trk, trkErr := e.Track()
	now := o.s.Now()
	date, clock := o.Date, o.Time
	if date == "" {
		date = now.Format(weather.DateLayout)
	}
	if clock == "" {
		clock = now.Format(weather.TimeLayout)
	}
	track := o.Track
	if track == "" {
		if trkErr != nil {
			return trkErr
		}
		track = trk.Name
	}
	weight := o.Weight
	if weight == "" {
		if car, err := e.Car(); err == nil {
			weight = fmt.Sprint(car.WeightLb)
		}
	}
	f := engine.SlipFields{Values: map[string]string{
		"date": date, "time": clock, "track": track, "session": o.Session, "lane": o.Lane,
		"dial": o.Dial, "rt": o.RT, "et60": o.ET60, "et330": o.ET330, "et660": o.ET660, "et1000": o.ET1000, "et1320": o.ET1,
		"mph660": o.MPH660, "mph1320": o.MPH1320, "weight_lb": weight, "notes": o.Notes,
	}, Names: map[string]string{}}
	for c := range f.Values {
		f.Names[c] = "--" + strings.ReplaceAll(strings.TrimSuffix(c, "_lb"), "_", "-")
	}
	f.Names["date"], f.Names["time"] = "--date", "--time"
	if o.Session == "" || o.Lane == "" {
		return userErrf("--session and --lane are required (e.g. --session E1 --lane left)")
	}
	p, err := engine.ParsePass(f, time.Local)
	if err != nil {
		return err
	}
	// A slip is logged after its pass: a date past tomorrow is a typo
	// (2500 for 2025), and would borrow another day's weather.
	if limit := now.Add(36 * time.Hour); p.Time.After(limit) {
		return &weather.InputError{Field: "--date", Value: o.Date,
			Reason: fmt.Sprintf("is in the future (today is %s): a slip is logged after its pass", now.Format("2006-01-02"))}
	}
	// The conditions: the nearest weather reading, with any flag given replacing its field.
	elev := trk.Elevation()
	if o.reading.Elevation != "" {
		if elev, err = o.reading.SiteElevation(e.Settings.Units, 0, false); err != nil {
			return err
		}
	}
	var base *weather.Reading
	source := ""
	if log, err := e.WeatherLog(elev); err != nil {
		return err
	} else if r, ok := nearestReading(log, p.Time, time.Hour); ok {
		base, source = &r, "the weather log's "+r.Time.Format("15:04")+" reading"
	} else if len(log) > 0 && sameDate(log[len(log)-1].Time, p.Time) {
		// No reading within the hour, but the day's trend reaches the pass.
		if f, err := weather.ForecastAt(log, p.Time, elev); err == nil && f.Trusted {
			base, source = &f.Reading, "the weather log's trend ("+strings.Join(f.Notes, "; ")+")"
		}
	}
	if base != nil || o.reading.Given() {
		r, err := o.reading.ReadingAt(e.Settings.Units, p.Time, base)
		if err != nil {
			return err
		}
		if err := event.ValidateFields(r, elev); err != nil {
			return err
		}
		a := r.Derive(elev)
		r.Baro, r.BaroKind, r.RH, r.DewPointSet, r.Time = a.Station, weather.StationPressure, a.RH, false, p.Time
		p.Air, p.HasAir = r, true
		if source == "" {
			source = "the flags"
		} else if o.reading.Given() {
			source += ", with the flags given"
		}
	}
	decided := "" // the other lane's slip, checked before anything is written
	if o.OppDial != "" || o.OppRT != "" || o.OppET != "" {
		if decided, err = decidedBy(p, o.OppDial, o.OppRT, o.OppET, e.Settings); err != nil {
			return err
		}
	}
	n, kept, err := e.SaveLogbook([]engine.Pass{p})
	if err != nil {
		return err
	}
	defer func() {
		if decided != "" {
			fmt.Fprintln(o.s.Out, prep.Wrap(decided, o.s.width(), "  "))
		}
	}()
	if w := engine.DialWarning(p); w != "" {
		fmt.Fprintln(o.s.Err, "pitcard: warning:", w)
	}

	if kept != nil {
		fmt.Fprintln(o.s.Err, "pitcard: warning:", kept)
	}
	et, ft, _ := p.Finish()
	fmt.Fprintf(o.s.Out, "Logged %s %s, %s lane: %s s at %.0f ft (%s in %s).\n",
		p.Time.Format("2006-01-02 15:04"), p.Session.Long(), p.Lane, engine.FormatSeconds(et, 3), ft, engine.Plural(n, "pass"), e.Name(event.LogbookFile))
	if p.HasAir {
		fmt.Fprintf(o.s.Out, "Conditions from %s: %s, density altitude %s.\n", source,
			p.Air.Temp.Format(e.Settings.Units.Temp, 1), p.Air.Derive(elev).DensityAltitude.Format(e.Settings.Units.Length))
	} else {
		fmt.Fprintln(o.s.Err, "pitcard: warning: no weather reading within an hour of the pass and no reading flags: the pass is logged without its conditions, and the model cannot learn from its air")
	}
	return nil
}

// altimeterLooking warns when rows' barometer figures look like sea-level
// (altimeter) settings for their track's elevation: the logbook holds
// station pressure, and mixing the two is the commonest weather mistake.
func altimeterLooking(e *eventFolder, passes []engine.Pass, file string) string {
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
		"the logbook holds station pressure: convert them, or the air of those passes is wrong", file, engine.Plural(len(lines), "row"), strings.Join(shown, ", "))
}

func sameDate(a, b time.Time) bool { return a.Format("2006-01-02") == b.Format("2006-01-02") }

// nearestReading is the reading of log closest in time to t, within tol.
func nearestReading(log []weather.Reading, t time.Time, tol time.Duration) (weather.Reading, bool) {
	best, bestGap := weather.Reading{}, time.Duration(math.MaxInt64)
	for _, r := range log {
		gap := r.Time.Sub(t)
		if gap < 0 {
			gap = -gap
		}
		if gap < bestGap {
			best, bestGap = r, gap
		}
	}
	return best, bestGap <= tol
}

type logImportOptions struct {
	g *globalOptions
	s *IOStreams
}

func newLogImportCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &logImportOptions{g: g, s: s}
	return &cobra.Command{
		Use:   "import FILE",
		Short: "Import passes from a CSV file in the logbook's columns (all or nothing)",
		Long: `Reads FILE, a CSV with logbook.csv's header (the metric columns temp_c,
baro_hpa, track_temp_c, wind_kmh and weight_kg are accepted), checks every
row, and adds them all to the logbook, or none: when any row is bad, or a
pass is already in the logbook, every problem is listed and nothing is written.`,
		Example: "  pitcard log import season-2026.csv",
		Args:    cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			e, err := o.g.open(cmd)
			if err != nil {
				return err
			}
			if err := e.Writable(); err != nil {
				return err
			}
			fh, err := os.Open(args[0])
			if err != nil {
				return userErrf("cannot read %s: %v", args[0], errors.Unwrap(err))
			}
			defer fh.Close()
			src, err := engine.ReadLogbookFile(fh, args[0], time.Local)
			if err != nil {
				return err
			}
			passes := src.Passes
			if len(src.Bad) > 0 {
				// All or nothing: list every bad row, and the good rows that are already logged.
				problems := append(engine.RowErrors(nil), src.Bad...)
				if cur, _ := e.Logbook(); len(cur) > 0 {
					seen := map[string]engine.Pass{}
					for _, p := range cur {
						seen[p.Key()] = p
					}
					for _, p := range passes {
						if old, ok := seen[p.Key()]; ok {
							problems = append(problems, event.DuplicateOf(p, old, e.Name(event.LogbookFile)))
						}
					}
				}
				return fmt.Errorf("%w\nNothing was imported", problems)
			}
			if len(passes) == 0 {
				return userErrf("%s has no passes to import", args[0])
			}
			if w := altimeterLooking(e, passes, args[0]); w != "" {
				fmt.Fprintln(o.s.Err, "pitcard: warning:", w)
			}
			n, kept, err := e.SaveLogbook(passes, src.Extra...)
			if err != nil {
				return err
			}
			if kept != nil {
				fmt.Fprintln(o.s.Err, "pitcard: warning:", kept)
			}
			fmt.Fprintf(o.s.Out, "Imported %s from %s; %s now holds %d.\n", engine.Plural(len(passes), "pass"), args[0], e.Name(event.LogbookFile), n)
			return nil
		},
	}
}

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

type passJSON struct {
	Time     string            `json:"time"`
	Track    string            `json:"track"`
	Session  string            `json:"session"`
	Lane     string            `json:"lane"`
	Dial     *string           `json:"dial"`
	RT       *string           `json:"rt"`
	ET       map[string]string `json:"et"`
	MPH      map[string]string `json:"mph"`
	TempF    *float64          `json:"temp_f"`
	BaroInHg *float64          `json:"baro_inhg"`
	RHPct    *float64          `json:"humidity_pct"`
	TrackF   *float64          `json:"track_temp_f"`
	DAFt     *float64          `json:"density_altitude_ft"`
	WeightLb *float64          `json:"weight_lb"`
	Notes    string            `json:"notes"`
}

func logListRun(cmd *cobra.Command, o *logListOptions) error {
	if err := checkFormat(o.Format, "text", "markdown", "json", "csv"); err != nil {
		return err
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	passes, leftOut := e.Logbook()
	if !event.OnlyLeftOut(leftOut) {
		return leftOut
	}
	trk, _ := e.Track()
	if o.Last > 0 && len(passes) > o.Last {
		passes = passes[len(passes)-o.Last:]
	}
	switch o.Format {
	case "csv":
		if err := engine.WriteLogbook(o.s.Out, passes); err != nil {
			return err
		}
		return leftOut
	case "json":
		out := make([]passJSON, len(passes))
		for i, p := range passes {
			out[i] = toPassJSON(p, trk)
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
	u := e.Settings.Units
	t := newTable(o.s, fmt.Sprintf("Logbook (%s), last %s", e.Name(event.LogbookFile), engine.Plural(len(passes), "pass")))
	header := table.Row{"Date", "Time", "Session", "Lane", "Dial", "RT", "60 ft", "1/8", "mph", "1/4", "mph", "DA", "Notes"}
	if o.Wide {
		header = table.Row{"Date", "Time", "Session", "Lane", "Dial", "RT", "60 ft", "330", "1/8", "mph", "1000", "1/4", "mph", "DA", "Notes"}
	}
	t.AppendHeader(header)
	for _, p := range passes {
		da := ""
		if p.HasAir {
			da = p.Air.Derive(elevationFor(p, trk)).DensityAltitude.Format(u.Length)
		}
		row := table.Row{p.Time.Format("2006-01-02"), p.Time.Format("15:04"), p.Session.String(), p.Lane, sec(p.Dial, 2), sec(p.RT, 3)}
		for i, ft := range engine.Timers {
			if !o.Wide && (ft == 330 || ft == 1000) {
				continue
			}
			row = append(row, sec(p.ET[i], 3))
			if ft == 660 {
				row = append(row, sec(p.MPH660, 2))
			}
		}
		row = append(row, sec(p.MPH1320, 2), strings.TrimSuffix(da, " ft"), p.Notes)
		t.AppendRow(row)
	}
	n := len(header)
	configs := append([]table.ColumnConfig{{Number: n, WidthMax: 16}}, alignRight(5, n-1)...)
	compact(t)
	render(o.s, t, o.Format, configs...)
	if o.Format == "text" {
		fmt.Fprintf(o.s.Out, "Session: T time trial, E elimination round. DA: density altitude, %s.\n--wide adds the 330 and 1000 ft timers.\n", u.Length)
	}
	return leftOut
}

func alignRight(from, to int) []table.ColumnConfig {
	var c []table.ColumnConfig
	for n := from; n <= to; n++ {
		c = append(c, table.ColumnConfig{Number: n, Align: text.AlignRight})
	}
	return c
}

// elevationFor is the elevation of the track a pass ran at: this folder's
// track, or sea level for another (conditions are station pressure, so the
// density needs no elevation; only altimeter conversions would).
func elevationFor(p engine.Pass, trk engine.Track) weather.Length {
	if strings.EqualFold(p.Track, trk.Name) {
		return trk.Elevation()
	}
	return 0
}

// sec prints a slip time with at least min decimals, or "" when not timed.
func sec(d decimal.NullDecimal, min int) string {
	if !d.Valid {
		return ""
	}
	return engine.FormatSeconds(d.Decimal, min)
}

func optSec(d decimal.NullDecimal) *string {
	if !d.Valid {
		return nil
	}
	s := engine.FormatSeconds(d.Decimal, 0)
	return &s
}

func optFloat(v float64, ok bool, dec int) *float64 {
	if !ok {
		return nil
	}
	r := round(v, dec)
	return &r
}

func toPassJSON(p engine.Pass, trk engine.Track) passJSON {
	j := passJSON{Time: p.Time.Format(time.RFC3339), Track: p.Track, Session: p.Session.String(), Lane: string(p.Lane),
		Dial: optSec(p.Dial), RT: optSec(p.RT), ET: map[string]string{}, MPH: map[string]string{}, Notes: p.Notes}
	for i, ft := range engine.Timers {
		if p.ET[i].Valid {
			j.ET[fmt.Sprintf("%.0f", ft)] = engine.FormatSeconds(p.ET[i].Decimal, 0)
		}
	}
	if p.MPH660.Valid {
		j.MPH["660"] = engine.FormatSeconds(p.MPH660.Decimal, 0)
	}
	if p.MPH1320.Valid {
		j.MPH["1320"] = engine.FormatSeconds(p.MPH1320.Decimal, 0)
	}
	if p.HasAir {
		j.TempF = optFloat(p.Air.Temp.Fahrenheit(), true, 2)
		j.BaroInHg = optFloat(p.Air.Baro.InHg(), true, 3)
		j.RHPct = optFloat(p.Air.RH*100, true, 1)
		j.DAFt = optFloat(p.Air.Derive(elevationFor(p, trk)).DensityAltitude.Feet(), true, 0)
	}
	j.TrackF = optFloat(p.Air.TrackTemp.Fahrenheit(), p.Air.HasTrack, 1)
	j.WeightLb = optFloat(p.WeightLb, p.WeightLb > 0, 1)
	return j
}

type logStatsOptions struct {
	g      *globalOptions
	s      *IOStreams
	Format string
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
		Example: "  pitcard log stats\n  pitcard log stats --demo --format json",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, _ []string) error { return logStatsRun(cmd, o) },
	}
	cmd.Flags().StringVar(&o.Format, "format", "text", "text, markdown or json")
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
	if err := checkFormat(o.Format, "text", "markdown", "json"); err != nil {
		return err
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	passes, leftOut := e.Logbook()
	if !event.OnlyLeftOut(leftOut) {
		return leftOut
	}
	// With car.yaml and the weather of the passes, take the air out of the spread.
	var residual map[string]float64
	corrected := false
	if car, err := e.Car(); err == nil && len(passes) > 0 {
		trk, _ := e.Track()
		tracks, _ := e.OtherTracks()
		in := engine.CalibrateInput{Car: car, Track: trk, Tracks: tracks, Passes: passes, Now: passes[len(passes)-1].Time}
		if fit, err := engine.Calibrate(in); err == nil && len(fit.Samples) > 0 {
			residual, corrected = fit.Residuals(in), true
		}
	}
	stats := engine.Stats(passes, residual)
	judge := func(s engine.GroupStats) string {
		if corrected && s.CorrectedN > 0 {
			return engine.Consistency(s.CorrectedSD, s.CorrectedN)
		}
		return engine.Consistency(s.ETSD, s.Clean)
	}
	if o.Format == "json" {
		out := []statsJSON{}
		for _, s := range stats {
			sessions := s.Kind.String()
			if s.All {
				sessions = "all"
			}
			out = append(out, statsJSON{Day: s.Day.Format("2006-01-02"), Sessions: sessions, Passes: s.Passes, Clean: s.Clean, FinishFt: s.Finish,
				ETMean: optFloat(s.ETMean, s.Clean > 0, 4), ETSD: optFloat(s.ETSD, s.Clean > 1, 4),
				ETMin: optFloat(s.ETMin, s.Clean > 0, 4), ETMax: optFloat(s.ETMax, s.Clean > 0, 4),
				RTMean: optFloat(s.RTMean, s.RTN > 0, 4), RTSD: optFloat(s.RTSD, s.RTN > 1, 4),
				SixtySD: optFloat(s.SixtySD, s.SixtyN > 1, 4), CorrectedSD: optFloat(s.CorrectedSD, s.CorrectedN > 1, 4), Consistency: judge(s)})
		}
		if err := writeJSON(o.s.Out, out); err != nil {
			return err
		}
		return leftOut
	}
	if len(passes) == 0 {
		fmt.Fprintf(o.s.Out, "%s has no passes yet.\n", e.Name(event.LogbookFile))
		return leftOut
	}
	t := newTable(o.s, "Consistency by day and session")
	t.AppendHeader(table.Row{"Day", "Sessions", "Passes", "ET\nmean", "ET\nspread", "spread\ncorrected", "RT\nmean", "RT\nspread", "60 ft\nspread", "Consistency"})
	f3 := func(v float64, ok bool) string {
		if !ok {
			return ""
		}
		return fmt.Sprintf("%.3f", v)
	}
	for _, s := range stats {
		day, sessions := "", " "+s.Kind.String()
		if s.All {
			day, sessions = s.Day.Format("2006-01-02"), "all"
			t.AppendSeparator()
		}
		passes := fmt.Sprint(s.Passes)
		if s.Clean != s.Passes {
			passes = fmt.Sprintf("%d (%d ok)", s.Passes, s.Clean)
		}
		t.AppendRow(table.Row{day, sessions, passes, f3(s.ETMean, s.Clean > 0), f3(s.ETSD, s.Clean > 1), f3(s.CorrectedSD, s.CorrectedN > 1),
			f3(s.RTMean, s.RTN > 0), f3(s.RTSD, s.RTN > 1), f3(s.SixtySD, s.SixtyN > 1), judge(s)})
	}
	configs := alignRight(4, 9)
	compact(t)
	render(o.s, t, o.Format, configs...)
	if corrected {
		fmt.Fprintln(o.s.Out, "Spreads are one standard deviation. Corrected: the ET spread once the air and track of each pass are\ntaken out (each ET less the calibrated model's for its conditions); consistency is judged on it.")
	} else {
		fmt.Fprintln(o.s.Out, "Spreads are one standard deviation, as run (no car.yaml or no weather in the logbook): the air moving\nthrough a day counts as scatter.")
	}
	fmt.Fprintln(o.s.Out, "Very consistent (≤ 0.015 s): dial it with confidence. Consistent (≤ 0.030).\nSome scatter (≤ 0.060): check the notes, tires, routine.\nInconsistent: look for lifted or spinning runs.")
	return leftOut
}

// decidedBy says what decided a round, from our pass and the other lane's
// slip: the reason (a red light, a breakout, the finish) and where the
// margin came from, the package of reaction time and time over the dial in
// each lane. The rules are Settle's.
func decidedBy(p engine.Pass, dial, rt, et string, s settings) (string, error) {
	if dial == "" || rt == "" || et == "" {
		return "", userErrf("give the other lane's slip whole: --opponent-dial, --opponent-rt and --opponent-et")
	}
	fin, _, ok := p.Finish()
	if !p.Dial.Valid || !p.RT.Valid || !ok {
		return "", userErrf("what decided the round needs our dial, reaction time and ET too (--dial, --rt, --et1320)")
	}
	var them engine.LaneRun
	var err error
	for _, f := range []struct {
		flag, v string
		dst     *decimal.Decimal
	}{{"--opponent-dial", dial, &them.Dial}, {"--opponent-rt", rt, &them.RT}, {"--opponent-et", et, &them.ET}} {
		if *f.dst, err = engine.ParseSeconds(f.flag, f.v); err != nil {
			return "", err
		}
	}
	us := engine.LaneRun{Dial: p.Dial.Decimal, RT: p.RT.Decimal, ET: fin}
	left, right := us, them
	if p.Lane == engine.Right {
		left, right = them, us
	}
	o, err := engine.Settle(left, right, engine.RaceRules{Tree: s.Tree, RTZero: engine.FromGreen})
	if err != nil {
		return "", err
	}
	ours, theirs := o.Left, o.Right
	if p.Lane == engine.Right {
		ours, theirs = o.Right, o.Left
	}
	verdict := "You won"
	switch o.Winner {
	case "":
		verdict = "No winner"
	case engine.Left, engine.Right:
		if (o.Winner == engine.Right) != (p.Lane == engine.Right) {
			verdict = "You lost"
		}
	}
	pkg := func(x engine.LaneResult) string {
		return fmt.Sprintf("%s reaction, %s over the dial: %s", engine.FormatSeconds(x.Reaction, 3), signedSeconds(x.OverDial), signedSeconds(x.Package))
	}
	return fmt.Sprintf("%s: %s (%s). Packages: yours %s; theirs %s.", verdict, o.Reason, o.Explanation, pkg(ours), pkg(theirs)), nil
}

func signedSeconds(d decimal.Decimal) string {
	if d.IsNegative() {
		return engine.FormatSeconds(d, 3)
	}
	return "+" + engine.FormatSeconds(d, 3)
}
