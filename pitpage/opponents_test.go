package pitpage

import (
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The other lane's car on the page: the slip form keeps its slip in the
// opponent book, the card's other-lane form names it, and the card then
// says whose history it races against (invented car 4471).
func TestOtherLanesCarOnThePage(t *testing.T) {
	f := newFixture(t)
	v := slip()
	v.Set("opponent-dial", "11.80")
	v.Set("opponent-rt", ".045")
	v.Set("opponent-et", "11.842")
	v.Set("opponent", "4471")
	if w := f.post("/slip", v); w.Code != http.StatusSeeOther {
		t.Fatalf("the slip with the other lane's car: %d %s", w.Code, w.Body)
	}
	data, err := os.ReadFile(filepath.Join(f.dir, "opponents.csv"))
	if err != nil || !strings.Contains(string(data), "4471,2026-06-13,E3,11.80,0.045,11.842,no,") {
		t.Fatalf("the other lane's slip must be in opponents.csv: %q %v", data, err)
	}
	if w := f.post("/opponent", url.Values{"round": {"E4"}, "day": {"2026-06-13"}, "opponent-dial": {"11.80"}, "opponent": {"4471"}}); w.Code != http.StatusSeeOther {
		t.Fatalf("the other lane's car: %d %s", w.Code, w.Body)
	}
	page := f.do("GET", "/?round=E4", testTokens.Crew, nil).Body.String()
	if !strings.Contains(page, "from 1 pass of car 4471 (1 event)") || fieldValue(page, "opponent") != "4471" {
		t.Errorf("the card must race against car 4471's history and show its name in the form (field %q)", fieldValue(page, "opponent"))
	}
	before := f.snapshot()
	w := f.post("/opponent", url.Values{"round": {"E4"}, "day": {"2026-06-13"}, "opponent-dial": {"11.70"}, "opponent": {strings.Repeat("9", 41)}})
	if w.Code != http.StatusUnprocessableEntity || !strings.Contains(fieldError(w.Body.String(), "opponent"), "longer than 40") {
		t.Errorf("a car name too long: %d, message %q", w.Code, fieldError(w.Body.String(), "opponent"))
	}
	f.unchanged(before, "a bad other car")
}
