package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// lastLine is the last row of a folder's logbook.
func lastLine(t *testing.T, dir string) string {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimRight(string(data), "\n"), "\n")
	return lines[len(lines)-1]
}

// log add --change writes the crew's words for what changed on the car in
// the logbook's change column (quoted, commas and quotes kept); the list
// shows it briefly, its JSON whole.
func TestLogAddChange(t *testing.T) {
	dir := newFolder(t)
	const change = `new converter, "5400" stall and a 4.10 rear gear`
	mustRun(t, "log", "add", "--dir", dir, "--time", "19:10", "--round", "E1", "--lane", "left", "--et60", "1.612", "--et1320", "11.538",
		"--notes", "good launch", "--change", change)
	data, _ := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	header, _, _ := strings.Cut(string(data), "\n")
	if !strings.HasSuffix(header, ",notes,change") {
		t.Errorf("header %q lacks the change column after the notes", header)
	}
	if row := lastLine(t, dir); !strings.HasSuffix(row, `,good launch,"new converter, ""5400"" stall and a 4.10 rear gear"`) {
		t.Errorf("the row written: %s", row)
	}
	var passes []map[string]any
	if err := json.Unmarshal([]byte(mustRun(t, "log", "list", "--dir", dir, "--format", "json")), &passes); err != nil || len(passes) != 1 {
		t.Fatalf("json: %v %v", passes, err)
	}
	if passes[0]["change"] != change || passes[0]["notes"] != "good launch" {
		t.Errorf("json change %q notes %q", passes[0]["change"], passes[0]["notes"])
	}
	list := mustRun(t, "log", "list", "--dir", dir, "--format", "markdown")
	if !strings.Contains(list, `changed: new converter, "5400"…; good launch`) || strings.Contains(list, "rear gear") {
		t.Errorf("the list must show the change briefly:\n%s", list)
	}
	// A pass without a change: the column left blank, the list as before.
	mustRun(t, "log", "add", "--dir", dir, "--time", "20:10", "--round", "E2", "--lane", "left", "--et1320", "11.54", "--notes", "shook")
	if row := lastLine(t, dir); !strings.HasSuffix(row, ",shook,") {
		t.Errorf("a pass without a change: %s", row)
	}
	if list := mustRun(t, "log", "list", "--dir", dir, "--format", "markdown"); strings.Count(list, "changed:") != 1 {
		t.Errorf("one pass changed the car:\n%s", list)
	}
}

// The guided round asks what changed on the car with the slip (Enter:
// nothing), asks again for an answer it cannot keep, and logs it.
func TestGuidedRoundAsksForTheChange(t *testing.T) {
	dir := demoCopy(t)
	answers := strings.Join([]string{
		"", "81.5F", "", "52F", "2", "SE", "88", "", "11.52", // the round and its reading, as TestGuidedRound
		"", // the round is run
		"", // dial: keep the card's
		".024", "1.611", "4.681", "7.301", "93.81", "9.566", "11.482", "117.52",
		"good launch",                       // notes
		strings.Repeat("x", 201),            // the change: too long, asked again
		"swapped to the 5400 stall, +2 psi", // the change
		"",                                  // the other lane's slip: skipped
	}, "\n") + "\n"
	out, errs, code := pitcardIn(t, answers, "round", "--dir", dir)
	if code != 0 {
		t.Fatalf("exit %d\n%s\n%s", code, errs, out)
	}
	if !strings.Contains(out, "What changed on the car") || !strings.Contains(out, "at most 200") {
		t.Errorf("the round must ask for the change, and refuse a long one:\n%s", out)
	}
	if row := lastLine(t, dir); !strings.HasSuffix(row, `,good launch,"swapped to the 5400 stall, +2 psi"`) {
		t.Errorf("the slip logged: %s", row)
	}
	// Enter: nothing changed.
	dir = demoCopy(t)
	answers = strings.Replace(answers, strings.Repeat("x", 201)+"\nswapped to the 5400 stall, +2 psi\n", "\n", 1)
	if out, errs, code := pitcardIn(t, answers, "round", "--dir", dir); code != 0 {
		t.Fatalf("exit %d\n%s\n%s", code, errs, out)
	}
	// The demo's logbook has no change column: it keeps its columns.
	if row := lastLine(t, dir); !strings.HasSuffix(row, ",3350,good launch") {
		t.Errorf("no change: %s", row)
	}
}

// A change made since the last pass (card --change) is not yet shown by any
// pass: the card says so and its interval widens by a change of unknown
// size, which moves the dial quicker; without it the demo's card is as
// before. A change of a few percent of power is common practice (no source).
func TestCardWithAPendingChange(t *testing.T) {
	plain := mustRun(t, "card", "--demo", "--format", "json")
	changed, _, code := pitcard(t, "card", "--demo", "--change", "new converter", "--format", "json")
	if code != 0 {
		t.Fatalf("card --change exit %d", code)
	}
	width := func(out string) float64 {
		var j struct {
			Prediction struct {
				Timers []map[string]float64 `json:"timers"`
			} `json:"prediction"`
		}
		if err := json.Unmarshal([]byte(out), &j); err != nil || len(j.Prediction.Timers) == 0 {
			t.Fatalf("card JSON: %v", err)
		}
		fin := j.Prediction.Timers[len(j.Prediction.Timers)-1]
		return fin["high"] - fin["low"]
	}
	if a, b := width(plain), width(changed); b < a+0.1 {
		t.Errorf("the finish interval is %.3f s wide without the change and %.3f s with it: a pending change must widen it", a, b)
	}
	text := mustRun(t, "card", "--demo", "--change", "new converter")
	if !strings.Contains(text, `changed since its last pass ("new converter")`) {
		t.Errorf("the card does not say the car was changed:\n%s", text)
	}
	if _, errOut, code := pitcard(t, "card", "--demo", "--change", "a\x01b"); code != 2 || !strings.Contains(errOut, "--change") {
		t.Errorf("a change with a control character: exit %d, %s", code, errOut)
	}
}

// dial takes --change as the card does (the README promises it on card,
// dial and round): a change not yet run widens the spread of both the
// round's dial and the --latest estimate, and the dial posted moves with
// the card's.
func TestDialWithAPendingChange(t *testing.T) {
	type dialOut struct {
		SD          float64     `json:"sd"`
		Recommended json.Number `json:"recommended_dial"`
	}
	read := func(t *testing.T, args ...string) dialOut {
		t.Helper()
		out, errOut, code := pitcard(t, append([]string{"dial", "--demo", "--format", "json"}, args...)...)
		if code != 0 {
			t.Fatalf("dial %v: exit %d: %s", args, code, errOut)
		}
		var j dialOut
		if err := json.Unmarshal([]byte(out), &j); err != nil {
			t.Fatalf("dial %v JSON: %v", args, err)
		}
		return j
	}
	for _, tc := range []struct {
		name string
		args []string
	}{{"the round's card", nil}, {"the latest reading", []string{"--latest"}}} {
		t.Run(tc.name, func(t *testing.T) {
			plain := read(t, tc.args...)
			changed := read(t, append(tc.args, "--change", "new converter")...)
			// engine.ChangePriorShare: 1 % of an 11.4 s ET, added in quadrature
			if changed.SD < plain.SD+0.05 {
				t.Errorf("sd %.4f s without the change, %.4f s with it: a pending change must widen it", plain.SD, changed.SD)
			}
		})
	}
	// the same round, the same pick before the rules as the card's
	card := mustRun(t, "card", "--demo", "--change", "new converter", "--format", "json")
	var c struct {
		Dial struct {
			Recommended json.Number `json:"recommended"`
		} `json:"dial"`
	}
	if err := json.Unmarshal([]byte(card), &c); err != nil {
		t.Fatal(err)
	}
	d := read(t, "--change", "new converter")
	if d.Recommended != c.Dial.Recommended {
		t.Errorf("dial --change picks %s before the rules, the card %s", d.Recommended, c.Dial.Recommended)
	}
}
