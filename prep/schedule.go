package prep

import (
	"errors"
	"fmt"
	"io"
	"strings"
	"time"

	"pitcard/internal/yamlfile"
	"pitcard/logbook"

	"pitcard/weather"
)

// Schedule is a race day's schedule.yaml: when each session is called.
//
//	date: 2026-06-13
//	sessions:
//	  - {session: T1, call: "15:10"}
//	  - {session: E1, call: "19:15", lane: left}
//	  - {session: E6, call: "00:15"}
//
// date is the race day; a call before the day's start (setting day_starts)
// is on the next calendar date, the race night past midnight.
type Schedule struct {
	Date     time.Time // the race day: local midnight of the date it began on
	Start    weather.DayStart
	Sessions []Slot
}

// Slot is one session of the schedule.
type Slot struct {
	Session logbook.Session
	Call    time.Time
	Lane    logbook.Lane // "" when not known in advance
}

// ReadSchedule reads a schedule.yaml; name is the file's name for messages,
// loc the zone of its times, start the race day's start (day_starts).
func ReadSchedule(r io.Reader, name string, loc *time.Location, start weather.DayStart) (Schedule, error) {
	var raw struct {
		Date     string `yaml:"date"`
		Sessions []struct {
			Session string `yaml:"session"`
			Call    string `yaml:"call"`
			Lane    string `yaml:"lane"`
		} `yaml:"sessions"`
	}
	data, err := io.ReadAll(r)
	if err != nil {
		return Schedule{}, err
	}
	doc, err := yamlfile.Parse(data, name)
	if err != nil {
		return Schedule{}, err
	}
	if err := doc.Decode(&raw, true); err != nil {
		return Schedule{}, err
	}
	s := Schedule{Start: start}
	d, err := time.ParseInLocation(weather.DateLayout, strings.TrimSpace(raw.Date), loc)
	if err != nil {
		return s, &weather.InputError{File: name, Line: doc.Line("date"), Field: "date", Value: raw.Date, Reason: "is not a date (YYYY-MM-DD)"}
	}
	s.Date = d
	for i, x := range raw.Sessions {
		where := fmt.Sprintf("sessions[%d].", i)
		ses, err := logbook.ParseSession(x.Session)
		if err != nil {
			return s, located(err, where+"session", name, doc.Line(where+"session"))
		}
		call, err := start.Clock(x.Call, d, loc)
		if err != nil {
			return s, located(err, where+"call", name, doc.Line(where+"call"))
		}
		slot := Slot{Session: ses, Call: call}
		if x.Lane != "" {
			if slot.Lane, err = logbook.ParseLane(x.Lane); err != nil {
				return s, located(err, where+"lane", name, doc.Line(where+"lane"))
			}
		}
		s.Sessions = append(s.Sessions, slot)
	}
	return s, nil
}

// located names field in err, when it is (or wraps) a *weather.InputError,
// and places it at file and line; any other error passes unchanged rather
// than panicking.
func located(err error, field, file string, line int) error {
	var ie *weather.InputError
	if errors.As(err, &ie) {
		return ie.Named(field).At(file, line)
	}
	return err
}

// Find is the slot of a session, and whether the schedule has it.
func (s Schedule) Find(ses logbook.Session) (Slot, bool) {
	for _, x := range s.Sessions {
		if x.Session == ses {
			return x, true
		}
	}
	return Slot{}, false
}

// Next is the first session of the schedule the logbook has no pass for on
// the schedule's race day, and whether there is one.
func (s Schedule) Next(passes []logbook.Pass) (Slot, bool) {
	run := map[logbook.Session]bool{}
	day := s.Date.Format(weather.DateLayout)
	for _, p := range passes {
		if s.Start.Key(p.Time) == day {
			run[p.Session] = true
		}
	}
	for _, x := range s.Sessions {
		if !run[x.Session] {
			return x, true
		}
	}
	return Slot{}, false
}

// OnDay is the schedule moved to the race day of day: the same call times,
// each as many calendar days on as the race day moved.
func (s Schedule) OnDay(day time.Time) Schedule {
	to := s.Start.Day(day.In(s.Date.Location()))
	y, m, d := to.Date()
	out := Schedule{Date: time.Date(y, m, d, 0, 0, 0, 0, s.Date.Location()), Start: s.Start}
	sy, sm, sd := s.Date.Date()
	shift := int(time.Date(y, m, d, 0, 0, 0, 0, time.UTC).Sub(time.Date(sy, sm, sd, 0, 0, 0, 0, time.UTC)).Hours() / 24)
	for _, x := range s.Sessions {
		c := x.Call
		x.Call = time.Date(c.Year(), c.Month(), c.Day()+shift, c.Hour(), c.Minute(), c.Second(), 0, c.Location())
		out.Sessions = append(out.Sessions, x)
	}
	return out
}
