package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// On the spring-forward night (America/Chicago, 2026-03-08: clocks from
// 02:00 to 03:00; tz database) a time in the skipped hour was moved an hour
// back: a 02:30 reading was rewritten as 01:30 by the next 'weather add',
// 'log add --time 02:30' logged 01:30, a call at 02:15 showed 01:15. Such a
// time is refused, saying why, and nothing already written changes. The
// zone is the clock's, so the test is the same on any machine.
func TestDaylightSavingNight(t *testing.T) {
	loc, err := time.LoadLocation("America/Chicago")
	if err != nil {
		t.Skipf("no zone database: %v", err)
	}
	now := time.Date(2026, 3, 8, 3, 40, 0, 0, loc)
	const skipped = "does not exist in America/Chicago: clocks went from 02:00 to 03:00"
	const head = "date,time,temp_f,baro_inhg,baro_kind,humidity_pct,dewpoint_f,wind_mph,wind_from_deg,track_temp_f,notes\n"
	const rows = "2026-03-07,23:40:00,52,28.95,station,61,,3,200,,\n2026-03-08,01:45:00,51,28.96,station,63,,2,200,,\n2026-03-08,03:10:00,50,28.97,station,64,,2,190,,\n"
	reading := []string{"--temp", "49F", "--baro", "28.97inHg", "--humidity", "66%"}
	folder := func(t *testing.T, weather string) string {
		dir := newFolder(t)
		writeFile(t, filepath.Join(dir, "weather.csv"), weather)
		writeFile(t, filepath.Join(dir, "schedule.yaml"), "date: 2026-03-07\nsessions:\n  - {session: E5, call: \"23:30\"}\n  - {session: E6, call: \"01:30\"}\n")
		return dir
	}
	unchanged := func(t *testing.T, dir, file, want string) {
		t.Helper()
		if got, _ := os.ReadFile(filepath.Join(dir, file)); string(got) != want {
			t.Errorf("%s changed:\n%s\nwant:\n%s", file, got, want)
		}
	}
	refused := []struct {
		name string
		args []string
		want string
	}{
		{"weather add --time 02:30", append([]string{"weather", "add", "--time", "02:30"}, reading...), `--time "02:30" on 2026-03-08 ` + skipped},
		{"weather add with a date", append([]string{"weather", "add", "--time", "2026-03-08 02:30"}, reading...), skipped},
		{"log add --time 02:30", []string{"log", "add", "--time", "02:30", "--session", "E6", "--lane", "left", "--et1320", "11.62", "--mph1320", "115.1"}, skipped},
		{"card --at 02:15", []string{"card", "--round", "E6", "--at", "02:15"}, `--at "02:15" on 2026-03-08 ` + skipped},
	}
	for _, tc := range refused {
		t.Run(tc.name, func(t *testing.T) {
			dir := folder(t, head+rows)
			logbook, _ := os.ReadFile(filepath.Join(dir, "logbook.csv"))
			_, errs, code := pitcardAt(t, now, "", append(tc.args, "--dir", dir)...)
			if code != 2 || !strings.Contains(errs, tc.want) {
				t.Errorf("exit %d, want 2 and %q:\n%s", code, tc.want, errs)
			}
			unchanged(t, dir, "weather.csv", head+rows)
			unchanged(t, dir, "logbook.csv", string(logbook))
		})
	}
	t.Run("a skipped time in weather.csv", func(t *testing.T) {
		bad := head + rows + "2026-03-08,02:30:00,50,28.97,station,65,,2,190,,\n"
		dir := folder(t, bad)
		_, errs, code := pitcardAt(t, now, "", append([]string{"weather", "add", "--dir", dir}, reading...)...)
		if code != 2 || !strings.Contains(errs, "weather.csv line 5") || !strings.Contains(errs, skipped) {
			t.Errorf("exit %d, want 2 naming line 5:\n%s", code, errs)
		}
		unchanged(t, dir, "weather.csv", bad)
	})
	t.Run("a schedule's call in the skipped hour", func(t *testing.T) {
		dir := folder(t, head+rows)
		writeFile(t, filepath.Join(dir, "schedule.yaml"), "date: 2026-03-07\nsessions:\n  - {session: E6, call: \"02:15\"}\n")
		_, errs, code := pitcardAt(t, now, "", "card", "--dir", dir)
		if code != 2 || !strings.Contains(errs, "schedule.yaml line 3") || !strings.Contains(errs, skipped) {
			t.Errorf("exit %d, want 2 naming line 3:\n%s", code, errs)
		}
	})
	t.Run("the night's other times", func(t *testing.T) {
		dir := folder(t, head+rows)
		mustAt := func(args ...string) string {
			out, errs, code := pitcardAt(t, now, "", append(args, "--dir", dir)...)
			if code != 0 {
				t.Fatalf("pitcard %s: exit %d\n%s", strings.Join(args, " "), code, errs)
			}
			return out
		}
		mustAt(append([]string{"weather", "add", "--time", "03:35"}, reading...)...)
		got, _ := os.ReadFile(filepath.Join(dir, "weather.csv"))
		if want := head + rows + "2026-03-08,03:35:00,49,28.97,station,66,,,,,\n"; string(got) != want { // no --wind: not read, not calm
			t.Errorf("weather.csv after adding 03:35:\n%s\nwant:\n%s", got, want)
		}
		mustAt("log", "add", "--time", "01:50", "--session", "E6", "--lane", "left", "--et1320", "11.62", "--mph1320", "115.1")
		if lb, _ := os.ReadFile(filepath.Join(dir, "logbook.csv")); !strings.Contains(string(lb), "\n2026-03-08,01:50,") {
			t.Errorf("the 01:50 pass is not logged at 01:50 on 2026-03-08:\n%s", lb)
		}
		card := mustAt("card", "--round", "E6", "--lane", "left")
		if !strings.Contains(card, "called 01:30 (1 h 10 min ago)") { // 07:30 UTC to 08:40 UTC
			t.Errorf("E6 at 01:30 CST is 1 h 10 min before 03:40 CDT; card:\n%s", card[:min(len(card), 300)])
		}
	})
}
