package pitpage

import (
	"html"
	"net/http"
	"strings"
	"testing"
)

// The pit page's card says what its prediction rests on, in the card's one
// Leaned on line: the blend, the interval's scale, and the passes since a
// change of the car once a slip notes one.
func TestCardPageSaysWhatItRestsOn(t *testing.T) {
	f := newFixture(t)
	v := slip()
	v.Set("change", "new converter")
	if w := f.post("/slip", v); w.Code != http.StatusSeeOther {
		t.Fatalf("a slip with its change: %d\n%s", w.Code, w.Body)
	}
	page := html.UnescapeString(f.do("GET", "/", testTokens.View, nil).Body.String())
	line := page[strings.Index(page, "Leaned on the pass model"):]
	line = line[:strings.Index(line, "</li>")]
	for _, w := range []string{"from the car's own misses on", "1 pass since the change 'new converter' (06-13)"} {
		if !strings.Contains(line, w) {
			t.Errorf("the card's Leaned on line lacks %q: %s", w, line)
		}
	}
	if strings.Contains(page, "The car was changed before") {
		t.Error("the change is said twice")
	}
}
