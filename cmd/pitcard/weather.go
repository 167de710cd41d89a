package main

import (
	"bytes"
	"errors"
	"fmt"
	"time"

	"github.com/jedib0t/go-pretty/v6/table"
	"github.com/spf13/cobra"

	"pitcard/colmap"
	"pitcard/entry"
	"pitcard/event"
	"pitcard/internal/text"
	"pitcard/weather"
)

func newWeatherCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	cmd := &cobra.Command{
		Use:   "weather",
		Short: "The weather log: add readings through the day (or a stream), import a meter's file, list, forecast the air at call time",
		Long: `weather.csv keeps the readings a crew takes through the day. 'add' appends one,
'list' shows them with their density altitude, and 'forecast' extends the
recent trend to the time your round will be called.`,
		Example: `  pitcard weather add --temp 86F --baro 28.95 --humidity 38% --track-temp 121F
  my-logger | pitcard weather add -
  pitcard weather import meter-export.csv --map meter-map.yaml
  pitcard weather list
  pitcard weather forecast --at 21:40`,
	}
	cmd.AddCommand(newWeatherAddCmd(s, g), newWeatherImportCmd(s, g), newWeatherListCmd(s, g), newWeatherForecastCmd(s, g))
	groupCmd(cmd)
	return cmd
}

// openWeather opens the folder and its weather log at the track's elevation
// (or --elevation): what list and forecast both start from.
func openWeather(cmd *cobra.Command, g *globalOptions, elevFlag string) (*eventFolder, weather.Length, string, []weather.Reading, error) {
	e, err := g.open(cmd)
	if err != nil {
		return nil, 0, "", nil, err
	}
	elev, trackName, err := entry.SiteElevation(e, entry.ReadingFields{Elevation: elevFlag})
	if err != nil {
		return nil, 0, "", nil, err
	}
	log, err := e.WeatherLog(elev)
	return e, elev, trackName, log, err
}

type weatherAddOptions struct {
	g       *globalOptions
	s       *IOStreams
	reading readingFlags
	Time    string
	Note    string
	Replace bool
}

func newWeatherAddCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &weatherAddOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "add [-]",
		Short: "Append one reading to weather.csv (or, with -, every reading piped in)",
		Long: `Appends one reading to the folder's weather.csv. The reading is checked first;
a bad value is refused with the field, the value and the valid range, and
nothing is written. The file is replaced atomically, with the previous version
kept as weather.csv.bak.

With - it reads readings from standard input, one per line, as it comes (a
logging script or a serial-port reader can pipe into it): each line in the
flags' form, key=value (temp=88F baro=28.92inHg humidity=40%, time=20:41,
notes="in quotes"), or CSV rows under a header line in weather.csv's columns.
Each line is checked and written on its own; a bad line is reported with its
number and skipped, and the command exits 2 at the end if any was bad. A
line without time= is read at the moment it arrives; with --replace a
reading in a minute already logged takes its place (a logger reading every
few seconds keeps each minute's latest), without it the later one is
reported and skipped.`,
		Example: `  pitcard weather add --temp 86F --baro 28.95inHg --humidity 38% --wind 6mph --wind-from 210 --track-temp 121F
  pitcard weather add --time 18:30 --temp 31C --baro 980hPa --dewpoint 11C
  my-logger | pitcard weather add -`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if len(args) == 1 {
				if args[0] != "-" {
					return userErrf("weather add takes - (readings from standard input) or flags, not %q", args[0])
				}
				return weatherStreamRun(cmd, o)
			}
			return weatherAddRun(cmd, o)
		},
	}
	o.reading.bind(cmd)
	cmd.Flags().StringVar(&o.Time, "time", "", "time of the reading, HH:MM on today's race day or 'YYYY-MM-DD HH:MM' (default: now)")
	cmd.Flags().StringVar(&o.Note, "notes", "", "free text for the notes column")
	cmd.Flags().StringVar(&o.Note, "note", "", "")
	deprecate(cmd.Flags(), "note", "use --notes (as on 'log add')")
	cmd.Flags().BoolVar(&o.Replace, "replace", false, "replace a reading already logged in the same minute")
	return cmd
}

func weatherAddRun(cmd *cobra.Command, o *weatherAddOptions) error {
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	added, err := entry.AddReading(e, entry.NewReading{Fields: o.reading.ReadingFields, Time: o.Time, Notes: o.Note, Replace: o.Replace}, o.s.Now())
	if err != nil {
		return err
	}
	for _, w := range added.Warnings {
		o.s.warn(w)
	}
	r := added.Reading
	a := r.Derive(added.Elevation)
	u := e.Settings.Units
	fmt.Fprintf(o.s.Out, "Added the %s reading to %s (%s): density altitude %s, %s, %.0f %% RH.\n",
		r.Time.Format("15:04"), e.Name(event.WeatherFile), text.Plural(added.Count, "reading"), a.DensityAltitude.FormatDensityAltitude(u.Length), r.Temp.Format(u.Temp, 1), a.RH*100)
	return nil
}

// weatherStreamRun is 'weather add -': readings from standard input.
func weatherStreamRun(cmd *cobra.Command, o *weatherAddOptions) error {
	if o.reading.Given() || o.Time != "" || o.Note != "" {
		return userErrf("give the readings on standard input or as flags, not both")
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	if err := e.Writable(); err != nil {
		return err
	}
	u := e.Settings.Units
	added := 0
	bad, err := entry.StreamReadings(e, o.s.In, o.s.Now, o.Replace, func(l entry.StreamLine) {
		if l.Err != nil {
			fmt.Fprintf(o.s.Err, "pitcard: %v (skipped)\n", l.Err)
			return
		}
		added++
		r := l.Added.Reading
		fmt.Fprintf(o.s.Out, "line %d: added the %s reading: density altitude %s, %s.\n", l.Line, r.Time.Format("15:04"),
			r.Derive(l.Added.Elevation).DensityAltitude.FormatDensityAltitude(u.Length), r.Temp.Format(u.Temp, 1))
	})
	if err != nil {
		return err
	}
	fmt.Fprintf(o.s.Out, "Added %s to %s", text.Plural(added, "reading"), e.Name(event.WeatherFile))
	if bad > 0 {
		fmt.Fprintf(o.s.Out, "; %s skipped (see above).\n", text.Plural(bad, "bad line"))
		return userErrf("standard input: %s not added", text.Plural(bad, "bad line"))
	}
	fmt.Fprintln(o.s.Out, ".")
	return nil
}

type weatherListOptions struct {
	g      *globalOptions
	s      *IOStreams
	Format string
	Map    string
	Elev   string
}

func newWeatherListCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &weatherListOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:     "list",
		Short:   "List the weather log with each reading's density altitude",
		Example: "  pitcard weather list\n  pitcard weather list --demo --format markdown",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, _ []string) error { return weatherListRun(cmd, o) },
	}
	cmd.Flags().StringVar(&o.Format, "format", "text", "text, markdown, json or csv (weather.csv's columns, or --map's layout)")
	cmd.Flags().StringVar(&o.Map, "map", "", "with --format csv: write in this column map's layout")
	cmd.Flags().StringVar(&o.Elev, "elevation", "", "track elevation (default: track.yaml)")
	withOut(cmd, s)
	return cmd
}

func weatherListRun(cmd *cobra.Command, o *weatherListOptions) error {
	if err := checkFormat(o.Format, "text", "markdown", "json", "csv"); err != nil {
		return err
	}
	if o.Map != "" && o.Format != "csv" {
		return userErrf("--map writes CSV: give --format csv with it")
	}
	e, elev, trackName, log, err := openWeather(cmd, o.g, o.Elev)
	if bad := new(weather.BadReadings); errors.As(err, &bad) {
		// The rows that read are listed; the others are named after them
		// and the command exits 2. The CSV copy would drop them: refused.
		if o.Format == "csv" {
			return err
		}
		return errors.Join(weatherListPrint(o, e, elev, trackName, log), err)
	}
	if err != nil {
		return err
	}
	return weatherListPrint(o, e, elev, trackName, log)
}

// weatherListPrint lists the readings in the format asked for.
func weatherListPrint(o *weatherListOptions, e *eventFolder, elev weather.Length, trackName string, log []weather.Reading) error {
	if o.Format == "csv" {
		var buf bytes.Buffer
		if err := weather.WriteLog(&buf, log); err != nil {
			return err
		}
		if o.Map == "" {
			_, err := o.s.Out.Write(buf.Bytes())
			return err
		}
		m, err := readMap(o.Map, colmap.Weather)
		if err != nil {
			return err
		}
		return m.Export(o.s.Out, buf.Bytes())
	}
	if o.Format == "json" {
		out := make([]airReport, len(log))
		for i, r := range log {
			out[i] = newAirReport(r, elev, 0, false)
		}
		return writeJSON(o.s.Out, out)
	}
	if len(log) == 0 {
		fmt.Fprintf(o.s.Out, "%s has no readings yet: add one with 'pitcard weather add'.\n", e.Name(event.WeatherFile))
		return nil
	}
	u := e.Settings.Units
	t := newTable(o.s, fmt.Sprintf("Weather log, %s (%s)", trackName, e.Name(event.WeatherFile)))
	t.AppendHeader(table.Row{"Time", "Air", "Station", "RH", "Dew pt", "Wind", "Track", "DA", "Notes"})
	lastDay := ""
	for _, r := range log {
		a := r.Derive(elev)
		when := r.Time.Format("15:04")
		if d := r.Time.Format("2006-01-02"); d != lastDay {
			when, lastDay = d+" "+when, d
		}
		track := ""
		if r.HasTrack {
			track = r.TrackTemp.Format(u.Temp, 0)
		}
		t.AppendRow(table.Row{when, r.Temp.Format(u.Temp, 1), a.Station.Format(u.Pressure), fmt.Sprintf("%.0f %%", a.RH*100),
			a.DewPoint.Format(u.Temp, 0), windText(r, u), track,
			a.DensityAltitude.FormatDensityAltitude(u.Length), r.Note})
	}
	compact(t)
	render(o.s, t, o.Format)
	return nil
}

type weatherForecastOptions struct {
	g      *globalOptions
	s      *IOStreams
	At     string
	Format string
	Elev   string
}

func newWeatherForecastCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &weatherForecastOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "forecast",
		Short: "Forecast the air at a time from the weather log's recent trend",
		Long: fmt.Sprintf(`Extends the straight-line trend of the last %s of readings to the time given,
at most %s past the last reading, and says how many readings and minutes of
trend it leaned on. A log too short for a trend (fewer than %d readings over
%s) carries the last reading forward and says so; a log whose readings scatter
too much around their trend is flagged as not to be trusted.`,
			"2 h", "3 h", weather.MinTrendReadings, "20 min"),
		Example: "  pitcard weather forecast --at 21:40\n  pitcard weather forecast --demo --at 21:15 --format json",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, _ []string) error { return weatherForecastRun(cmd, o) },
	}
	cmd.Flags().StringVar(&o.At, "at", "", "time to forecast, HH:MM (on the day of the last reading) or 'YYYY-MM-DD HH:MM'")
	cmd.Flags().StringVar(&o.Format, "format", "text", "text, markdown or json")
	cmd.Flags().StringVar(&o.Elev, "elevation", "", "track elevation (default: track.yaml)")
	withOut(cmd, s)
	return cmd
}

type forecastJSON struct {
	At           string    `json:"at"`
	ReadingsUsed int       `json:"readings_used"`
	TrendMinutes float64   `json:"trend_minutes"`
	AheadMinutes float64   `json:"ahead_minutes"`
	DAErrorFt    float64   `json:"density_altitude_error_ft"`
	Trusted      bool      `json:"trusted"`
	Notes        []string  `json:"notes"`
	Air          airReport `json:"air"`
}

func weatherForecastRun(cmd *cobra.Command, o *weatherForecastOptions) error {
	if err := checkFormat(o.Format, "text", "markdown", "json"); err != nil {
		return err
	}
	if o.At == "" {
		return userErrf("--at is required: the time to forecast, e.g. --at 21:40")
	}
	e, elev, trackName, log, err := openWeather(cmd, o.g, o.Elev)
	if bad := new(weather.BadReadings); errors.As(err, &bad) {
		// the forecast from the rows that read; the others named after it
		return errors.Join(weatherForecastPrint(o, e, elev, trackName, log), err)
	}
	if err != nil {
		return err
	}
	return weatherForecastPrint(o, e, elev, trackName, log)
}

// weatherForecastPrint forecasts the air at --at from log and prints it.
func weatherForecastPrint(o *weatherForecastOptions, e *eventFolder, elev weather.Length, trackName string, log []weather.Reading) error {
	if len(log) == 0 {
		return userErrf("%s has no readings: add some with 'pitcard weather add' first", e.Name(event.WeatherFile))
	}
	when, err := callTime(o.At, log[len(log)-1].Time, e.Settings.DayStart)
	if err != nil {
		return err
	}
	trk, _ := e.Track()
	f, err := weather.ForecastAt(log, when, elev)
	if err != nil {
		return event.FlagErr(err, "--at")
	}
	if o.Format == "json" {
		return writeJSON(o.s.Out, forecastJSON{
			At: when.Format(time.RFC3339), ReadingsUsed: f.Used, TrendMinutes: round(f.Span.Minutes(), 1),
			AheadMinutes: round(f.Ahead.Minutes(), 1), DAErrorFt: weather.RoundDensityAltitude(f.DAError.Feet(), weather.UnitFt), Trusted: f.Trusted,
			Notes: f.Notes, Air: newAirReport(f.Reading, elev, trk.HeadingDeg, trackName != ""),
		})
	}
	title := fmt.Sprintf("Forecast air at %s, %s", trackName, when.Format("2006-01-02 15:04"))
	t := newTable(o.s, title)
	airRows(t, f.Reading, f.Air, elev, true, trk.HeadingDeg, trackName != "", e.Settings.Units, "forecast from the readings' trend")
	render(o.s, t, o.Format)
	trust := "trusted"
	if !f.Trusted {
		trust = "NOT trusted"
	}
	switch {
	case f.Used == 1:
		fmt.Fprintf(o.s.Out, "Leaned on one reading, carried as it is (no trend); %s.\n", trust)
	case f.Interval:
		fmt.Fprintf(o.s.Out, "Between 2 readings %.0f min apart; %s.\n", f.Span.Minutes(), trust)
	default:
		fmt.Fprintf(o.s.Out, "Leaned on %s, %.0f min of trend; %s.\n", text.Plural(f.Used, "reading"), f.Span.Minutes(), trust)
	}
	if f.DAError > 0 {
		fmt.Fprintf(o.s.Out, "Density altitude ± %s (one standard error).\n", f.DAError.FormatDensityAltitude(e.Settings.Units.Length))
	}
	for _, n := range f.Notes {
		fmt.Fprintln(o.s.Out, text.Wrap("- "+n, o.s.width(), "  "))
	}
	return nil
}

// callTime reads a time of day for a forecast: on the race day of the last
// reading (a time before day_starts is the night after midnight).
func callTime(s string, last time.Time, start weather.DayStart) (time.Time, error) {
	t, err := entry.ParseWhen(s, start.Day(last), start)
	return t, event.FlagErr(err, "--at")
}
