package prep

import (
	"strings"
	"testing"
	"time"

	"pitcard/engine"
)

func TestReadSchedule(t *testing.T) {
	s, err := ReadSchedule(strings.NewReader("date: 2026-06-13\nsessions:\n  - {session: T1, call: \"15:10\"}\n  - {session: E3, call: \"20:45\", lane: left}\n"), "schedule.yaml", time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	slot, ok := s.Find(engine.Session{Kind: engine.Elimination, N: 3})
	if !ok || slot.Lane != engine.Left || slot.Call.Format("2006-01-02 15:04") != "2026-06-13 20:45" {
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
		if _, err := ReadSchedule(strings.NewReader(src), "schedule.yaml", time.UTC); err == nil || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), "schedule.yaml") {
			t.Errorf("%q: %v, want %q", src, err, want)
		}
	}
}

func FuzzReadSchedule(f *testing.F) {
	f.Add("date: 2026-06-13\nsessions:\n  - {session: T1, call: \"15:10\"}\n  - {session: E3, call: \"20:45\", lane: left}\n")
	f.Add("date: 2026-06-13\n")
	f.Add("sessions: {a: b}\n")
	f.Fuzz(func(t *testing.T, src string) {
		s, err := ReadSchedule(strings.NewReader(src), "schedule.yaml", time.UTC)
		if err != nil {
			if !strings.Contains(err.Error(), "schedule.yaml") {
				t.Fatalf("error %q does not name the file", err)
			}
			return
		}
		for _, x := range s.Sessions {
			if x.Call.Format("2006-01-02") != s.Date.Format("2006-01-02") {
				t.Fatalf("a call off the schedule's day: %v", x.Call)
			}
		}
	})
}
