package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"pitcard/internal/crashtest"
	"strings"
	"testing"
	"time"

	"pitcard/bracket"
	"pitcard/internal/safefile"
	"pitcard/logbook"
)

const slipHeader = "date,time,track,session,lane,dial,rt,et60,et330,et660,et1000,et1320,mph660,mph1320,temp_f,baro_inhg,humidity_pct,track_temp_f,wind_mph,wind_from_deg,weight_lb,notes\n"

// season is an invented logbook of n passes of an 11.5-second car.
func season(n int) string {
	var b strings.Builder
	b.WriteString(slipHeader)
	for i := range n {
		day := time.Date(2026, 5, 2+i/10, 17, 0, 0, 0, time.Local).Add(time.Duration(i%10) * 25 * time.Minute)
		et := 11.50 + 0.01*float64(i%5) - 0.02*float64(i%3)
		fmt.Fprintf(&b, "%s,%s,My Home Dragway,T%d,%s,,0.0%d,1.61%d,,7.3%d,,%.3f,,116.%d,%d,28.9%d,40,%d,5,200,3400,\n",
			day.Format("2006-01-02"), day.Format("15:04"), i%10+1, []string{"left", "right"}[i%2], i%10, i%10, i%10, et, i%10, 80+i%10, i%10, 100+i%20)
	}
	return b.String()
}

func writeFile(t *testing.T, path, data string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(data), 0o644); err != nil {
		t.Fatal(err)
	}
}

func TestLogImportListStats(t *testing.T) {
	dir := newFolder(t)
	src := filepath.Join(t.TempDir(), "season.csv")
	writeFile(t, src, season(30))
	out := mustRun(t, "log", "import", "--dir", dir, src)
	if !strings.Contains(out, "Imported 30 passes") {
		t.Errorf("import said %q", out)
	}
	// importing again: every pass is a duplicate; nothing is written
	before, _ := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	_, errs, code := pitcard(t, "log", "import", "--dir", dir, src)
	if code != 2 || !strings.Contains(errs, "the same pass entered twice") {
		t.Errorf("re-import: exit %d %s", code, errs)
	}
	if after, _ := os.ReadFile(filepath.Join(dir, "logbook.csv")); !bytes.Equal(before, after) {
		t.Error("a refused import changed the logbook")
	}
	list := mustRun(t, "log", "list", "--dir", dir, "--last", "5")
	if strings.Count(list, "My Home") != 0 || strings.Count(list, "2026-05-04") != 5 {
		t.Errorf("list:\n%s", list)
	}
	var passes []map[string]any
	if err := json.Unmarshal([]byte(mustRun(t, "log", "list", "--dir", dir, "--last", "0", "--format", "json")), &passes); err != nil || len(passes) != 30 {
		t.Fatalf("json list: %d passes, %v", len(passes), err)
	}
	if passes[0]["rt"] != "0.00" || passes[0]["et"].(map[string]any)["1320"] != "11.500" {
		t.Errorf("first pass %v", passes[0])
	}
	stats := mustRun(t, "log", "stats", "--dir", dir)
	if !strings.Contains(stats, "2026-05-02") || !strings.Contains(stats, "time trials") {
		t.Errorf("stats:\n%s", stats)
	}
	var js []map[string]any
	_ = json.Unmarshal([]byte(mustRun(t, "log", "stats", "--dir", dir, "--format", "json")), &js)
	if len(js) != 6 || js[0]["passes"].(float64) != 10 {
		t.Errorf("stats json %v", js)
	}
}

func TestLogImportAllOrNothing(t *testing.T) {
	dir := newFolder(t)
	src := filepath.Join(t.TempDir(), "bad.csv")
	lines := strings.Split(season(12), "\n")
	lines[5] = strings.Replace(lines[5], ",40,", ",140,", 1) // humidity 140 %
	lines[9] = strings.Replace(lines[9], "3400", "34000", 1) // weight
	writeFile(t, src, strings.Join(lines, "\n"))
	_, errs, code := pitcard(t, "log", "import", "--dir", dir, src)
	if code != 2 || !strings.Contains(errs, "bad.csv line 6: humidity_pct") || !strings.Contains(errs, "bad.csv line 10: weight_lb") {
		t.Errorf("exit %d:\n%s", code, errs)
	}
	if data, _ := os.ReadFile(filepath.Join(dir, "logbook.csv")); string(data) != slipHeader {
		t.Errorf("a failed import wrote:\n%s", data)
	}
	if _, errs, code := pitcard(t, "log", "import", "--dir", dir, filepath.Join(dir, "missing.csv")); code != 2 || !strings.Contains(errs, "cannot read") {
		t.Errorf("missing file: exit %d %s", code, errs)
	}
}

func TestLogAddTakesTheNearestReading(t *testing.T) {
	dir := newFolder(t)
	mustRun(t, "weather", "add", "--dir", dir, "--time", "18:30", "--temp", "88F", "--baro", "28.90inHg", "--humidity", "40%", "--track-temp", "120F")
	mustRun(t, "weather", "add", "--dir", dir, "--time", "19:30", "--temp", "80F", "--baro", "28.95inHg", "--humidity", "50%", "--track-temp", "100F")
	out := mustRun(t, "log", "add", "--dir", dir, "--time", "19:10", "--session", "E1", "--lane", "left", "--dial", "11.52",
		"--rt", ".021", "--et60", "1.612", "--et1320", "11.538", "--mph1320", "116.79", "--track-temp", "104F")
	if !strings.Contains(out, "19:30 reading, with the values given") {
		t.Errorf("log add said %q", out)
	}
	var passes []map[string]any
	_ = json.Unmarshal([]byte(mustRun(t, "log", "list", "--dir", dir, "--format", "json")), &passes)
	p := passes[0]
	if p["temp_f"].(float64) != 80 || p["track_temp_f"].(float64) != 104 || p["weight_lb"].(float64) != 3400 || p["rt"] != "0.021" {
		t.Errorf("logged %v", p)
	}
	// the same pass again
	_, errs, code := pitcard(t, "log", "add", "--dir", dir, "--time", "19:10", "--session", "E1", "--lane", "left", "--et1320", "11.538")
	if code != 2 || !strings.Contains(errs, "entered twice") {
		t.Errorf("duplicate: exit %d %s", code, errs)
	}
	for _, bad := range []struct {
		args []string
		want string
	}{
		{[]string{"--session", "E2", "--lane", "left", "--et1320", "11.5", "--rt", "3"}, "--rt \"3\" is outside -1..2 s"},
		{[]string{"--session", "E2", "--lane", "middle", "--et1320", "11.5"}, "--lane"},
		{[]string{"--session", "E2", "--lane", "left", "--et60", "1.6", "--et660", "1.5"}, "--et660"},
		{[]string{"--session", "E2", "--lane", "left", "--et1320", "11.5", "--temp", "200F"}, "--temp"},
		{[]string{"--lane", "left", "--et1320", "11.5"}, "--round and --lane are required"},
	} {
		_, errs, code := pitcard(t, append([]string{"log", "add", "--dir", dir, "--time", "20:00"}, bad.args...)...)
		if code != 2 || !strings.Contains(errs, bad.want) {
			t.Errorf("%v: exit %d %q, want %q", bad.args, code, errs, bad.want)
		}
	}
}

// Source: "How to Bracket Race", a widely reprinted club how-to (worked example).
func TestRaceJSON(t *testing.T) {
	out := mustRun(t, "race", "--left-dial", "14.20", "--left-rt", ".520", "--left-et", "14.32", "--right-dial", "13.00",
		"--right-rt", ".550", "--right-et", "13.10", "--right-mph", "105", "--rt-zero", "amber", "--format", "json")
	var j map[string]any
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	if j["winner"] != "left" || j["reason"] != bracket.ReasonFirstToFinish || j["margin_s"] != 0.01 || j["margin_ft"].(float64) != 1.5 {
		t.Errorf("race %v", j)
	}
	if _, errs, code := pitcard(t, "race", "--left-dial", "14.20", "--left-rt", ".520"); code != 2 || !strings.Contains(errs, "--left-et is required") {
		t.Errorf("missing ET: exit %d %s", code, errs)
	}
	if _, errs, code := pitcard(t, "race", "--left-dial", "x", "--left-rt", ".5", "--left-et", "1", "--right-dial", "1", "--right-rt", "1", "--right-et", "1"); code != 2 || !strings.Contains(errs, "--left-dial") {
		t.Errorf("bad dial: exit %d %s", code, errs)
	}
}

func TestDialFromLogbook(t *testing.T) {
	dir := newFolder(t)
	src := filepath.Join(t.TempDir(), "season.csv")
	writeFile(t, src, season(20))
	mustRun(t, "log", "import", "--dir", dir, src)
	var j dialJSON
	if err := json.Unmarshal([]byte(mustRun(t, "dial", "--dir", dir, "--format", "json")), &j); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(j.Basis, "last 10 clean passes") || len(j.Options) != 11 || j.Risk != 0.10 {
		t.Errorf("dial without weather %+v", j)
	}
	// with the weather, the pass model
	_ = json.Unmarshal([]byte(mustRun(t, "dial", "--dir", dir, "--temp", "84F", "--baro", "28.95inHg", "--humidity", "40%", "--format", "json")), &j)
	if !strings.Contains(j.Basis, "pass model calibrated to 20 passes") {
		t.Errorf("dial with weather %+v", j)
	}
	text := mustRun(t, "dial", "--dir", dir, "--et", "11.5", "--sd", "0.03", "--breakout-risk", "0.05", "--dial-step", "0.001")
	if !strings.Contains(text, "Before the rules: 11.450") {
		t.Errorf("dial:\n%s", text)
	}
	if _, errs, code := pitcard(t, "dial", "--dir", dir, "--breakout-risk", "0.9"); code != 2 || !strings.Contains(errs, "--breakout-risk") {
		t.Errorf("risk 0.9: exit %d %s", code, errs)
	}
}

// Crash safety: a writer killed mid-write leaves the logbook as it was or as
// it was to become, never a mix. The child is this test binary; it pauses at
// a known point of the write (half the rows written, then each stage of
// safefile.Write, through safefile.PauseAt) and says so, and only then is it
// killed, so every run kills inside the write, however loaded the machine.
func TestLogbookSurvivesAKilledWriter(t *testing.T) {
	if os.Getenv("PITCARD_CRASH_CHILD") != "" {
		t.Skip("in the child")
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "logbook.csv")
	oldData := season(50)
	newPasses, err := logbook.Read(strings.NewReader(season(400)), "new", time.Local)
	if err != nil {
		t.Fatal(err)
	}
	var newData bytes.Buffer
	_ = logbook.Write(&newData, newPasses)
	cases := []struct {
		at      string
		want    string // "old" or "new"
		tmpLeft bool   // the killed writer's temporary file is still there
	}{
		{"mid-write", "old", true},
		{safefile.StageWritten, "old", true},
		{safefile.StageSynced, "old", true},
		{safefile.StageBackedUp, "old", true},
		{safefile.StageRenamed, "new", false},
	}
	for _, tc := range cases {
		t.Run(tc.at, func(t *testing.T) {
			writeFile(t, path, oldData)
			_ = os.Remove(path + ".bak")
			crashtest.KillAt(t, "^TestCrashChild$", []string{"PITCARD_CRASH_CHILD=" + path, "PITCARD_CRASH_AT=" + tc.at}, tc.at)
			got, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			want := map[string]string{"old": oldData, "new": newData.String()}[tc.want]
			if string(got) != want {
				t.Fatalf("killed at %s: the logbook is not the %s version (%d bytes; old %d, new %d)", tc.at, tc.want, len(got), len(oldData), newData.Len())
			}
			if _, err := logbook.Read(bytes.NewReader(got), "logbook.csv", time.Local); err != nil {
				t.Fatalf("killed at %s: the logbook no longer reads: %v", tc.at, err)
			}
			if tc.at == safefile.StageBackedUp || tc.at == safefile.StageRenamed {
				if bak, _ := os.ReadFile(path + ".bak"); string(bak) != oldData {
					t.Errorf("killed at %s: logbook.csv.bak is not the old version (%d bytes)", tc.at, len(bak))
				}
			}
			// the killed writer's temporary file proves the kill landed
			// inside the write; the next write clears it away
			tmps, _ := filepath.Glob(filepath.Join(dir, ".logbook.csv.tmp-*"))
			if (len(tmps) > 0) != tc.tmpLeft {
				t.Errorf("killed at %s: temporary files %v, want left behind: %v", tc.at, tmps, tc.tmpLeft)
			}
			if tc.at == "mid-write" && len(tmps) == 1 {
				if st, err := os.Stat(tmps[0]); err != nil || st.Size() == 0 || st.Size() >= int64(newData.Len()) {
					t.Errorf("killed mid-write: the temporary file is not part-written (%v, %v)", st, err)
				}
			}
			if err := safefile.WriteBytes(path, []byte(oldData)); err != nil {
				t.Fatal(err)
			}
			if tmps, _ := filepath.Glob(filepath.Join(dir, ".logbook.csv.tmp-*")); len(tmps) > 0 {
				t.Errorf("the next write left the dead writer's temporary files: %v", tmps)
			}
		})
	}
}

// TestCrashChild is the writer the crash test kills: it rewrites the logbook
// and, at the point PITCARD_CRASH_AT names, says "PAUSED <point>" on its
// output and waits to be killed.
func TestCrashChild(t *testing.T) {
	path := os.Getenv("PITCARD_CRASH_CHILD")
	if path == "" {
		t.Skip("run by TestLogbookSurvivesAKilledWriter")
	}
	at := os.Getenv("PITCARD_CRASH_AT")
	pause := crashtest.PauseAt(at)
	passes, _ := logbook.Read(strings.NewReader(season(400)), "new", time.Local)
	var all bytes.Buffer
	_ = logbook.Write(&all, passes)
	err := safefile.Write(path, func(w io.Writer) error {
		half := all.Len() / 2
		if _, err := w.Write(all.Bytes()[:half]); err != nil {
			return err
		}
		pause("mid-write")
		_, err := w.Write(all.Bytes()[half:])
		return err
	}, safefile.PauseAt(pause))
	if err != nil {
		t.Fatal(err)
	}
}

// Two pitcard processes writing at once lose no row: each child adds ten
// readings and ten passes to the same folder.
func TestTwoProcessesLoseNoRow(t *testing.T) {
	if os.Getenv("PITCARD_WRITER_CHILD") != "" {
		t.Skip("in the child")
	}
	dir := newFolder(t)
	var children []*exec.Cmd
	for _, hour := range []string{"10", "11"} {
		c := exec.Command(os.Args[0], "-test.run=^TestWriterChild$")
		c.Env = append(os.Environ(), "PITCARD_WRITER_CHILD="+dir, "PITCARD_WRITER_HOUR="+hour)
		if err := c.Start(); err != nil {
			t.Fatal(err)
		}
		children = append(children, c)
	}
	for _, c := range children {
		if err := c.Wait(); err != nil {
			t.Fatalf("child: %v", err)
		}
	}
	var readings, passes []any
	_ = json.Unmarshal([]byte(mustRun(t, "weather", "list", "--dir", dir, "--format", "json")), &readings)
	_ = json.Unmarshal([]byte(mustRun(t, "log", "list", "--dir", dir, "--last", "0", "--format", "json")), &passes)
	if len(readings) != 20 || len(passes) != 20 {
		t.Errorf("%d readings and %d passes landed, want 20 and 20", len(readings), len(passes))
	}
}

func TestWriterChild(t *testing.T) {
	dir, hour := os.Getenv("PITCARD_WRITER_CHILD"), os.Getenv("PITCARD_WRITER_HOUR")
	if dir == "" {
		t.Skip("run by TestTwoProcessesLoseNoRow")
	}
	for i := range 10 {
		clock := fmt.Sprintf("%s:%02d", hour, i*5)
		mustRun(t, "weather", "add", "--dir", dir, "--time", clock, "--temp", "80F", "--baro", "28.9inHg", "--humidity", "40%")
		mustRun(t, "log", "add", "--dir", dir, "--time", clock, "--session", "test", "--lane", "left", "--et1320", "11.5")
	}
}

// Common practice (no source): at a track 4100 ft up, station pressure runs
// near 25.8 inHg; rows near 29.9 are airport altimeter settings, and import
// says so.
func TestImportWarnsOfAltimeterFigures(t *testing.T) {
	dir := newFolder(t)
	trk := filepath.Join(dir, "track.yaml")
	data, _ := os.ReadFile(trk)
	writeFile(t, trk, strings.Replace(string(data), "elevation_ft: 1000", "elevation_ft: 4100", 1))
	src := filepath.Join(t.TempDir(), "season.csv")
	writeFile(t, src, season(12)) // barometer 28.9x: too high for 4100 ft
	_, errs, code := pitcard(t, "log", "import", "--dir", dir, src)
	if code != 0 || !strings.Contains(strings.Join(strings.Fields(errs), " "), "12 rows have baro_inhg figures that look like sea-level") {
		t.Errorf("exit %d: %s", code, errs)
	}
}
