package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// lateNight is the demo copy of a race day that runs past midnight: the
// evening's rounds E3 to E5 logged after the demo's five passes, readings at
// 22:00 and (the next calendar day) 00:10, and E6 called at 00:15.
func lateNight(t *testing.T) (dir string, evening int) {
	t.Helper()
	dir = demoCopy(t)
	mustRun(t, "weather", "add", "--dir", dir, "--time", "22:00", "--temp", "77.8F", "--baro", "27.63inHg", "--dewpoint", "53.5F", "--track-temp", "82F", "--wind", "2mph", "--wind-from", "150")
	mustRun(t, "weather", "add", "--dir", dir, "--time", "2026-06-14 00:10", "--temp", "72.1F", "--baro", "27.66inHg", "--dewpoint", "54F", "--track-temp", "76F", "--wind", "1mph", "--wind-from", "140")
	for _, p := range []struct{ ses, at, lane, dial, et string }{
		{"E3", "20:53", "left", "11.40", "11.412"}, {"E4", "21:38", "right", "11.39", "11.401"}, {"E5", "22:18", "left", "11.38", "11.395"},
	} {
		mustRun(t, "log", "add", "--dir", dir, "--date", "2026-06-13", "--time", p.at, "--session", p.ses, "--lane", p.lane,
			"--dial", p.dial, "--rt", ".031", "--et60", "1.612", "--et1320", p.et, "--mph1320", "117.40")
	}
	data, _ := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	evening = strings.Count(string(data), "\n2026-06-13,")
	editFile(t, dir, "schedule.yaml", func(s string) string { return s + "  - {session: E6, call: \"00:15\"}\n" })
	return dir, evening
}

type midnightCard struct {
	Session       string           `json:"session"`
	CallTime      time.Time        `json:"call_time"`
	MinutesToCall float64          `json:"minutes_to_call"`
	Today         []map[string]any `json:"today"`
	AirNow        struct {
		Time time.Time `json:"time"`
	} `json:"air_now"`
}

// A round called after midnight belongs to the race day that began the
// evening before: the call is minutes away (not 21 h 45 min ago), the
// 00:10 reading is the latest, and the evening's passes are today's.
func TestRoundCalledAfterMidnight(t *testing.T) {
	dir, evening := lateNight(t)
	if evening != 8 {
		t.Fatalf("the evening has %d passes, want 8", evening)
	}
	at0024 := time.Date(2026, 6, 14, 0, 24, 0, 0, time.Local)
	call := time.Date(2026, 6, 14, 0, 15, 0, 0, time.Local)
	read := time.Date(2026, 6, 14, 0, 10, 0, 0, time.Local)
	check := func(t *testing.T, c midnightCard, wantCall time.Time) {
		t.Helper()
		if c.Session != "E6" {
			t.Errorf("session %s, want E6", c.Session)
		}
		if !c.CallTime.Equal(wantCall) {
			t.Errorf("call at %v, want %v", c.CallTime, wantCall)
		}
		if want := wantCall.Sub(at0024).Minutes(); c.MinutesToCall != want {
			t.Errorf("minutes to the call %v, want %v", c.MinutesToCall, want)
		}
		if !c.AirNow.Time.Equal(read) {
			t.Errorf("the air now is the %v reading, want the 00:10 one", c.AirNow.Time)
		}
		if len(c.Today) != evening {
			t.Errorf("the card shows %d passes of the day, want the evening's %d", len(c.Today), evening)
		}
	}
	text, _, _ := pitcardAt(t, at0024, "", "card", "--dir", dir, "--round", "E6", "--at", "00:15", "--lane", "right")
	if !strings.Contains(text, "called 00:15 (9 min ago)") {
		t.Errorf("the text card does not say the call was 9 min ago:\n%s", text[:min(len(text), 400)])
	}
	cases := []struct {
		name     string
		args     []string
		noSched  bool
		wantCall time.Time
	}{
		{"the schedule's next round", nil, false, call},
		{"--round E6 from the schedule", []string{"--round", "E6"}, false, call},
		{"no schedule, --at 00:40", []string{"--round", "E6", "--at", "00:40"}, true, time.Date(2026, 6, 14, 0, 40, 0, 0, time.Local)},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if tc.noSched {
				if err := os.Remove(filepath.Join(dir, "schedule.yaml")); err != nil && !os.IsNotExist(err) {
					t.Fatal(err)
				}
			}
			args := append([]string{"card", "--dir", dir, "--lane", "right", "--format", "json"}, tc.args...)
			out, errs, code := pitcardAt(t, at0024, "", args...)
			if code != 0 {
				t.Fatalf("exit %d\n%s", code, errs)
			}
			if strings.Contains(errs, "not today") {
				t.Errorf("the card took the schedule for another day:\n%s", errs)
			}
			var c midnightCard
			if err := json.Unmarshal([]byte(out), &c); err != nil {
				t.Fatal(err)
			}
			check(t, c, tc.wantCall)
		})
	}
}
