package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"syscall"
	"testing"
	"time"
	"unicode/utf8"

	"pitcard/internal/safefile"
	"pitcard/logbook"
)

// Tests that guard what the card and the commands may claim: each names the
// defect it guards against.

// editFile rewrites one file of a folder.
func editFile(t *testing.T, dir, file string, edit func(string) string) {
	t.Helper()
	p := filepath.Join(dir, file)
	data, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(p, []byte(edit(string(data))), 0o644); err != nil {
		t.Fatal(err)
	}
}

// One bad logbook row (a last row cut short) used to drop the whole logbook:
// the card fell back to physics alone. Now the good rows are used and the bad
// one is named with its line and the .bak.
func TestCardUsesTheGoodRowsOfABrokenLogbook(t *testing.T) {
	dir := demoCopy(t)
	whole := mustRun(t, "card", "--dir", dir, "--round", "3", "--lane", "left")
	var cut string // the last row, cut short by one field
	editFile(t, dir, "logbook.csv", func(s string) string {
		rows := strings.Split(strings.TrimSuffix(s, "\n"), "\n")
		cut = strings.TrimSuffix(rows[len(rows)-1], ",3350,")
		return strings.Join(rows[:len(rows)-1], "\n") + "\n" + cut + "\n"
	})
	_ = os.WriteFile(filepath.Join(dir, "logbook.csv.bak"), []byte("kept\n"), 0o644)
	out, errs, code := pitcard(t, "card", "--dir", dir, "--round", "3", "--lane", "left")
	if code != 2 {
		t.Errorf("exit %d, want 2 (a row to fix)", code)
	}
	all := out + errs
	for _, w := range []string{"POST THIS", "logbook.csv line 66", "has 20 fields, the header has 22", "logbook.csv.bak", "1 row left out"} {
		if !strings.Contains(all, w) {
			t.Errorf("card lacks %q:\n%s", w, all)
		}
	}
	if !strings.Contains(whole, "Calibrated to ") || !strings.Contains(out, "Calibrated to ") || strings.Contains(out, "06-13 E2") {
		t.Errorf("the card did not calibrate to the good passes, without the cut row:\n%s", out)
	}
	// log list and stats print the good rows and name the bad one
	for _, args := range [][]string{{"log", "list"}, {"log", "stats"}} {
		out, errs, code := pitcard(t, append(args, "--dir", dir)...)
		if code != 2 || !strings.Contains(errs, "logbook.csv line 66") || !strings.Contains(out, "2026-06-13") {
			t.Errorf("%v: exit %d\n%s\n%s", args, code, out, errs)
		}
	}
	// log add logs the pass and keeps the bad row as it was
	out, errs, code = pitcard(t, "log", "add", "--dir", dir, "--session", "E3", "--lane", "left", "--dial", "11.46", "--et1320", "11.49")
	if code != 0 || !strings.Contains(errs, "line 66") {
		t.Errorf("log add: exit %d\n%s%s", code, out, errs)
	}
	data, _ := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	if !strings.Contains(string(data), cut+"\n") ||
		!strings.Contains(string(data), ",E3,left,11.46,,,,,,11.49,") {
		t.Errorf("after log add the logbook lost a row:\n%s", data)
	}
}

// A crew's own column (fuel) used to make the logbook unreadable; now it is
// kept, with its values, through a rewrite.
func TestCrewColumnsAreKept(t *testing.T) {
	dir := demoCopy(t)
	editFile(t, dir, "logbook.csv", func(s string) string {
		lines := strings.Split(strings.TrimSuffix(s, "\n"), "\n")
		for i := range lines {
			v := "8"
			if i == 0 {
				v = "fuel"
			}
			lines[i] += "," + v
		}
		return strings.Join(lines, "\n") + "\n"
	})
	out, errs, code := pitcard(t, "card", "--dir", dir, "--round", "3", "--lane", "left")
	if code != 0 || !strings.Contains(out, "Calibrated to ") {
		t.Errorf("card with a fuel column: exit %d\n%s%s", code, out, errs)
	}
	mustRun(t, "log", "add", "--dir", dir, "--session", "E3", "--lane", "left", "--dial", "11.46", "--et1320", "11.49")
	data, _ := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	if !strings.HasPrefix(string(data), strings.Join(append(append([]string{}, logbookHeaderNames()...), "fuel"), ",")+"\n") ||
		strings.Count(string(data), ",8\n") != 65 {
		t.Errorf("the fuel column was not kept:\n%.400s", data)
	}
}

// logbookHeaderNames are the columns of a logbook whose car never changed:
// every column but the change, which is written once a pass has one.
func logbookHeaderNames() []string {
	return slices.DeleteFunc(slices.Clone(logbook.Columns), func(c string) bool { return c == logbook.ChangeColumn })
}

// With the last reading at 13:30 and the clock at 20:40 the card used to say
// "now 13:30" with no caution. Now it says how old the reading is and flags
// it past reading_max_age_min.
func TestCardSaysHowOldTheReadingIs(t *testing.T) {
	dir := demoCopy(t)
	editFile(t, dir, "weather.csv", func(s string) string {
		var keep []string
		for _, l := range strings.SplitAfter(s, "\n") {
			if !strings.HasPrefix(l, "2026-06-13,") || strings.HasPrefix(l, "2026-06-13,13:30") {
				keep = append(keep, l)
			}
		}
		return strings.Join(keep, "")
	})
	out, _, _ := pitcard(t, "card", "--dir", dir, "--round", "3", "--lane", "left")
	for _, w := range []string{"read 13:30, 7 h 10 min ago (OLD)", "the latest weather reading is 7 h 10 min old", "reading_max_age_min"} {
		if !strings.Contains(out, w) {
			t.Errorf("card lacks %q:\n%s", w, out)
		}
	}
	if strings.Contains(out, "now 13:30") {
		t.Errorf("an old reading is shown as now:\n%s", out)
	}
	// a fresh reading is not flagged, and a longer limit is a setting
	fresh := mustRun(t, "card", "--dir", demoCopy(t), "--round", "3", "--lane", "left")
	if !strings.Contains(fresh, "read 20:30, 10 min ago") || strings.Contains(fresh, "OLD") {
		t.Errorf("fresh card:\n%.600s", fresh)
	}
	t.Setenv("PITCARD_READING_MAX_AGE_MIN", "600")
	if out, _, _ := pitcard(t, "card", "--dir", dir, "--round", "3", "--lane", "left"); strings.Contains(out, "(OLD)") {
		t.Errorf("reading_max_age_min 600 still flags a 7-hour reading:\n%.600s", out)
	}
}

// limit_et: .nan used to pass the safety check ("against the car's NaN
// limit"). A non-finite number anywhere in car.yaml is refused with its file
// and line; the card prints the rest and no check passes on it.
func TestNonFiniteYAMLIsRefused(t *testing.T) {
	dir := demoCopy(t)
	editFile(t, dir, "car.yaml", func(s string) string { return strings.Replace(s, "limit_et: 10.65", "limit_et: .nan", 1) })
	out, errs, code := pitcard(t, "card", "--dir", dir, "--round", "3", "--lane", "left")
	all := out + errs
	if code != 2 || !strings.Contains(all, "car.yaml line 16: limit_et \".nan\" is not a finite number") {
		t.Errorf("exit %d:\n%s", code, all)
	}
	if strings.Contains(all, "NaN") || strings.Contains(all, "PASS ET limit") {
		t.Errorf("a NaN limit reached a check:\n%s", all)
	}
	// a yes/no written as text gets a word on the card
	dir = demoCopy(t)
	editFile(t, dir, "car.yaml", func(s string) string { return strings.Replace(s, "chute: false", "chute: yes", 1) })
	// and, as the parachute cannot be checked on it, a failed check that
	// stops the dial (exit 3)
	out, _, code = pitcard(t, "card", "--dir", dir, "--round", "3", "--lane", "left")
	flat := strings.Join(strings.Fields(out), " ")
	if code != 3 || !strings.Contains(flat, "car.yaml line 18: chute: yes is read as the text") || !strings.Contains(flat, `A CHECK FAILED: Car's limits: chute "yes" in car.yaml is text, not true or false`) {
		t.Errorf("chute: yes not pointed out (exit %d):\n%s", code, out)
	}
	// the same for the crew's settings
	dir = demoCopy(t)
	editFile(t, dir, "pitcard.yaml", func(s string) string { return strings.Replace(s, "breakout_risk: 0.10", "breakout_risk: .inf", 1) })
	if _, errs, code := pitcard(t, "dial", "--dir", dir); code != 2 || !strings.Contains(errs, "pitcard.yaml line") || !strings.Contains(errs, "breakout_risk") {
		t.Errorf("breakout_risk: .inf: exit %d %s", code, errs)
	}
}

// pitcardAt runs a command with stdin and the clock at now.
func pitcardAt(t *testing.T, now time.Time, stdin string, args ...string) (string, string, int) {
	t.Helper()
	var out, errb bytes.Buffer
	s := &IOStreams{In: strings.NewReader(stdin), Out: &out, Err: &errb, Now: func() time.Time { return now }}
	code := run(args, s)
	return out.String(), errb.String(), code
}

// In a copy of the demo, months after its day, 'round' printed the card for
// the demo day and then logged the reading and the slip under today's date.
// One clock now serves the whole round.
func TestRoundKeepsOneClock(t *testing.T) {
	dir := demoCopy(t)
	december := time.Date(2026, 12, 1, 19, 5, 0, 0, time.Local)
	answers := "\n\n\n\n\n\n\n\n\n\n\n.024\n1.611\n4.681\n7.301\n93.81\n9.566\n11.482\n117.52\n\n"
	out, errs, code := pitcardAt(t, december, answers, "round", "--dir", dir)
	if code != 0 {
		t.Fatalf("exit %d\n%s\n%s", code, out, errs)
	}
	if !strings.Contains(out, "Sat 2026-06-13") || !strings.Contains(out, "Logged 2026-06-13 20:30 round 3") {
		t.Errorf("the round did not keep the demo day's clock:\n%s", out)
	}
	for _, f := range []string{"weather.csv", "logbook.csv"} {
		data, _ := os.ReadFile(filepath.Join(dir, f))
		if strings.Contains(string(data), "2026-12-01") {
			t.Errorf("%s got a row dated today:\n%s", f, data)
		}
	}
}

// 'round' checked the slip only after all its answers and dropped the whole
// slip for one bad field. Now a bad field is asked again at once, and a
// check across fields (times increasing) asks the field it names again.
func TestRoundAsksABadSlipFieldAgain(t *testing.T) {
	dir := demoCopy(t)
	answers := strings.Join([]string{"", "", "", "", "", "", "", "", "", "", // round, six readings, lane, opponent, run
		"",             // dial
		"fast", ".024", // RT: asked again
		"1.611", "4.681", // 60, 330
		"7.301", "93.81", "4.5", // 1/8, mph, 1000 ft before the eighth: asked again after the slip
		"11.482", "117.52", "", // 1/4, mph, notes
		"",      // what changed on the car: nothing
		"9.566", // 1000 ft, again
	}, "\n") + "\n"
	out, errs, code := pitcardIn(t, answers, "round", "--dir", dir)
	if code != 0 {
		t.Fatalf("exit %d\n%s\n%s", code, out, errs)
	}
	if strings.Count(out, "Reaction time (.021; a red light is negative): ") != 2 || !strings.Contains(out, "1000 ft: 1/4 mile ET") || !regexp.MustCompile(`1000 ft: (Other lane|Logged)`).MatchString(out) || !strings.Contains(out, "increase with distance") ||
		!strings.Contains(out, "Logged 2026-06-13 20:40 round 3, left lane: 11.482") {
		t.Errorf("the slip was not asked again field by field:\n%s", out)
	}
}

// 'log add --dial 1.619 --et1320 11.85' passed without a word.
func TestLogAddWarnsOfADialFarFromTheETs(t *testing.T) {
	dir := demoCopy(t)
	_, errs, code := pitcard(t, "log", "add", "--dir", dir, "--session", "E3", "--lane", "left", "--dial", "1.619", "--et1320", "11.85")
	if code != 0 || !strings.Contains(errs, "the dial 1.619 is 10.23 s from the 1320-ft ET 11.850") {
		t.Errorf("exit %d, %s", code, errs)
	}
}

// On a full disk 'round' printed no card ("writing weather.csv: no space
// left"). Now the card prints with the reading, and the crew hears it was not
// saved. A reading in a minute already logged is never replaced silently:
// 'round' asks, 'weather add' refuses unless --replace.
func TestRoundOnAFullDiskStillPrintsTheCard(t *testing.T) {
	dir := demoCopy(t)
	saved := safefile.FailWrites
	t.Cleanup(func() { safefile.FailWrites = saved }) // the seam is the process's: give it back as found
	safefile.FailWrites = func(string) error { return syscall.ENOSPC }
	out, errs, code := pitcardIn(t, "E3\n81.5F\n\n\n\n\n\nleft\n\n", "round", "--dir", dir, "--no-log")
	if code != 1 || !strings.Contains(out, "POST THIS") || !strings.Contains(errs, "the reading was NOT saved") ||
		!strings.Contains(errs, "no space left on device") || !strings.Contains(out, "81.5 °F") {
		t.Errorf("full disk: exit %d\n%s\n%s", code, out, errs)
	}
	safefile.FailWrites = nil
	reading := []string{"weather", "add", "--dir", dir, "--time", "20:30", "--temp", "80F", "--baro", "27.6inHg", "--humidity", "40%"}
	if _, errs, code := pitcard(t, reading...); code != 2 || !strings.Contains(errs, "already has a reading at 2026-06-13 20:30") || !strings.Contains(errs, "--replace") {
		t.Errorf("weather add over a logged minute: exit %d %s", code, errs)
	}
	mustRun(t, append(reading, "--replace")...)
	// round at 20:30 with other values asks before replacing; N keeps the logged one
	at2030 := time.Date(2026, 6, 13, 20, 30, 0, 0, time.Local)
	out, _, _ = pitcardAt(t, at2030, "E3\n79F\n\n\n\n\n\nleft\n\nN\n", "round", "--dir", dir, "--no-log")
	if !strings.Contains(out, "already logged with other values: replace it? (y/N)") || !strings.Contains(out, "Kept the logged reading") {
		t.Errorf("round over a logged minute:\n%s", out)
	}
}

// Outside an event folder 'air' failed for want of track.yaml, though a
// station reading needs the elevation only for the altimeter setting.
func TestAirOutsideAFolder(t *testing.T) {
	empty := t.TempDir()
	out, errs, code := pitcard(t, "air", "--dir", empty, "--temp", "88F", "--baro", "28.92inHg", "--humidity", "40%")
	if code != 0 || !strings.Contains(out, "Density altitude") || !strings.Contains(out, "needs the track's elevation") ||
		!strings.Contains(errs, "the altimeter setting is left out") {
		t.Errorf("exit %d\n%s\n%s", code, out, errs)
	}
	// an altimeter setting does need the elevation
	if _, errs, code := pitcard(t, "air", "--dir", empty, "--temp", "88F", "--baro", "29.92inHg", "--baro-kind", "altimeter", "--humidity", "40%"); code != 2 || !strings.Contains(errs, "track.yaml") {
		t.Errorf("altimeter setting without elevation: exit %d %s", code, errs)
	}
}

// A bad setting from the environment used to be named by its key alone; it is
// named by its variable, and one from pitcard.yaml by its line.
func TestSettingErrorsSayWhereTheyCameFrom(t *testing.T) {
	dir := demoCopy(t)
	t.Setenv("PITCARD_DIAL_STEP", "0.5")
	if _, errs, code := pitcard(t, "dial", "--dir", dir); code != 2 || !strings.Contains(errs, "PITCARD_DIAL_STEP (setting dial_step) \"0.5\" is outside 0.001..0.1 s") {
		t.Errorf("env: exit %d %s", code, errs)
	}
	t.Setenv("PITCARD_DIAL_STEP", "")
	editFile(t, dir, "pitcard.yaml", func(s string) string { return strings.Replace(s, "tree: full", "tree: christmas", 1) })
	if _, errs, code := pitcard(t, "dial", "--dir", dir); code != 2 || !strings.Contains(errs, "pitcard.yaml line") || !strings.Contains(errs, "tree") {
		t.Errorf("file: exit %d %s", code, errs)
	}
}

// Words a racer reads: sensitivities said as quicker or slower, per cause,
// in the card's units; the explanation says what its figures are; water in
// g/kg on a metric air report; the session named one way on the card.
func TestCardWords(t *testing.T) {
	out := mustRun(t, "card", "--demo")
	for _, re := range []string{`a 10 °F hotter track 0\.\d{3} s (quicker|slower)`, `\(ran 11\.\d{3}; 11\.\d{3} in this`} {
		if !regexp.MustCompile(re).MatchString(out) {
			t.Errorf("card lacks %s:\n%s", re, out)
		}
	}
	for _, w := range []string{"10 °F warmer air", "0.10 inHg lower barometer", "10 % more humidity",
		"from the barometer alone", "06-13 round 2", "│ T1 "} {
		if !strings.Contains(out, w) {
			t.Errorf("card lacks %q:\n%s", w, out)
		}
	}
	for _, w := range []string{"-0.014 s per 10 °F", "→", "06-13 E2", "2026-05-16 round 2"} {
		if strings.Contains(out, w) {
			t.Errorf("card still says %q", w)
		}
	}
	metric := mustRun(t, "card", "--demo", "--units", "metric")
	if !strings.Contains(metric, "a 5 °C hotter track") || !strings.Contains(metric, "15 km/h more") || strings.Contains(metric, "10 °F hotter") || strings.Contains(metric, "10 °F warmer") {
		t.Errorf("metric card sensitivities:\n%s", metric)
	}
	if air := mustRun(t, "air", "--demo", "--units", "metric"); !strings.Contains(air, "g/kg") || strings.Contains(air, "grains") {
		t.Errorf("metric air:\n%s", air)
	}
	if list := mustRun(t, "log", "list", "--demo"); strings.Contains(list, "Ses.") || !strings.Contains(list, "Round") {
		t.Errorf("log list header:\n%s", list)
	}
	if stats := mustRun(t, "log", "stats", "--demo"); strings.Contains(stats, "in air ±1σ") || !strings.Contains(stats, "corrected") {
		t.Errorf("log stats header:\n%s", stats)
	}
}

// Shipped rules and docs that contradicted themselves.
func TestShippedWordsAgree(t *testing.T) {
	list := mustRun(t, "rules", "list", "--demo")
	if !strings.Contains(list, "before the car goes to the lanes.") {
		t.Errorf("rules list cuts a description mid-sentence:\n%s", list)
	}
	// 20-track-temp.lua points at a card section by the name the card prints
	src, _ := os.ReadFile(filepath.Join("..", "..", "scripts", "rules", "20-track-temp.lua"))
	card := mustRun(t, "card", "--demo")
	if !strings.Contains(string(src), `"Today so far: predicted against actual"`) || !strings.Contains(card, "Today so far: predicted against actual") {
		t.Errorf("the track-temp rule names a card section the card does not have")
	}
	// the tire-pressure rule's words match its table (firmer when cool)
	tire, _ := os.ReadFile(filepath.Join("..", "..", "scripts", "rules", "40-tire-pressure.lua"))
	if !strings.Contains(string(tire), "firmest on a cool track") || !strings.Contains(string(tire), "{80, 16.5}") || !strings.Contains(string(tire), "{999, 14.5}") {
		t.Errorf("the tire-pressure rule's comment and table disagree")
	}
	// a forecast that carries one reading does not claim minutes of trend
	dir := demoCopy(t)
	editFile(t, dir, "weather.csv", func(s string) string {
		var keep []string
		for _, l := range strings.SplitAfter(s, "\n") {
			if !strings.HasPrefix(l, "2026-06-13,") || strings.HasPrefix(l, "2026-06-13,20:05") || strings.HasPrefix(l, "2026-06-13,20:30") {
				keep = append(keep, l)
			}
		}
		return strings.Join(keep, "")
	})
	out := mustRun(t, "weather", "forecast", "--dir", dir, "--at", "20:45")
	if !strings.Contains(out, "Leaned on one reading, carried as it is") || strings.Contains(out, "Leaned on 1 reading") {
		t.Errorf("forecast summary:\n%s", out)
	}
}

// Lines past the width: one card line was 117 columns; log list --wide and
// log stats were 115 and 122. Piped output fits 100 columns, a terminal its
// own width.
func TestOutputFitsTheWidth(t *testing.T) {
	dir := demoCopy(t)
	long := "function checks(ctx)\n  return {{label = 'Long rule', status = 'warn', note = '" + strings.Repeat("a very long note about the car ", 8) + "'}}\nend\nfunction dial(ctx) return 0.01, '" +
		strings.Repeat("a reason that goes on and on ", 6) + "' end\n"
	_ = os.WriteFile(filepath.Join(dir, "rules", "70-long.lua"), []byte(long), 0o644)
	widest := func(s string) (int, string) {
		w, line := 0, ""
		for _, l := range strings.Split(s, "\n") {
			if n := utf8.RuneCountInString(l); n > w {
				w, line = n, l
			}
		}
		return w, line
	}
	for _, args := range [][]string{{"card", "--round", "3", "--lane", "left"}, {"log", "list", "--wide"}, {"log", "stats"},
		{"predict", "--latest"}, {"dial"}, {"air", "--latest"}, {"weather", "list"}} {
		out := mustRun(t, append(args, "--dir", dir)...)
		if w, line := widest(out); w > 100 {
			t.Errorf("%v: a line of %d columns:\n%s", args, w, line)
		}
	}
	// An 80-column terminal: log stats was 92 wide, log list 88, race 99
	// (a winner line 101 and more), dial's recommendation line 86.
	race := []string{"race", "--left-dial", "11.52", "--left-rt", ".021", "--left-et", "11.538", "--left-mph", "116.79",
		"--right-dial", "12.10", "--right-rt", "-.034", "--right-et", "12.118", "--right-foul"}
	for _, args := range [][]string{{"card", "--round", "3", "--lane", "left"}, {"log", "stats"}, {"log", "list"}, {"log", "list", "--last", "80"},
		race, {"dial", "--opponent-dial", "11.40"}, {"dial", "--dial-step", "0.005", "--opponent-dial", "10.125"},
		{"predict", "--latest"}, {"air", "--latest"}, {"weather", "list"}, {"rules", "list"}} {
		t.Run(strings.Join(args, " "), func(t *testing.T) {
			var out, errb bytes.Buffer
			s := &IOStreams{In: strings.NewReader(""), Out: &out, Err: &errb, Now: func() time.Time { return fixedNow }, Terminal: true, Width: 80}
			if code := run(append(args, "--dir", dir), s); code != 0 {
				t.Fatalf("exit %d %s", code, errb.String())
			}
			plain := regexp.MustCompile("\x1b\\[[0-9;]*m").ReplaceAllString(out.String(), "")
			if w, line := widest(plain); w > 80 {
				t.Errorf("an 80-column terminal got a line of %d:\n%s", w, line)
			}
		})
	} // the NO DIAL YET guide, a noisy forecast's note and warnings on
	// standard error wrap too
	sparse := t.TempDir()
	mustRun(t, "init", filepath.Join(sparse, "ev"))
	sparse = filepath.Join(sparse, "ev")
	for i, temp := range []string{"70F", "90F", "66F", "88F"} {
		mustRun(t, "weather", "add", "--dir", sparse, "--time", fmt.Sprintf("19:%02d", 10*i), "--temp", temp, "--baro", "28.9inHg", "--humidity", "40%")
	}
	for _, args := range [][]string{{"dial"}, {"weather", "forecast", "--at", "20:20"}, {"card", "--round", "E1", "--at", "23:50"}} {
		t.Run(strings.Join(args, " ")+" (sparse)", func(t *testing.T) {
			var out, errb bytes.Buffer
			s := &IOStreams{In: strings.NewReader(""), Out: &out, Err: &errb, Now: func() time.Time { return fixedNow }, Terminal: true, Width: 80}
			run(append(args, "--dir", sparse), s)
			plain := regexp.MustCompile("\x1b\\[[0-9;]*m").ReplaceAllString(out.String()+errb.String(), "")
			if w, line := widest(plain); w > 80 {
				t.Errorf("an 80-column terminal got a line of %d:\n%s", w, line)
			}
		})
	}
}

// dial's posted row stood one character left of the others: its highlight
// padded the dial on both sides in a right-aligned column.
func TestPostedDialLinesUp(t *testing.T) {
	var out, errb bytes.Buffer
	s := &IOStreams{In: strings.NewReader(""), Out: &out, Err: &errb, Now: func() time.Time { return fixedNow }, Terminal: true, Width: 80}
	if code := run([]string{"dial", "--demo"}, s); code != 0 {
		t.Fatalf("exit %d %s", code, errb.String())
	}
	plain := regexp.MustCompile("\x1b\\[[0-9;]*m").ReplaceAllString(out.String(), "")
	ends := map[int]bool{}
	for _, l := range strings.Split(plain, "\n") {
		if m := regexp.MustCompile(`^│ *(\d+\.\d+) *│`).FindStringSubmatchIndex(l); m != nil {
			ends[utf8.RuneCountInString(l[:m[3]])] = true
		}
	}
	if len(ends) != 1 {
		t.Errorf("the dials end in %d different columns:\n%s", len(ends), plain)
	}
}

// dial --format markdown on a terminal wrote ANSI color codes into the
// document.
func TestNoColourInDocuments(t *testing.T) {
	for _, args := range [][]string{{"dial", "--demo", "--format", "markdown"}, {"card", "--demo", "--format", "markdown"},
		{"log", "list", "--demo", "--format", "markdown"}, {"card", "--demo", "--format", "html"}, {"card", "--demo", "--format", "json"}} {
		var out, errb bytes.Buffer
		s := &IOStreams{In: strings.NewReader(""), Out: &out, Err: &errb, Now: func() time.Time { return fixedNow }, Terminal: true, Width: 120}
		if code := run(args, s); code != 0 || out.Len() < 200 {
			t.Errorf("%v: exit %d, %d bytes written: %s", args, code, out.Len(), errb.String())
		}
		if strings.Contains(out.String(), "\x1b[") {
			t.Errorf("%v: color codes in a document", args)
		}
	}
	// the control: the same stream does colour a screen's text, so the
	// documents' lack of it is the format's doing, not the stream's
	var out bytes.Buffer
	s := &IOStreams{In: strings.NewReader(""), Out: &out, Err: &bytes.Buffer{}, Now: func() time.Time { return fixedNow }, Terminal: true, Width: 120}
	if code := run([]string{"dial", "--demo"}, s); code != 0 || !strings.Contains(out.String(), "\x1b[") {
		t.Errorf("dial --demo on a terminal: exit %d, no colour codes; the control does not hold", code)
	}
}

// Conventions of a Go command-line tool: --version; one flag name per
// meaning; the file flags on every command that reads the files; the dial
// settings on every command that makes a dial; --out on every document.
func TestCommandLineConventions(t *testing.T) {
	if out := mustRun(t, "--version"); !strings.HasPrefix(out, "pitcard ") {
		t.Errorf("--version: %q", out)
	}
	dir := demoCopy(t)
	other := filepath.Join(t.TempDir(), "other-car.yaml")
	data, _ := os.ReadFile(filepath.Join(dir, "car.yaml"))
	_ = os.WriteFile(other, []byte(strings.Replace(string(data), "name: Whitlock 71 Ember", "name: Borrowed Sled", 1)), 0o644)
	// a rule that logs the car's name: rules try shows what it logged, so
	// the name read from --car-file must appear there
	_ = os.WriteFile(filepath.Join(dir, "rules", "99-car-name.lua"), []byte("function notes(ctx)\n  pit.log(\"car\", ctx.car.name)\n  return {}\nend\n"), 0o644)
	for _, args := range [][]string{{"card", "--round", "3", "--lane", "left"}, {"rules", "try", "--round", "3", "--lane", "left"}} {
		if out := mustRun(t, append(args, "--dir", dir, "--car-file", other)...); !strings.Contains(out, "Borrowed Sled") || strings.Contains(out, "Whitlock 71 Ember") {
			t.Errorf("%v --car-file: the other car was not read:\n%.300s", args, out)
		}
	}
	if out := mustRun(t, "rules", "try", "--round", "3", "--lane", "left", "--dir", dir); !strings.Contains(out, "log: car Whitlock 71 Ember") {
		t.Errorf("rules try without --car-file: the folder's car was not read:\n%.300s", out)
	}
	_ = os.Remove(filepath.Join(dir, "rules", "99-car-name.lua"))
	if out := mustRun(t, "card", "--dir", dir, "--car-file", other, "--round", "3", "--lane", "left"); !strings.Contains(out, "Borrowed Sled") {
		t.Errorf("card --car-file:\n%.300s", out)
	}
	if out := mustRun(t, "card", "--dir", dir, "--round", "3", "--lane", "left", "--breakout-risk", "0.02", "--dial-step", "0.001"); !strings.Contains(out, "risk accepted 2 %") {
		t.Errorf("card --breakout-risk:\n%.600s", out)
	}
	for _, args := range [][]string{{"dial", "--format", "markdown"}, {"predict", "--latest", "--format", "json"}, {"log", "list"}, {"log", "stats"},
		{"weather", "list"}, {"air", "--latest"}, {"rules", "list"}} {
		path := filepath.Join(t.TempDir(), "doc")
		out := mustRun(t, append(args, "--dir", dir, "--out", path)...)
		got, err := os.ReadFile(path)
		if err != nil || len(got) < 50 || !strings.Contains(out, "Wrote "+path) {
			t.Errorf("%v --out: %v, %d bytes, said %q", args, err, len(got), out)
		}
	}
	if _, errs, _ := pitcard(t, "weather", "add", "--dir", dir, "--time", "21:00", "--temp", "80F", "--baro", "27.6", "--humidity", "40", "--notes", "hand meter"); errs != "" {
		t.Errorf("weather add --notes: %s", errs)
	}
}

// Completion for every enumerated flag, and --round from the schedule.
func TestCompletion(t *testing.T) {
	for _, tc := range []struct {
		args []string
		want []string
	}{
		{[]string{"__complete", "card", "--format", ""}, []string{"text", "markdown", "html", "json"}},
		{[]string{"__complete", "log", "add", "--lane", ""}, []string{"left", "right"}},
		{[]string{"__complete", "weather", "add", "--baro-kind", ""}, []string{"station", "altimeter"}},
		{[]string{"__complete", "predict", "--prep", ""}, []string{"none", "light", "full"}},
		{[]string{"__complete", "air", "--units", ""}, []string{"imperial", "metric"}},
		{[]string{"__complete", "card", "--dir", filepath.Join("..", "..", "event", "demo"), "--round", ""}, []string{"T1\ttime trial 1, called 15:10", "E5"}},
	} {
		out, _, _ := pitcard(t, tc.args...)
		for _, w := range tc.want {
			if !strings.Contains(out, w) {
				t.Errorf("%v: %q lacks %q", tc.args, out, w)
			}
		}
	}
}

// Racing the other lane: the dial table and the card carry the chance to
// win and the head start; dial's JSON gains win_chance and best_for_win;
// log add with the other lane's slip says what decided the round.
func TestTheOtherLane(t *testing.T) {
	out := mustRun(t, "dial", "--demo", "--opponent-dial", "12.10")
	for _, w := range []string{"To win", "wins most", "you leave 0.", "after the other lane", "40000 races drawn per dial"} {
		if !strings.Contains(strings.Join(strings.Fields(out), " "), w) {
			t.Errorf("dial lacks %q:\n%s", w, out)
		}
	}
	var j struct {
		Options []struct {
			Dial      json.Number `json:"dial"`
			WinChance *float64    `json:"win_chance"`
		} `json:"options"`
		BestForWin *struct {
			Dial      json.Number `json:"dial"`
			WinChance float64     `json:"win_chance"`
		} `json:"best_for_win"`
	}
	if err := json.Unmarshal([]byte(mustRun(t, "dial", "--demo", "--opponent-dial", "12.10", "--format", "json")), &j); err != nil {
		t.Fatal(err)
	}
	if j.BestForWin == nil || len(j.Options) == 0 || j.Options[0].WinChance == nil || !(j.BestForWin.WinChance > 0 && j.BestForWin.WinChance < 1) {
		t.Errorf("dial JSON: %+v", j)
	}
	// an opponent seen to run dead on his dial with sharp lights: the chance falls
	easy := mustRun(t, "dial", "--demo", "--opponent-dial", "12.10", "--opponent-margin", "0.06", "--opponent-sd", "0.05", "--format", "json")
	hard := mustRun(t, "dial", "--demo", "--opponent-dial", "12.10", "--opponent-et", "12.112,12.105,12.108", "--opponent-rt", ".011,.014,.009", "--format", "json")
	var e, h struct {
		BestForWin struct {
			WinChance float64 `json:"win_chance"`
		} `json:"best_for_win"`
	}
	_ = json.Unmarshal([]byte(easy), &e)
	_ = json.Unmarshal([]byte(hard), &h)
	if !(e.BestForWin.WinChance > h.BestForWin.WinChance+0.1) {
		t.Errorf("a wild opponent %.3f, a sharp one %.3f", e.BestForWin.WinChance, h.BestForWin.WinChance)
	}
	card := mustRun(t, "card", "--demo", "--opponent-dial", "12.10")
	for _, w := range []string{"To win", "the dial that wins most is", "you leave 0.", "posted: your breakout rule's"} {
		if !strings.Contains(strings.Join(strings.Fields(card), " "), w) {
			t.Errorf("card lacks %q:\n%s", w, card)
		}
	}
	dir := demoCopy(t)
	out, errs, code := pitcard(t, "log", "add", "--dir", dir, "--session", "E3", "--lane", "left", "--dial", "11.41", "--rt", ".021", "--et1320", "11.436",
		"--opponent-dial", "12.10", "--opponent-rt", ".045", "--opponent-et", "12.142")
	if code != 0 || !strings.Contains(out, "You won: first to the finish") || !strings.Contains(strings.Join(strings.Fields(out), " "), "yours 0.021 reaction, +0.026 over the dial: +0.047") {
		t.Errorf("log add with the other lane: exit %d\n%s%s", code, out, errs)
	}
	if _, errs, code := pitcard(t, "log", "add", "--dir", dir, "--session", "E4", "--lane", "left", "--dial", "11.41", "--rt", ".021", "--et1320", "11.436", "--opponent-dial", "12.1"); code != 2 || !strings.Contains(errs, "whole") {
		t.Errorf("half an opponent slip: exit %d %s", code, errs)
	}
}
