package pitpage

import (
	"net/url"
	"strings"
	"testing"
)

// The card's HTML is kept with the card, one per checklist form: the crew's
// page (with its form token) and the view link's (none) do not share it,
// and a tick saved makes a new one (the page's own rule, no source).
func TestTheKeptCardIsEachRolesOwn(t *testing.T) {
	f := newFixture(t)
	crewCSRF := `value="` + testTokens.CSRF(testTokens.Crew) + `"`
	for i, tc := range []struct {
		token    string
		withCSRF bool
	}{{testTokens.Crew, true}, {testTokens.View, false}, {testTokens.Crew, true}, {testTokens.View, false}} {
		body := f.do("GET", "/", tc.token, nil).Body.String()
		if got := strings.Contains(body, crewCSRF); got != tc.withCSRF {
			t.Errorf("fetch %d: the crew's form token on the page %v, want %v", i+1, got, tc.withCSRF)
		}
	}
	before := f.do("GET", "/?round=E3", testTokens.Crew, nil).Body.String()
	if w := f.post("/checklist", url.Values{"round": {"E3"}, "day": {"2026-06-13"}, "tick": {"Tire pressures set"}}); w.Code >= 400 {
		t.Fatalf("ticking: %d %s", w.Code, w.Body.String())
	}
	after := f.do("GET", "/?round=E3", testTokens.Crew, nil).Body.String()
	if before == after {
		t.Error("the card page is the same after a tick was saved: the kept card outlived its data")
	}
}
