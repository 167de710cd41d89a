package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A crewmate's opponents.csv comes in through log import as a logbook
// does: all or nothing, --skip-existing, a conflict listed; log opponents
// lists the cars with the figures the card uses (invented cars 4471, 77).
func TestOpponentBookImportAndList(t *testing.T) {
	dir := demoCopy(t)
	theirs := filepath.Join(t.TempDir(), "opponents.csv")
	book := "car,date,round,dial,rt,et,breakout,notes\n4471,2026-06-12,E1,11.80,0.045,11.842,no,\n4471,2026-06-13,E2,11.80,0.051,11.861,no,\n77,2026-06-13,E2,12.10,0.020,12.090,yes,\n"
	_ = os.WriteFile(theirs, []byte(book), 0o644)
	if out, errs, code := pitcard(t, "log", "import", "--dir", dir, theirs); code != 0 || !strings.Contains(out, "Imported 3 slips") {
		t.Fatalf("import: exit %d\n%s%s", code, out, errs)
	}
	if _, errs, code := pitcard(t, "log", "import", "--dir", dir, theirs); code != 2 || !strings.Contains(errs, "--skip-existing") {
		t.Errorf("the same book again without --skip-existing: exit %d %s", code, errs)
	}
	_ = os.WriteFile(theirs, []byte(strings.Replace(book, "11.861", "11.871", 1)), 0o644)
	if _, errs, code := pitcard(t, "log", "import", "--dir", dir, theirs, "--skip-existing"); code != 2 || !strings.Contains(errs, `et "11.861"`) {
		t.Errorf("a conflict: exit %d %s", code, errs)
	}
	out, errs, code := pitcard(t, "log", "opponents", "--dir", dir, "--format", "json")
	var cars []opponentJSON
	if code != 0 || json.Unmarshal([]byte(out), &cars) != nil || len(cars) != 2 {
		t.Fatalf("log opponents: exit %d %s %s", code, out, errs)
	}
	// car 4471: margins 0.042, 0.061 with the default 0.02 worth 3 passes:
	// (3·0.02 + 0.103)/5 = 0.0326 (bracket.Shrunk; k = 3 common practice, no source)
	if c := cars[0]; c.Car != "4471" || c.Passes != 2 || c.Events != 2 || c.MarginS != 0.0326 {
		t.Errorf("car 4471: %+v", c)
	}
	text, _, _ := pitcard(t, "log", "opponents", "--dir", dir)
	if !strings.Contains(text, "4471") || !strings.Contains(text, "+0.033 ± ") {
		t.Errorf("the table:\n%s", text)
	}
}

// The card's JSON and the rules' ctx.opponent say where the other lane's
// figures came from (invented car 4471).
func TestOpponentFromInJSONAndRules(t *testing.T) {
	dir := demoCopy(t)
	writeFile(t, filepath.Join(dir, "opponents.csv"), "car,date,round,dial,rt,et,breakout,notes\n4471,2026-06-12,E1,11.80,0.045,11.842,no,\n4471,2026-06-13,E2,11.80,0.051,11.861,no,\n")
	writeFile(t, filepath.Join(dir, "rules", "80-other.lua"), `function dial(ctx)
  if ctx.opponent then return 0.01, "other lane " .. ctx.opponent.from end
  return 0
end
`)
	args := []string{"--dir", dir, "--round", "3", "--lane", "left", "--at", "20:45", "--opponent-dial", "11.80", "--opponent", "4471"}
	var j struct {
		Opponent struct {
			From string `json:"from"`
		} `json:"opponent"`
	}
	if err := json.Unmarshal([]byte(mustRun(t, append([]string{"card", "--format", "json"}, args...)...)), &j); err != nil {
		t.Fatal(err)
	}
	if j.Opponent.From != "from 2 passes of car 4471 (2 events)" {
		t.Errorf("the card's JSON says the other lane's figures are %q", j.Opponent.From)
	}
	if try := mustRun(t, append([]string{"rules", "try"}, args...)...); !strings.Contains(try, "other lane from 2 passes of car 4471") {
		t.Errorf("the rule did not see ctx.opponent.from:\n%s", try)
	}
}
