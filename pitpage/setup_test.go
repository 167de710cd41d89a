package pitpage

import (
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// withSetup gives the fixture's car two setup items (invented) and its
// logbook a rear_psi column, the last pass at 16 psi.
func withSetup(t *testing.T, f *fixture) {
	t.Helper()
	car, err := os.ReadFile(filepath.Join(f.dir, "car.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	setup := "\nsetup:\n  - {name: rear_psi, unit: psi, range: [6, 40], expect: {et60: 0.010}}\n  - {name: converter, choices: [stock, 5400-stall]}\n"
	if err := os.WriteFile(filepath.Join(f.dir, "car.yaml"), append(car, setup...), 0o644); err != nil {
		t.Fatal(err)
	}
	book, _ := os.ReadFile(filepath.Join(f.dir, "logbook.csv"))
	lines := strings.Split(strings.TrimSpace(string(book)), "\n")
	lines[0] += ",rear_psi,converter"
	for i := 1; i < len(lines); i++ {
		psi := []string{"15", "17", "16"}[i%3]
		if i == len(lines)-1 {
			psi = "16"
		}
		lines[i] += "," + psi + ",stock"
	}
	if err := os.WriteFile(filepath.Join(f.dir, "logbook.csv"), []byte(strings.Join(lines, "\n")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
}

// The planned setup on the page: the card page says it and links to its
// form; the form notes it in rounds.csv and the card then predicts with it
// (its setup line); the slip form offers the planned setup and logs the
// one sent; a value out of range is refused on its field and nothing is
// written.
func TestSetupOnThePage(t *testing.T) {
	f := newFixture(t)
	withSetup(t, f)
	card := f.do("GET", "/?round=E3", testTokens.Crew, nil).Body.String()
	if !strings.Contains(card, "Setup planned: rear psi 16 psi, converter stock") || !strings.Contains(card, `href="/setup?round=E3"`) {
		t.Fatalf("the card page lacks the setup line or its link:\n%s", card)
	}
	form := f.do("GET", "/setup?round=E3", testTokens.Crew, nil).Body.String()
	if !strings.Contains(form, `name="set-rear_psi"`) || !strings.Contains(form, "Last pass: 16 psi.") || !strings.Contains(form, `<option value="5400-stall"`) {
		t.Fatalf("the setup form:\n%s", form)
	}
	before := f.snapshot()
	w := f.post("/setup", url.Values{"round": {"E3"}, "day": {"2026-06-13"}, "set-rear_psi": {"55"}})
	if w.Code != http.StatusUnprocessableEntity || !strings.Contains(fieldError(w.Body.String(), "set-rear_psi"), "is outside 6..40 psi") {
		t.Errorf("an out-of-range psi: %d, message %q", w.Code, fieldError(w.Body.String(), "set-rear_psi"))
	}
	f.unchanged(before, "a refused setup")
	if w := f.post("/setup", url.Values{"round": {"E3"}, "day": {"2026-06-13"}, "set-rear_psi": {"13.5"}, "set-converter": {""}}); w.Code != http.StatusSeeOther {
		t.Fatalf("the planned setup: %d %s", w.Code, w.Body)
	}
	rounds, _ := os.ReadFile(filepath.Join(f.dir, "rounds.csv"))
	if !strings.Contains(string(rounds), "2026-06-13,E3,setup,rear_psi=13.5,") {
		t.Errorf("rounds.csv: %s", rounds)
	}
	card = f.do("GET", "/?round=E3&saved=setup", testTokens.Crew, nil).Body.String()
	for _, want := range []string{"The planned setup is saved", "rear psi 13.5 psi (last 16)", "Setup: rear_psi 13.5 psi (was 16): 60 ft"} {
		if !strings.Contains(card, want) {
			t.Errorf("the card after the planned setup lacks %q", want)
		}
	}
	slipForm := f.do("GET", "/slip?round=E3", testTokens.Crew, nil).Body.String()
	if fieldValue(slipForm, "set-rear_psi") != "13.5" {
		t.Errorf("the slip form's psi is %q, want the planned 13.5", fieldValue(slipForm, "set-rear_psi"))
	}
	v := slip()
	v.Set("set-rear_psi", "13.5")
	if w := f.post("/slip", v); w.Code != http.StatusSeeOther {
		t.Fatalf("the slip with its setup: %d %s", w.Code, w.Body)
	}
	book, _ := os.ReadFile(filepath.Join(f.dir, "logbook.csv"))
	if rows := strings.Split(strings.TrimSpace(string(book)), "\n"); !strings.HasSuffix(rows[len(rows)-1], ",13.5,stock") {
		t.Errorf("the logged slip's setup: %s", rows[len(rows)-1])
	}
}
