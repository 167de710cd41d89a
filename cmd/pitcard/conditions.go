package main

import (
	"errors"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"pitcard/engine"
	"pitcard/entry"
	"pitcard/event"
	"pitcard/weather"
)

// conditionFlags choose the air of a command: reading flags, --latest (the
// weather log's last reading, flags replacing its fields) or --at (the log's
// forecast for a time, flags replacing its fields).
type conditionFlags struct {
	readingFlags
	Latest bool
	At     string
}

func (c *conditionFlags) bind(cmd *cobra.Command) {
	c.readingFlags.bind(cmd)
	cmd.Flags().BoolVar(&c.Latest, "latest", false, "use the weather log's last reading")
	cmd.Flags().StringVar(&c.At, "at", "", "use the weather log's forecast for this time, HH:MM")
}

// conditions are the resolved air of a command.
type conditions struct {
	Reading   weather.Reading
	Elevation weather.Length
	Track     engine.Track
	HaveTrack bool
	Source    string            // where the air came from, in words
	Forecast  *weather.Forecast // with --at
	Warnings  []string
	// BadRows are weather.csv rows that could not be read (the air is the
	// rest): the command names them after its output and exits 2.
	BadRows *weather.BadReadings
}

// resolve turns the flags into the air of the command. The demo with no
// reading flags takes the demo day's last reading.
func (c *conditionFlags) resolve(e *eventFolder, now time.Time) (conditions, error) {
	var out conditions
	trk, err := e.Track()
	switch {
	case err == nil:
		out.Track, out.HaveTrack = trk, true
	case c.Elevation == "":
		return out, err
	}
	if out.Elevation, err = c.SiteElevation(e.Settings.Units, trk.Elevation(), out.HaveTrack); err != nil {
		return out, err
	}
	if c.Latest && c.At != "" {
		return out, userErrf("give --latest or --at, not both")
	}
	var base *weather.Reading
	if c.Latest || c.At != "" || (e.Demo && !c.Given()) {
		log, bad, err := e.ReadableWeather(out.Elevation)
		if bad != nil { // the good rows are the air; the bad ones named after the output (exit 2)
			out.BadRows = bad
		}
		if err != nil {
			return out, err
		}
		if len(log) == 0 {
			return out, userErrf("%s has no readings: add one with 'pitcard weather add', or give the reading flags", e.Name(event.WeatherFile))
		}
		last := log[len(log)-1]
		if c.At != "" {
			when, err := callTime(c.At, last.Time, e.Settings.DayStart)
			if err != nil {
				return out, err
			}
			f, err := weather.ForecastAt(log, when, out.Elevation)
			if err != nil {
				return out, event.FlagErr(err, "--at")
			}
			out.Forecast = &f
			base = &f.Reading
			out.Source = "forecast for " + when.Format("15:04") + ": " + strings.Join(f.Notes, "; ")
			if !f.Trusted {
				out.Warnings = append(out.Warnings, "the weather forecast is not to be trusted: "+strings.Join(f.Notes, "; "))
			}
		} else {
			base = &last
			out.Source = "the weather log's " + last.Time.Format("15:04") + " reading"
		}
	}
	r, err := c.ReadingAt(e.Settings.Units, now, base)
	if err != nil {
		return out, orLatest(err)
	}
	if base == nil {
		out.Source = "the reading flags"
	} else if c.Given() {
		out.Source += ", with the flags given"
	}
	if err := entry.ValidateFields(r, out.Elevation, e.Settings.Units); err != nil {
		return out, err
	}
	if w := r.PressureWarning(out.Elevation); w != "" {
		out.Warnings = append(out.Warnings, w)
	}
	out.Reading = r
	return out, nil
}

// orLatest adds, to a reading's missing field, that --latest takes the
// weather log's last reading instead (the commands with --latest say so).
func orLatest(err error) error {
	var m *entry.MissingField
	if errors.As(err, &m) {
		return userErrf("%v (or use --latest for the weather log's last reading)", err)
	}
	return err
}
