package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// demoWithSetup is a copy of the demo whose car.yaml names the setup items
// items (YAML list lines) and whose logbook has the columns header, the
// i-th row's cells cells(i) ("16,stock"); it returns the folder and the
// logbook's lines as written.
func demoWithSetup(t *testing.T, items, header string, cells func(i int) string) (string, []string) {
	t.Helper()
	dir := demoCopy(t)
	car, _ := os.ReadFile(filepath.Join(dir, "car.yaml"))
	writeFile(t, filepath.Join(dir, "car.yaml"), string(car)+"\nsetup:\n"+items)
	book, _ := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	lines := strings.Split(strings.TrimSpace(string(book)), "\n")
	lines[0] += "," + header
	for i := 1; i < len(lines); i++ {
		lines[i] += "," + cells(i)
	}
	writeFile(t, filepath.Join(dir, "logbook.csv"), strings.Join(lines, "\n")+"\n")
	return dir, lines
}

// setupFolder is a new folder whose car.yaml names two setup items.
func setupFolder(t *testing.T) string {
	t.Helper()
	dir := newFolder(t)
	car, err := os.ReadFile(filepath.Join(dir, "car.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	writeFile(t, filepath.Join(dir, "car.yaml"), string(car)+"\nsetup:\n  - {name: rear_psi, unit: psi, range: [6, 40], expect: {et60: 0.010}}\n  - {name: converter, choices: [stock, 5400-stall]}\n")
	return dir
}

// log add --set writes the setup into its columns; an item not given keeps
// the last pass's value; an out-of-range value is refused and nothing is
// written (pitcard's own rules).
func TestLogAddSet(t *testing.T) {
	dir := setupFolder(t)
	slip := []string{"log", "add", "--dir", dir, "--round", "T1", "--lane", "left", "--et60", "1.61", "--et1320", "11.52", "--time", "18:00"}
	out := mustRun(t, append(slip, "--set", "rear_psi=16", "--set", "converter=stock")...)
	if !strings.Contains(out, "Setup: rear_psi 16 psi, converter stock.") {
		t.Errorf("log add said %q", out)
	}
	slip[5], slip[len(slip)-1] = "T2", "18:40"
	out = mustRun(t, append(slip, "--set", "rear_psi=15.5")...)
	if !strings.Contains(out, "rear_psi 15.5 psi, converter stock (kept from the last pass)") {
		t.Errorf("log add said %q", out)
	}
	book, _ := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	lines := strings.Split(strings.TrimSpace(string(book)), "\n")
	if !strings.HasSuffix(lines[0], ",rear_psi,converter") || !strings.HasSuffix(lines[2], ",15.5,stock") {
		t.Errorf("logbook:\n%s", book)
	}
	slip[5], slip[len(slip)-1] = "T3", "19:20"
	_, errs, code := pitcard(t, append(slip, "--set", "rear_psi=55")...)
	if code != 2 || !strings.Contains(errs, `--set rear_psi "55" is outside 6..40 psi`) {
		t.Errorf("exit %d: %s", code, errs)
	}
	if after, _ := os.ReadFile(filepath.Join(dir, "logbook.csv")); string(after) != string(book) {
		t.Error("a refused pass changed the logbook")
	}
	// export and import into a new folder: the setup comes back
	csv := filepath.Join(t.TempDir(), "out.csv")
	mustRun(t, "log", "export", "--dir", dir, "--out", csv)
	other := setupFolder(t)
	mustRun(t, "log", "import", "--dir", other, csv)
	if again, _ := os.ReadFile(filepath.Join(other, "logbook.csv")); !strings.Contains(string(again), ",15.5,stock") {
		t.Errorf("imported:\n%s", again)
	}
	// a bad cell typed into the file by hand is named by line and column, the rest still read
	writeFile(t, filepath.Join(dir, "logbook.csv"), strings.Replace(string(book), ",15.5,stock", ",15.5,turbo", 1))
	_, errs, _ = pitcard(t, "log", "list", "--dir", dir)
	if !strings.Contains(errs, "logbook.csv line 3: converter \"turbo\" is not one of stock, 5400-stall") || !strings.Contains(errs, "the other 1 pass") {
		t.Errorf("list with a bad cell: %s", errs)
	}
}

// log setup names each item: the numeric one with its passes and values
// (or "not enough variation"), the choice one with the pass it changed on.
func TestLogSetupCommand(t *testing.T) {
	dir := setupFolder(t)
	lines := strings.Split(strings.TrimSpace(season(30)), "\n")
	lines[0] += ",rear_psi,converter"
	for i := 1; i < len(lines); i++ {
		conv := "stock"
		if i > 20 {
			conv = "5400-stall"
		}
		lines[i] += "," + []string{"14", "15", "16", "17", "18"}[i%5] + "," + conv
	}
	src := filepath.Join(t.TempDir(), "season.csv")
	writeFile(t, src, strings.Join(lines, "\n")+"\n")
	mustRun(t, "log", "import", "--dir", dir, src)
	out := mustRun(t, "log", "setup", "--dir", dir)
	for _, w := range []string{"rear_psi: ", "from 30 passes with 14–18 psi", "converter: a choice, changed on 2026-05-04 17:00", "(stock → 5400-stall)"} {
		if !strings.Contains(out, w) {
			t.Errorf("log setup lacks %q:\n%s", w, out)
		}
	}
}

// card --set: the prediction carries a line per changed item, the finish
// moves, and a rule sees ctx.setup's planned and last values.
func TestCardSetAndRules(t *testing.T) {
	dir, lines := demoWithSetup(t, "  - {name: rear_psi, unit: psi, range: [6, 40], expect: {et60: 0.010}}\n", "rear_psi", func(i int) string { return []string{"15", "16", "17", "16.5", "15.5"}[i%5] })
	writeFile(t, filepath.Join(dir, "rules", "70-psi.lua"), `function dial(ctx)
  local s = ctx.setup
  if s and s.planned.rear_psi < s.last.rear_psi then
    return 0.01, string.format("planned %.1f psi, last %.1f", s.planned.rear_psi, s.last.rear_psi)
  end
  return 0
end
`)
	last := strings.Split(lines[len(lines)-1], ",")
	lastPSI := last[len(last)-1]
	args := []string{"card", "--dir", dir, "--round", "3", "--lane", "left", "--at", "20:45", "--format", "json"}
	plain := mustRun(t, args...)
	set := mustRun(t, append(args, "--set", "rear_psi=12")...)
	if !strings.Contains(set, "setup: rear_psi 12 psi (was "+lastPSI+"): 60 ft") || strings.Contains(plain, "setup: rear_psi") {
		t.Errorf("card --set lacks the setup line:\n%s", set)
	}
	if plain == set {
		t.Error("a planned setup changed nothing")
	}
	try := mustRun(t, "rules", "try", "--dir", dir, "--round", "3", "--lane", "left", "--at", "20:45", "--set", "rear_psi=12")
	if !strings.Contains(try, "planned 12.0 psi, last "+lastPSI) {
		t.Errorf("the rule did not see ctx.setup:\n%s", try)
	}
	_, errs, code := pitcard(t, append(args, "--set", "rear_psi=99")...)
	if code != 2 || !strings.Contains(errs, `--set rear_psi "99" is outside 6..40 psi`) {
		t.Errorf("exit %d: %s", code, errs)
	}
}

// The guided round asks each setup item, Enter keeping the last pass's
// value; the card plans the typed one and the slip logs it.
func TestGuidedRoundSetup(t *testing.T) {
	dir, lines := demoWithSetup(t, "  - {name: rear_psi, unit: psi, range: [6, 40], expect: {et60: 0.010}}\n  - {name: converter, choices: [stock, 5400-stall]}\n", "rear_psi,converter", func(i int) string { return []string{"15", "16", "17", "16.5", "15.5"}[i%5] + ",stock" })
	last := strings.Split(lines[len(lines)-1], ",")
	lastPSI := last[len(last)-2]
	answers := strings.Join([]string{
		"", "81.5F", "", "52F", "2", "SE", "88", "", // round and the air, the lane
		"55",    // rear_psi out of range: asked again
		"12psi", // rear_psi with its unit
		"",      // converter: keep stock
		"11.52", // opponent's dial
		"",      // the round is run
		"", ".024", "1.611", "4.681", "7.301", "93.81", "9.566", "11.482", "117.52", "", "",
	}, "\n") + "\n"
	out, errs, code := pitcardIn(t, answers, "round", "--dir", dir)
	if code != 0 {
		t.Fatalf("exit %d\n%s\n%s", code, errs, out)
	}
	for _, w := range []string{"rear_psi, psi (6..40) [" + lastPSI + "]", `--set rear_psi "55" is outside 6..40 psi`, "converter (stock, 5400-stall) [stock]",
		"Setup: rear_psi 12 psi (was " + lastPSI + "): 60 ft", "Setup: rear_psi 12 psi, converter stock."} {
		if !strings.Contains(out, w) {
			t.Errorf("the round lacks %q:\n%s", w, out)
		}
	}
	after, _ := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	rows := strings.Split(strings.TrimSpace(string(after)), "\n")
	if !strings.HasSuffix(rows[len(rows)-1], ",12,stock") {
		t.Errorf("the slip's setup: %s", rows[len(rows)-1])
	}
}

// dial --set posts the card's dial with the planned setup: the same number
// as card --set, and a refused value names the item and its range.
func TestDialSet(t *testing.T) {
	dir, _ := demoWithSetup(t, "  - {name: ballast_lb, unit: lb, range: [0, 300]}\n", "ballast_lb", func(i int) string { return []string{"0", "50", "100", "150", "200"}[i%5] })
	at := []string{"--dir", dir, "--round", "3", "--lane", "left", "--at", "20:45", "--format", "json"}
	var d struct {
		Post json.Number `json:"post_dial"`
	}
	var c struct {
		Final json.Number `json:"final_dial"`
	}
	for _, set := range []string{"ballast_lb=0", "ballast_lb=300"} {
		if err := json.Unmarshal([]byte(mustRun(t, append([]string{"dial", "--set", set}, at...)...)), &d); err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal([]byte(mustRun(t, append([]string{"card", "--set", set}, at...)...)), &c); err != nil {
			t.Fatal(err)
		}
		if d.Post == "" || d.Post != c.Final {
			t.Errorf("--set %s: dial posts %q, the card %q", set, d.Post, c.Final)
		}
	}
	_, errs, code := pitcard(t, append([]string{"dial", "--set", "ballast_lb=400"}, at...)...)
	if code != 2 || !strings.Contains(errs, `--set ballast_lb "400" is outside 0..300 lb`) {
		t.Errorf("exit %d: %s", code, errs)
	}
	_, errs, code = pitcard(t, "dial", "--dir", dir, "--et", "11.5", "--sd", "0.02", "--set", "ballast_lb=10")
	if code != 2 || !strings.Contains(errs, "give one of them") {
		t.Errorf("exit %d: %s", code, errs)
	}
}

// A column map maps a spreadsheet's column to a setup item; the import
// checks it as the item's column (a value out of range names the file, the
// line and the column), and export writes it back in the map's layout.
func TestSetupThroughAColumnMap(t *testing.T) {
	dir := setupFolder(t)
	src := t.TempDir()
	sheet := filepath.Join(src, "sheet.csv")
	writeFile(t, sheet, "Date;Time;Track;Run;Lane;1/4;Tire PSI\n13/06/2026;18:42;Test Strip;E1;left;11,538;15,5\n13/06/2026;19:42;Test Strip;E2;left;11,541;16\n")
	m := filepath.Join(src, "map.yaml")
	writeFile(t, m, "kind: logbook\nseparator: \";\"\ndecimal: \",\"\ndate: {column: Date, format: \"02/01/2006\"}\ntime: {column: Time}\n"+
		"track: {column: Track}\nsession: {column: Run}\nlane: {column: Lane}\net1320: {column: \"1/4\"}\nrear_psi: {column: Tire PSI}\n")
	mustRun(t, "log", "import", "--dir", dir, sheet, "--map", m)
	book, _ := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	if lines := strings.Split(strings.TrimSpace(string(book)), "\n"); len(lines) != 3 || !strings.Contains(lines[0], "rear_psi") || !strings.Contains(lines[1], ",15.5") {
		t.Errorf("imported:\n%s", book)
	}
	out := filepath.Join(src, "back.csv")
	mustRun(t, "log", "export", "--dir", dir, "--map", m, "--out", out)
	if back, _ := os.ReadFile(out); !strings.Contains(string(back), "Tire PSI") || !strings.Contains(string(back), ";15,5") {
		t.Errorf("exported in the map's layout:\n%s", back)
	}
	bad := filepath.Join(src, "bad.csv")
	writeFile(t, bad, "Date;Time;Track;Run;Lane;1/4;Tire PSI\n14/06/2026;18:42;Test Strip;E1;left;11,538;55\n")
	_, errs, code := pitcard(t, "log", "import", "--dir", dir, bad, "--map", m)
	if code != 2 || !strings.Contains(errs, "bad.csv line 2") || !strings.Contains(errs, `"55" is outside 6..40 psi`) {
		t.Errorf("exit %d: %s", code, errs)
	}
}
