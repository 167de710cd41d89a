package prep

import (
	"strings"
	"testing"
	"time"

	"pitcard/logbook"
	"pitcard/weather"
)

func TestReadSchedule(t *testing.T) {
	s, err := ReadSchedule(strings.NewReader("date: 2026-06-13\nsessions:\n  - {session: T1, call: \"15:10\"}\n  - {session: E3, call: \"20:45\", lane: left}\n"), "schedule.yaml", time.UTC, weather.DefaultDayStart)
	if err != nil {
		t.Fatal(err)
	}
	slot, ok := s.Find(logbook.Session{Kind: logbook.Elimination, N: 3})
	if !ok || slot.Lane != logbook.Left || slot.Call.Format("2006-01-02 15:04") != "2026-06-13 20:45" {
		t.Errorf("E3 %+v %v", slot, ok)
	}
	moved := s.OnDay(time.Date(2026, 7, 4, 9, 0, 0, 0, time.UTC))
	if moved.Sessions[0].Call.Format("2006-01-02 15:04") != "2026-07-04 15:10" {
		t.Errorf("moved %v", moved.Sessions[0].Call)
	}
	for src, want := range map[string]string{
		"date: June\nsessions: []\n":                                                   "date",
		"date: 2026-06-13\nsessions:\n  - {session: Q, call: \"1\"}\n":                 "session",
		"date: 2026-06-13\nsessions:\n  - {session: T1, call: \"8pm\"}\n":              "call",
		"date: 2026-06-13\nsessions:\n  - {session: T1, call: \"20:00\", lane: mid}\n": "lane",
		"date: 2026-06-13\nsesions: []\n":                                              "sesions",
	} {
		if _, err := ReadSchedule(strings.NewReader(src), "schedule.yaml", time.UTC, weather.DefaultDayStart); err == nil || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), "schedule.yaml") {
			t.Errorf("%q: %v, want %q", src, err, want)
		}
	}
}

// A race night past midnight: calls before day_starts are on the next
// calendar date, the next session is the race day's, and a schedule moved to
// another day keeps its night after midnight (common practice, no source).
func TestScheduleAcrossMidnight(t *testing.T) {
	src := "date: 2026-06-13\nsessions:\n  - {session: E5, call: \"22:10\"}\n  - {session: E6, call: \"00:15\"}\n"
	s, err := ReadSchedule(strings.NewReader(src), "schedule.yaml", time.UTC, weather.DefaultDayStart)
	if err != nil {
		t.Fatal(err)
	}
	e6, _ := s.Find(logbook.Session{Kind: logbook.Elimination, N: 6})
	if got := e6.Call.Format("2006-01-02 15:04"); got != "2026-06-14 00:15" {
		t.Errorf("E6 called %s, want 2026-06-14 00:15", got)
	}
	e5pass := logbook.Pass{Time: time.Date(2026, 6, 13, 22, 18, 0, 0, time.UTC), Session: logbook.Session{Kind: logbook.Elimination, N: 5}}
	if next, ok := s.Next([]logbook.Pass{e5pass}); !ok || next.Session != e6.Session {
		t.Errorf("after E5 the next is %v, %v; want E6", next.Session, ok)
	}
	e6pass := logbook.Pass{Time: time.Date(2026, 6, 14, 0, 21, 0, 0, time.UTC), Session: e6.Session}
	if next, ok := s.Next([]logbook.Pass{e5pass, e6pass}); ok {
		t.Errorf("E6 run at 00:21 is on the race day; next is %v", next.Session)
	}
	moved := s.OnDay(time.Date(2026, 7, 5, 1, 0, 0, 0, time.UTC)) // 01:00 on the 5th: the race day of the 4th
	if got := moved.Sessions[1].Call.Format("2006-01-02 15:04"); got != "2026-07-05 00:15" || moved.Date.Format("2006-01-02") != "2026-07-04" {
		t.Errorf("moved: %s on %s, want E6 at 2026-07-05 00:15 on 2026-07-04", got, moved.Date.Format("2006-01-02"))
	}
}

// A call on a spring-forward night's skipped hour is refused, naming the
// line (tz database: America/Chicago skips 02:00..03:00 on 2026-03-08).
func TestScheduleSkippedHour(t *testing.T) {
	loc, err := time.LoadLocation("America/Chicago")
	if err != nil {
		t.Skip(err)
	}
	src := "date: 2026-03-07\nsessions:\n  - {session: E1, call: \"23:30\"}\n  - {session: E2, call: \"02:15\"}\n"
	_, err = ReadSchedule(strings.NewReader(src), "schedule.yaml", loc, weather.DefaultDayStart)
	if err == nil || !strings.Contains(err.Error(), "schedule.yaml line 4") || !strings.Contains(err.Error(), "sessions[1].call") ||
		!strings.Contains(err.Error(), "does not exist in America/Chicago: clocks went from 02:00 to 03:00") {
		t.Errorf("a call at 02:15 on the spring-forward night: %v", err)
	}
}

func FuzzReadSchedule(f *testing.F) {
	f.Add("date: 2026-06-13\nsessions:\n  - {session: T1, call: \"15:10\"}\n  - {session: E3, call: \"20:45\", lane: left}\n")
	f.Add("date: 2026-06-13\n")
	f.Add("sessions: {a: b}\n")
	f.Fuzz(func(t *testing.T, src string) {
		s, err := ReadSchedule(strings.NewReader(src), "schedule.yaml", time.UTC, weather.DefaultDayStart)
		if err != nil {
			if !strings.Contains(err.Error(), "schedule.yaml") {
				t.Fatalf("error %q does not name the file", err)
			}
			return
		}
		for _, x := range s.Sessions {
			if s.Start.Key(x.Call) != s.Date.Format("2006-01-02") {
				t.Fatalf("a call off the schedule's race day: %v", x.Call)
			}
		}
	})
}
