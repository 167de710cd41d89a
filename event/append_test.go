package event

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"pitcard/internal/crashtest"
	"strings"
	"testing"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/internal/safefile"
	"pitcard/logbook"
	"pitcard/weather"
)

// appendFolder is an invented folder (the Hollow Pines strip, an invented
// track) whose logbook has n passes, one a day at noon from 2026-01-01, as
// pitcard writes it.
func appendFolder(t testing.TB, n int) (*Folder, string) {
	t.Helper()
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("date,time,track,session,lane,rt,et60,et1320,mph1320,notes\n")
	start := time.Date(2026, 1, 1, 12, 0, 0, 0, time.UTC)
	for i := range n {
		fmt.Fprintf(&b, "%s,12:00,Hollow Pines,T1,left,0.0%02d,1.6%02d,11.4%02d,117.5,\n", start.AddDate(0, 0, i).Format("2006-01-02"), i%50, i%90, i%90)
	}
	path := filepath.Join(dir, LogbookFile)
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return &Folder{Dir: dir, FS: os.DirFS(dir), Loc: time.UTC}, path
}

// slipAt is an invented slip at t.
func slipAt(t time.Time, lane logbook.Lane) logbook.Pass {
	p := logbook.Pass{Time: t, Track: "Hollow Pines", Session: logbook.Session{Kind: logbook.TimeTrial, N: 2}, Lane: lane}
	p.ET[0] = decimal.NewNullDecimal(decimal.RequireFromString("1.611"))
	p.ET[4] = decimal.NewNullDecimal(decimal.RequireFromString("11.463"))
	return p
}

// The append path and its fall-backs: which write a slip takes is seen in
// the .bak (a rewrite keeps one; an append does not touch it). Invented
// scenario; the rules are pitcard's own (no source).
func TestSaveLogbookAppends(t *testing.T) {
	e, path := appendFolder(t, 30)
	day := time.Date(2026, 3, 1, 12, 0, 0, 0, time.UTC)
	mustSave := func(p logbook.Pass, wantN int) {
		t.Helper()
		saved, err := e.SaveLogbook([]logbook.Pass{p})
		n, kept := saved.Count, saved.Kept
		if err != nil || kept != nil || n != wantN {
			t.Fatalf("SaveLogbook: n %d kept %v err %v, want n %d", n, kept, err, wantN)
		}
	}
	// the first write has no count file: the full rewrite, with .bak
	mustSave(slipAt(day, logbook.Left), 31)
	if _, err := os.Stat(path + ".bak"); err != nil {
		t.Fatalf("the first write kept no .bak: %v", err)
	}
	os.Remove(path + ".bak")
	// a later slip: appended, no .bak
	mustSave(slipAt(day.Add(time.Hour), logbook.Right), 32)
	if _, err := os.Stat(path + ".bak"); err == nil {
		t.Fatal("a later slip was not appended (a .bak was made)")
	}
	// the same pass again: refused with the file's line, nothing written
	before, _ := os.ReadFile(path)
	_, err := e.SaveLogbook([]logbook.Pass{slipAt(day.Add(time.Hour), logbook.Right)})
	if err == nil || !strings.Contains(err.Error(), "at line 33") || !strings.Contains(err.Error(), "entered twice") {
		t.Fatalf("a duplicate appended: %v", err)
	}
	if after, _ := os.ReadFile(path); string(after) != string(before) {
		t.Fatal("a refused duplicate changed the file")
	}
	// an earlier slip: the rewrite sorts it in
	mustSave(slipAt(day.Add(-time.Hour), logbook.Left), 33)
	if _, err := os.Stat(path + ".bak"); err != nil {
		t.Fatal("an earlier slip was not a rewrite (no .bak)")
	}
	os.Remove(path + ".bak")
	// a hand edit (a row added at the end): the count is stale, a rewrite
	data, _ := os.ReadFile(path)
	lines := strings.Split(strings.TrimSuffix(string(data), "\n"), "\n")
	hand := strings.Replace(lines[len(lines)-1], "2026-03-01,13:00", "2026-03-02,10:00", 1)
	os.WriteFile(path, append(data, hand+"\n"...), 0o644)
	mustSave(slipAt(day.Add(48*time.Hour), logbook.Left), 35)
	if _, err := os.Stat(path + ".bak"); err != nil {
		t.Fatal("a slip after a hand edit was not a rewrite (no .bak)")
	}
	passes, err := e.Logbook()
	if err != nil || len(passes) != 35 {
		t.Fatalf("read back %d passes, %v", len(passes), err)
	}
	for i := 1; i < len(passes); i++ {
		if passes[i].Time.Before(passes[i-1].Time) {
			t.Fatalf("passes out of order at %d", i)
		}
	}
}

// A last line without its line end (an append a crash cut short) is set
// aside on the next read, said with file and line, and the next slip is
// never glued to it. Invented scenario (no source).
func TestTornLastLine(t *testing.T) {
	e, path := appendFolder(t, 5)
	data, _ := os.ReadFile(path)
	torn := "2026-02-01,12:00,Hollow Pines,T1,right,0.031,1.602,11.4"
	os.WriteFile(path, append(data, torn...), 0o644)
	passes, err := e.Logbook()
	var lo *LeftOutRows
	if len(passes) != 5 || !errors.As(err, &lo) || !strings.Contains(err.Error(), "line 7") || !strings.Contains(err.Error(), "no line end") {
		t.Fatalf("torn line: %d passes, %v", len(passes), err)
	}
	if _, err := e.SaveLogbook([]logbook.Pass{slipAt(time.Date(2026, 3, 1, 9, 0, 0, 0, time.UTC), logbook.Left)}); err != nil {
		t.Fatal(err)
	}
	after, _ := os.ReadFile(path)
	for _, l := range strings.Split(string(after), "\n") {
		if strings.HasPrefix(l, torn) && l != torn {
			t.Fatalf("the next slip was glued to the torn line: %q", l)
		}
	}
}

// A slip's append killed (kill -9) at each stage is whole or absent, never
// half, and the next read says so. The child is this test binary; it stops
// at the stage named and says so, and only then is it killed.
func TestAppendSurvivesAKill(t *testing.T) {
	if os.Getenv("PITCARD_APPEND_CHILD") != "" {
		t.Skip("in the child")
	}
	cases := []struct {
		at     string
		passes int  // read back
		torn   bool // the next read sets a torn line aside
	}{
		{safefile.StageAppendedHalf, 21, true},
		{safefile.StageAppended, 22, false},
		{safefile.StageAppendSynced, 22, false},
	}
	for _, tc := range cases {
		t.Run(tc.at, func(t *testing.T) {
			e, path := appendFolder(t, 20)
			if _, err := e.SaveLogbook([]logbook.Pass{slipAt(time.Date(2026, 3, 1, 9, 0, 0, 0, time.UTC), logbook.Left)}); err != nil {
				t.Fatal(err) // the rewrite that sets the count
			}
			crashtest.KillAt(t, "^TestAppendCrashChild$", []string{"PITCARD_APPEND_CHILD=" + e.Dir, "PITCARD_APPEND_AT=" + tc.at}, tc.at)
			passes, err := e.Logbook()
			if len(passes) != tc.passes {
				t.Fatalf("killed at %s: %d passes read back, want %d (%v)", tc.at, len(passes), tc.passes, err)
			}
			if said := err != nil && strings.Contains(err.Error(), "line 23") && strings.Contains(err.Error(), "no line end"); said != tc.torn {
				t.Fatalf("killed at %s: the read said %v", tc.at, err)
			}
			// the next slip is whole, on a line of its own
			if _, err := e.SaveLogbook([]logbook.Pass{slipAt(time.Date(2026, 3, 3, 9, 0, 0, 0, time.UTC), logbook.Left)}); err != nil {
				t.Fatal(err)
			}
			data, _ := os.ReadFile(path)
			if !strings.HasSuffix(string(data), "\n") || !strings.Contains(string(data), "\n2026-03-03,09:00,Hollow Pines,") {
				t.Fatalf("killed at %s: the next slip is not a whole line:\n%s", tc.at, data)
			}
		})
	}
}

// TestAppendCrashChild is the writer TestAppendSurvivesAKill kills: it adds
// one slip and stops at the stage PITCARD_APPEND_AT names.
func TestAppendCrashChild(t *testing.T) {
	dir := os.Getenv("PITCARD_APPEND_CHILD")
	if dir == "" {
		t.Skip("run by TestAppendSurvivesAKill")
	}
	at := os.Getenv("PITCARD_APPEND_AT")
	appendPause = crashtest.PauseAt(at)
	e := &Folder{Dir: dir, FS: os.DirFS(dir), Loc: time.UTC}
	_, err := e.SaveLogbook([]logbook.Pass{slipAt(time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC), logbook.Right)})
	t.Fatalf("the append was not stopped at %s: %v", at, err)
}

// The weather log's append path: a later reading is appended (no .bak), one
// in a minute the log has is still refused, an earlier one sorted in by the
// rewrite. Invented readings; the rules are pitcard's own (no source).
func TestAppendReading(t *testing.T) {
	dir := t.TempDir()
	e := &Folder{Dir: dir, FS: os.DirFS(dir), Loc: time.UTC}
	path := filepath.Join(dir, WeatherFile)
	at := func(h, m int) weather.Reading {
		return weather.Reading{Time: time.Date(2026, 5, 9, h, m, 0, 0, time.UTC), Temp: weather.Fahrenheit(71), Baro: weather.InHg(29.1), RH: 0.4}
	}
	for i, tc := range []struct {
		r      weather.Reading
		n      int
		bak    bool // a rewrite (it keeps a .bak)
		errHas string
	}{
		{at(10, 0), 1, false, ""}, // a new log: written whole (and counted), nothing to keep
		{at(10, 5), 2, false, ""},
		{at(10, 10), 3, false, ""},
		{at(10, 30), 4, false, ""},
		{at(10, 30), 0, false, "already has a reading at 2026-05-09 10:30"},
		{at(9, 0), 5, true, ""},
		{at(11, 0), 6, false, ""},
	} {
		os.Remove(path + ".bak")
		n, err := e.AppendReading(tc.r, 0, false)
		if tc.errHas != "" {
			if err == nil || !strings.Contains(err.Error(), tc.errHas) {
				t.Fatalf("%d: %v, want %q", i, err, tc.errHas)
			}
			continue
		}
		if err != nil || n != tc.n {
			t.Fatalf("%d: n %d, %v; want %d", i, n, err, tc.n)
		}
		if _, err := os.Stat(path + ".bak"); (err == nil) != tc.bak {
			t.Fatalf("%d: .bak kept %v, want %v", i, err == nil, tc.bak)
		}
	}
	log, err := e.WeatherLog(0)
	if err != nil || len(log) != 6 {
		t.Fatalf("read back %d readings, %v", len(log), err)
	}
	for i := 1; i < len(log); i++ {
		if !log[i-1].Time.Before(log[i].Time) {
			t.Fatalf("readings out of order at %d", i)
		}
	}
}

// A last line without its line end while a writer holds the lock is an
// append under way: a reader takes it as not there yet and says nothing;
// once no writer holds the lock it is torn, and said. Invented scenario (no
// source).
func TestLineBeingAppended(t *testing.T) {
	e, path := appendFolder(t, 5)
	data, _ := os.ReadFile(path)
	os.WriteFile(path, append(data, "2026-02-01,12:00,Hollow Pines,T1,ri"...), 0o644)
	wpath := filepath.Join(e.Dir, WeatherFile)
	os.WriteFile(wpath, []byte("date,time,temp_f,baro_inhg,baro_kind,humidity_pct,dewpoint_f,wind_mph,wind_from_deg,track_temp_f,notes\n2026-02-01,11:00,70,29.1,station,40,,,,,\n2026-02-01,11:30,7"), 0o644)
	unlock, err := safefile.Lock(path)
	if err != nil {
		t.Fatal(err)
	}
	wunlock, err := safefile.Lock(wpath)
	if err != nil {
		t.Fatal(err)
	}
	passes, err := e.Logbook()
	if len(passes) != 5 || err != nil {
		t.Fatalf("a line being appended: %d passes, %v", len(passes), err)
	}
	if log, err := e.WeatherLog(0); len(log) != 1 || err != nil {
		t.Fatalf("a reading being appended: %d readings, %v", len(log), err)
	}
	unlock()
	wunlock()
	passes, err = e.Logbook()
	if len(passes) != 5 || err == nil || !strings.Contains(err.Error(), "line 7") || !strings.Contains(err.Error(), "no line end") {
		t.Fatalf("a torn line: %d passes, %v", len(passes), err)
	}
}
