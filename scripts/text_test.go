package scripts

import (
	"strings"
	"testing"
	"unicode/utf8"
)

// A rule's words are bounded where they leave the rule: a 3 MB reason once
// made a 9 MB card. Each text is cut at MaxText characters with "…" and a
// pointer to `pitcard rules try`, which runs with Limits.MaxText raised to
// show a rule's whole output.
func TestRuleTextIsBounded(t *testing.T) {
	src := `local big = string.rep("é", 1500000) -- 3 MB
function dial(ctx) pit.log(big) return 0.01, big end
function checks(ctx) return {{label = big, status = "warn", note = big}} end
function notes(ctx) return {big, "short"} end`
	bounded := func(what, s string) {
		t.Helper()
		if n := utf8.RuneCountInString(s); n > MaxText+len(cutNote) {
			t.Errorf("%s: %d characters, want at most %d", what, n, MaxText+len(cutNote))
		}
		if !strings.Contains(s, "…") || !strings.Contains(s, "pitcard rules try") || !utf8.ValidString(s) {
			t.Errorf("%s: %q does not say it was cut and where the whole is", what, s[max(0, len(s)-80):])
		}
	}
	res := runSrc(t, src)
	if len(res.Errors) > 0 {
		t.Fatal(res.Errors[0])
	}
	bounded("reason", res.Reason)
	bounded("log", res.Log[0])
	bounded("label", res.Checks[0].Label)
	bounded("note", res.Checks[0].Note)
	bounded("notes[1]", res.Notes[0])
	if res.Notes[1] != "short" {
		t.Errorf("a short note changed: %q", res.Notes[1])
	}
	// an error's message is the rule's text too
	res = runSrc(t, "function dial(ctx)\n  error(string.rep('x', 3000000))\nend")
	if len(res.Errors) == 0 {
		t.Fatal("no error")
	}
	bounded("error", res.Errors[0].Msg)
	if res.Checks[0].Note != res.Errors[0].Error() {
		t.Errorf("the failed check says %q, not the error", res.Checks[0].Note[:80])
	}

	// raised, the whole text comes back (what `pitcard rules try` asks for)
	lim := DefaultLimits
	lim.MaxText = 1 << 30
	r := Compile("rules/t.lua", src, nil, lim)
	whole := Run([]*Rule{r}, nil, ctxFor("left", 20, 100), lim)[0]
	if len(whole.Reason) != 3000000 || len(whole.Notes[0]) != 3000000 {
		t.Errorf("with MaxText raised: reason %d bytes, note %d bytes, want 3000000", len(whole.Reason), len(whole.Notes[0]))
	}
}
