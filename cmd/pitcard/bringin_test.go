package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"pitcard/event"
)

const maps = "../../colmap/testdata/"

func read(t *testing.T, path string) string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(data)
}

func TestWeatherImportThroughAMap(t *testing.T) {
	dir := newFolder(t)
	out, errs := mustRunBoth(t, "weather", "import", maps+"meter-export.csv", "--map", maps+"meter-map.yaml", "--dir", dir, "--elevation", "2240ft")
	if !strings.Contains(out, "Imported 3 readings") || !strings.Contains(errs, "semicolon-separated, decimal comma") {
		t.Errorf("out %q err %q", out, errs)
	}
	w := read(t, filepath.Join(dir, event.WeatherFile))
	// 34.4 °C = 93.92 °F, 932.1 hPa = 27.525 inHg; the dew point (given with RH) is what is kept.
	if !strings.Contains(w, "2026-06-13,14:00:00,93.92,27.52") || !strings.Contains(w, "shade on the line") {
		t.Errorf("weather.csv:\n%s", w)
	}
	// Again: refused as already there; with --skip-existing skipped and counted.
	before := read(t, filepath.Join(dir, event.WeatherFile))
	_, errs, code := pitcard(t, "weather", "import", maps+"meter-export.csv", "--map", maps+"meter-map.yaml", "--dir", dir, "--elevation", "2240ft")
	if code != exitBadInput || !strings.Contains(errs, "--skip-existing") || read(t, filepath.Join(dir, event.WeatherFile)) != before {
		t.Errorf("a second import: exit %d %q", code, errs)
	}
	out = mustRun(t, "weather", "import", maps+"meter-export.csv", "--map", maps+"meter-map.yaml", "--dir", dir, "--elevation", "2240ft", "--skip-existing")
	if !strings.Contains(out, "Imported 0 readings from") || !strings.Contains(out, "3 readings already logged, skipped") {
		t.Errorf("skip-existing: %q", out)
	}
}

func mustRunBoth(t *testing.T, args ...string) (string, string) {
	t.Helper()
	out, errs, code := pitcard(t, args...)
	if code != 0 {
		t.Fatalf("pitcard %s: exit %d\n%s", strings.Join(args, " "), code, errs)
	}
	return out, errs
}

// Export → import through the example map gives the same logbook, byte for byte.
func TestLogExportImportRoundTrip(t *testing.T) {
	a := demoCopy(t)
	sheet := filepath.Join(t.TempDir(), "season.csv")
	out := mustRun(t, "log", "export", "--map", maps+"spreadsheet-map.yaml", "--out", sheet, "--dir", a)
	if !strings.Contains(out, "Wrote 65 passes") {
		t.Errorf("export: %q", out)
	}
	if s := read(t, sheet); !strings.HasPrefix(s, "Date;Time;Track;Run;") || !strings.Contains(s, ";0,017;") {
		t.Errorf("the sheet is not in the map's layout:\n%.300s", s)
	}
	b := newFolder(t)
	out, _ = mustRunBoth(t, "log", "import", sheet, "--map", maps+"spreadsheet-map.yaml", "--dir", b)
	if !strings.Contains(out, "Imported 65 passes") {
		t.Errorf("import: %q", out)
	}
	if got, want := read(t, filepath.Join(b, event.LogbookFile)), read(t, filepath.Join(a, event.LogbookFile)); got != want {
		t.Errorf("the logbook did not come back byte for byte (%d vs %d bytes)", len(got), len(want))
	}
	// --since and --track bound the export.
	out = mustRun(t, "log", "export", "--since", "2026-06-13", "--track", "juniper bend raceway", "--dir", a)
	if n := strings.Count(out, "\n"); n != 1+5 || !strings.HasPrefix(out, "date,time,track,") {
		t.Errorf("export --since --track: %d lines\n%s", n, out)
	}
	if _, errs, code := pitcard(t, "log", "export", "--since", "13/06/2026", "--dir", a); code != exitBadInput || !strings.Contains(errs, "--since") {
		t.Errorf("a bad --since: %d %q", code, errs)
	}
}

// A crewmate's copy: the same passes skipped, a new one added, a changed one a conflict.
func TestMergingACrewmatesCopy(t *testing.T) {
	a := demoCopy(t)
	logbook := filepath.Join(a, event.LogbookFile)
	ours := read(t, logbook)
	_, errs, code := pitcard(t, "log", "import", logbook, "--dir", a)
	if code != exitBadInput || !strings.Contains(errs, "already in") || !strings.Contains(errs, "--skip-existing") || read(t, logbook) != ours {
		t.Fatalf("importing the logbook into itself: %d %q", code, errs)
	}
	if out := mustRun(t, "log", "import", logbook, "--skip-existing", "--dir", a); !strings.Contains(out, "Nothing to import: the 65 passes") {
		t.Errorf("skip-existing on the same copy: %q", out)
	}
	theirs := filepath.Join(t.TempDir(), "theo.csv")
	lines := strings.Split(strings.TrimRight(ours, "\n"), "\n")
	changed := strings.Replace(lines[10], ",11.", ",12.", 1) // one field differs
	lines[10] = changed
	lines = append(lines, "2026-06-14,10:00,Juniper Bend Raceway,test,left,,0.031,1.610,4.670,7.290,9.510,11.460,93.80,117.30,75,27.6,40,,,,3350,crewmate's pass")
	if err := os.WriteFile(theirs, []byte(strings.Join(lines, "\n")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	out := mustRun(t, "log", "diff", theirs, "--dir", a)
	if !strings.Contains(out, "1 pass only in") || !strings.Contains(out, "64 passes alike in both") || !strings.Contains(out, "1 conflict") ||
		!strings.Contains(out, "2026-06-14 10:00 test, left lane") || !strings.Contains(out, changed) {
		t.Errorf("log diff:\n%s", out)
	}
	_, errs, code = pitcard(t, "log", "import", theirs, "--skip-existing", "--dir", a)
	if code != exitBadInput || !strings.Contains(errs, "disagree on 1 entry") || !strings.Contains(errs, changed) || read(t, logbook) != ours {
		t.Errorf("a conflict must stop the import, both versions listed: %d\n%s", code, errs)
	}
	// Without the conflict the new pass comes in, the rest skipped.
	fixed := strings.Replace(read(t, theirs), changed, strings.Split(strings.TrimRight(ours, "\n"), "\n")[10], 1)
	if err := os.WriteFile(theirs, []byte(fixed), 0o644); err != nil {
		t.Fatal(err)
	}
	out = mustRun(t, "log", "import", theirs, "--skip-existing", "--dir", a)
	if !strings.Contains(out, "Imported 1 pass") || !strings.Contains(out, "65 passes already logged, skipped") {
		t.Errorf("merge: %q", out)
	}
}

// Without --map: the guessed map is printed, and used only with --yes.
func TestAGuessedMapNeedsYes(t *testing.T) {
	dir := newFolder(t)
	before := read(t, filepath.Join(dir, event.WeatherFile))
	out, errs, code := pitcard(t, "weather", "import", maps+"meter-export.csv", "--dir", dir, "--elevation", "2240ft")
	if code != exitBadInput || !strings.Contains(out, `temp: {column: "Temp (C)", unit: C}`) || !strings.Contains(errs, "--yes") ||
		read(t, filepath.Join(dir, event.WeatherFile)) != before {
		t.Fatalf("a guess without --yes: %d\n%s\n%s", code, out, errs)
	}
	saved := filepath.Join(t.TempDir(), "guessed.yaml")
	// --write-map did what was asked: exit 0, nothing imported, and it says so
	out, _, code = pitcard(t, "weather", "import", maps+"meter-export.csv", "--dir", dir, "--elevation", "2240ft", "--write-map", saved)
	if code != exitOK || !strings.Contains(read(t, saved), "kind: weather") || !strings.Contains(out, "Nothing was imported") ||
		read(t, filepath.Join(dir, event.WeatherFile)) != before {
		t.Errorf("--write-map: exit %d\n%s", code, out)
	}
	out = mustRun(t, "weather", "import", maps+"meter-export.csv", "--dir", dir, "--elevation", "2240ft", "--yes")
	if !strings.Contains(out, "Imported 3 readings") {
		t.Errorf("--yes: %q", out)
	}
	out = mustRun(t, "weather", "import", maps+"meter-export.csv", "--dir", dir, "--elevation", "2240ft", "--map", saved, "--skip-existing")
	if !strings.Contains(out, "3 readings already logged, skipped") {
		t.Errorf("the saved map must read the same: %q", out)
	}
}

func TestMapsInTheBadInputTour(t *testing.T) {
	dir := newFolder(t)
	bad := filepath.Join(t.TempDir(), "bad.yaml")
	if err := os.WriteFile(bad, []byte("kind: weather\ntime: {column: Stamp, format: \"02.01.2006 15:04\"}\ntemp: {column: Temperature, unit: C}\nbaro: {column: \"Baro (hPa)\", unit: hPa}\nhumidity: {column: \"RH (%)\"}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"weather", "import", maps + "meter-export.csv", "--map", "nope.yaml"}, "--map nope.yaml: cannot read it"},
		{[]string{"weather", "import", maps + "meter-export.csv", "--map", bad}, "bad.yaml line 3: temp.column \"Temperature\" is not a column of"},
		{[]string{"log", "import", maps + "meter-export.csv", "--map", maps + "meter-map.yaml"}, "kind \"weather\" is not logbook"},
		{[]string{"weather", "list", "--map", maps + "meter-map.yaml"}, "--format csv"},
		{[]string{"log", "stats", "--last", "-3"}, "--last"},
	} {
		args := append(c.args, "--dir", dir)
		if c.args[0] == "weather" {
			args = append(args, "--elevation", "2240ft")
		}
		_, errs, code := pitcard(t, args...)
		if code != exitBadInput || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q (want %q)", c.args, code, errs, c.want)
		}
	}
}

func TestReadingsStreamIn(t *testing.T) {
	dir := newFolder(t)
	in := "temp=88F baro=28.92inHg humidity=40% time=19:10\n" +
		"temp=300F baro=28.9 humidity=40 time=19:11\n" +
		"# a comment\n\n" +
		"temp=80 baro=28.9 humidity=44 time=19:12 notes=\"fan on\"\n" +
		"what is this\n"
	var out, errb strings.Builder
	s := &IOStreams{In: strings.NewReader(in), Out: &out, Err: &errb, Now: func() time.Time { return fixedNow }}
	code := run([]string{"weather", "add", "-", "--dir", dir, "--elevation", "2240ft"}, s)
	if code != exitBadInput {
		t.Errorf("exit %d, want 2 (bad lines)", code)
	}
	if !strings.Contains(out.String(), "Added 2 readings") || !strings.Contains(errb.String(), "standard input line 2: temp") ||
		!strings.Contains(errb.String(), "standard input line 6") {
		t.Errorf("out %q\nerr %q", out.String(), errb.String())
	}
	w := read(t, filepath.Join(dir, event.WeatherFile))
	if !strings.Contains(w, ",19:10:00,88,28.92,") || !strings.Contains(w, ",19:12:00,80,28.9,") || strings.Contains(w, "19:11") || !strings.Contains(w, "fan on") {
		t.Errorf("weather.csv:\n%s", w)
	}
	// A logger reading twice a minute: the later one is refused, or with --replace kept.
	out.Reset()
	errb.Reset()
	s.In = strings.NewReader("temp=81 baro=28.9 humidity=44 time=19:12\n")
	if code := run([]string{"weather", "add", "-", "--dir", dir, "--elevation", "2240ft"}, s); code != exitBadInput || !strings.Contains(errb.String(), "already has a reading at") {
		t.Errorf("the same minute again: %d %q", code, errb.String())
	}
	s.In = strings.NewReader("temp=81 baro=28.9 humidity=44 time=19:12\n")
	if code := run([]string{"weather", "add", "-", "--replace", "--dir", dir, "--elevation", "2240ft"}, s); code != 0 ||
		!strings.Contains(read(t, filepath.Join(dir, event.WeatherFile)), ",19:12:00,81,") {
		t.Errorf("--replace: %d", code)
	}
	// CSV rows under a header.
	out.Reset()
	errb.Reset()
	s.In = strings.NewReader("date,time,temp_f,baro_inhg,humidity_pct\n2026-06-13,19:30,85,28.9,41\n2026-06-13,19:31,85,28.9,141\n")
	if code := run([]string{"weather", "add", "-", "--dir", dir, "--elevation", "2240ft"}, s); code != exitBadInput ||
		!strings.Contains(out.String(), "line 2: added the 19:30 reading") || !strings.Contains(errb.String(), "standard input line 3: humidity_pct") {
		t.Errorf("CSV stream: %d\n%s\n%s", code, out.String(), errb.String())
	}
}

func TestListsAsCSV(t *testing.T) {
	dir := demoCopy(t)
	if got := mustRun(t, "weather", "list", "--format", "csv", "--dir", dir); got != read(t, filepath.Join(dir, event.WeatherFile)) {
		t.Errorf("weather list --format csv must be weather.csv's rows:\n%.200s", got)
	}
	got := mustRun(t, "weather", "list", "--format", "csv", "--map", maps+"meter-map.yaml", "--dir", dir)
	if !strings.HasPrefix(got, "Stamp;Temp (C);") {
		t.Errorf("weather list --map: %.200s", got)
	}
	// ... and imports back through the same map, byte for byte.
	export := filepath.Join(t.TempDir(), "meter.csv")
	if err := os.WriteFile(export, []byte(got), 0o644); err != nil {
		t.Fatal(err)
	}
	fresh := newFolder(t)
	mustRun(t, "weather", "import", export, "--map", maps+"meter-map.yaml", "--dir", fresh, "--elevation", "2240ft")
	if a, b := read(t, filepath.Join(fresh, event.WeatherFile)), read(t, filepath.Join(dir, event.WeatherFile)); a != b {
		t.Errorf("the weather log did not come back through the meter map byte for byte")
	}
	stats := mustRun(t, "log", "stats", "--format", "csv", "--since", "2026-06-13", "--dir", dir)
	if !strings.HasPrefix(stats, "day,sessions,passes,clean,") || strings.Contains(stats, "2026-06-12") || !strings.Contains(stats, "2026-06-13,") {
		t.Errorf("log stats csv --since:\n%s", stats)
	}
	all := mustRun(t, "log", "stats", "--dir", dir)
	last := mustRun(t, "log", "stats", "--last", "5", "--dir", dir)
	if len(last) >= len(all) {
		t.Errorf("--last 5 must print less than the whole logbook (%d vs %d bytes)", len(last), len(all))
	}
	dial := mustRun(t, "dial", "--demo", "--format", "csv")
	if !strings.HasPrefix(dial, "dial,breakout_chance,expected_giveaway_s,win_chance,recommended") || !strings.Contains(dial, ",true,") {
		t.Errorf("dial csv:\n%s", dial)
	}
	if lst := mustRun(t, "log", "list", "--format", "csv", "--last", "0", "--dir", dir); lst != read(t, filepath.Join(dir, event.LogbookFile)) {
		t.Errorf("log list --format csv --last 0 must be the logbook")
	}
}

// One line over the stream's 64 KB limit (a logger gone wrong) is reported
// by its number, without its bytes, and the good lines after it are still
// read; lines ended by a bare CR (an old logger) or CRLF are read as lines.
func TestReadingsStreamSurvivesALongLine(t *testing.T) {
	dir := newFolder(t)
	in := "temp=88F baro=28.92inHg humidity=40% time=19:10\n" +
		"notes=" + strings.Repeat("x", 70<<10) + "\n" +
		"temp=80 baro=28.9 humidity=44 time=19:12\r\n" +
		"temp=81 baro=28.9 humidity=44 time=19:13\r" +
		"temp=82 baro=28.9 humidity=44 time=19:14\n"
	var out, errb strings.Builder
	s := &IOStreams{In: strings.NewReader(in), Out: &out, Err: &errb, Now: func() time.Time { return fixedNow }}
	code := run([]string{"weather", "add", "-", "--dir", dir, "--elevation", "2240ft"}, s)
	if code != exitBadInput {
		t.Errorf("exit %d, want 2 (a bad line)", code)
	}
	if !strings.Contains(errb.String(), "standard input line 2") || !strings.Contains(errb.String(), "64 KB") || errb.Len() > 2000 {
		t.Errorf("the long line's report (%d bytes): %.500q", errb.Len(), errb.String())
	}
	if !strings.Contains(out.String(), "Added 4 readings") {
		t.Errorf("out %q\nerr %.300q", out.String(), errb.String())
	}
	w := read(t, filepath.Join(dir, event.WeatherFile))
	for _, at := range []string{",19:10:00,", ",19:12:00,", ",19:13:00,", ",19:14:00,"} {
		if !strings.Contains(w, at) {
			t.Errorf("weather.csv lacks %s:\n%s", at, w)
		}
	}
}

// Files from old spreadsheets end lines with a bare CR, or mix CR, CRLF and
// LF: every row comes in, in pitcard's columns or through a guessed map. A
// binary file is refused without its bytes reaching the screen.
func TestImportLineEndsAndBinary(t *testing.T) {
	rows := season(28)
	for _, tc := range []struct{ name, data string }{
		{"CR", strings.ReplaceAll(rows, "\n", "\r")},
		{"mixed", mixEnds(rows)},
		{"CR, another layout", strings.ReplaceAll(strings.Replace(rows, strings.TrimSuffix(slipHeader, "\n"),
			"Date,Time,Track,Run,Lane,Dial,R/T,60',330',1/8,1000',1/4,1/8 mph,1/4 mph,Temp (F),Baro (inHg),RH,Track Temp (F),Wind,Wind Dir,Weight,Notes", 1), "\n", "\r")},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := newFolder(t)
			src := filepath.Join(t.TempDir(), "old.csv")
			writeFile(t, src, tc.data)
			out, errs, code := pitcard(t, "log", "import", "--dir", dir, "--yes", src)
			if code != 0 || !strings.Contains(out, "Imported 28 passes") {
				t.Errorf("exit %d\n%s\n%s", code, out, errs)
			}
		})
	}
	dir := newFolder(t)
	bin := filepath.Join(t.TempDir(), "season.xls")
	writeFile(t, bin, "\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1\x00\x00\x00\x00"+strings.Repeat("\x00\x01\x02\xff", 2000))
	for _, cmd := range [][]string{{"log", "import"}, {"weather", "import"}, {"log", "diff"}} {
		out, errs, code := pitcard(t, append(cmd, "--dir", dir, bin)...)
		if code != exitBadInput || !strings.Contains(errs, "is not a text (CSV) file") || strings.Contains(out+errs, "\x00") || strings.Contains(out+errs, "\x01") || strings.Contains(out+errs, "\xff") || len(out+errs) > 500 {
			t.Errorf("%v: exit %d, %d bytes: %q %q", cmd, code, len(out+errs), out, errs)
		}
	}
}

// mixEnds ends the lines in turn with CR, CRLF and LF.
func mixEnds(s string) string {
	var b strings.Builder
	for i, line := range strings.SplitAfter(s, "\n") {
		b.WriteString(strings.TrimSuffix(line, "\n"))
		if strings.HasSuffix(line, "\n") {
			b.WriteString([]string{"\r", "\r\n", "\n"}[i%3])
		}
	}
	return b.String()
}

// A reading without --wind has its wind "not read" (blank in weather.csv),
// not 0 mph, which the card would show as calm; --wind 0 is calm.
func TestWindNotReadIsNotCalm(t *testing.T) {
	dir := newFolder(t)
	mustRun(t, "weather", "add", "--dir", dir, "--elevation", "2240ft", "--time", "19:00", "--temp", "85F", "--baro", "27.6inHg", "--humidity", "35%")
	mustRun(t, "weather", "add", "--dir", dir, "--elevation", "2240ft", "--time", "19:30", "--temp", "85F", "--baro", "27.6inHg", "--humidity", "35%", "--wind", "0")
	w := read(t, filepath.Join(dir, event.WeatherFile))
	if !strings.Contains(w, ",19:00:00,85,27.6,station,35,,,,,\n") || !strings.Contains(w, ",19:30:00,85,27.6,station,35,,0,0,,\n") {
		t.Errorf("weather.csv:\n%s", w)
	}
	log := mustRun(t, "weather", "list", "--dir", dir)
	if !strings.Contains(log, "not read") || !strings.Contains(log, "calm") {
		t.Errorf("weather list must tell not read from calm:\n%s", log)
	}
	air := mustRun(t, "air", "--dir", dir, "--elevation", "2240ft", "--temp", "85F", "--baro", "27.6inHg", "--humidity", "35%", "--format", "json")
	if !strings.Contains(air, `"wind_mph": null`) {
		t.Errorf("air without --wind: wind_mph must be null:\n%s", air)
	}
}
