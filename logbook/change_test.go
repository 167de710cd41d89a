package logbook

import (
	"errors"
	"strings"
	"testing"

	"pitcard/weather"
)

// What a crew writes when the car changed, and what it writes when it did
// not (common practice, no source).
func TestChangeNoted(t *testing.T) {
	for _, tc := range []struct {
		name, change, notes string
		want                bool
		what                string
	}{
		// the change field says it
		{"change field", "new converter", "good pass", true, "new converter"},
		{"change field trimmed", "  4.10 gear ", "", true, "4.10 gear"},
		{"change field says none", "none", "good pass", false, ""},
		{"change field says no changes", "No changes", "", false, ""},
		// the notes say it
		{"changed rear gear", "", "changed rear gear to 4.10", true, "changed rear gear to 4.10"},
		{"new converter", "", "new converter", true, "new converter"},
		{"swapped to a stall", "", "swapped to the 5400 stall", true, "swapped to the 5400 stall"},
		{"plus boost", "", "+2 psi boost", true, "+2 psi boost"},
		{"jetted down", "", "jetted down 2", true, "jetted down 2"},
		{"retuned", "", "Retuned.", true, "Retuned"},
		{"the clause that says it", "", "good launch, new converter; shook a bit", true, "new converter"},
		{"part then change", "", "timing pulled 2 degrees", true, "timing pulled 2 degrees"},
		{"minus timing", "", "-2 timing", true, "-2 timing"},
		{"installed", "", "installed a Vortek converter", true, "installed a Vortek converter"},
		{"more boost", "", "ran more boost", true, "ran more boost"},
		{"new tires", "", "new tires", true, "new tires"},
		// ordinary notes do not
		{"good pass", "", "good pass", false, ""},
		{"shook", "", "shook", false, ""},
		{"lifted", "", "lifted", false, ""},
		{"new PB", "", "new PB", false, ""},
		{"changed lanes", "", "changed lanes", false, ""},
		{"new PB in high gear", "", "new PB in high gear", false, ""},
		{"boost came in late", "", "boost came in late", false, ""},
		{"boost came up slow", "", "boost came up slow", false, ""},
		{"missed second gear", "", "missed second gear", false, ""},
		{"engine stalled", "", "stalled at the line", false, ""},
		{"fuel pressure dropped", "", "fuel pressure dropped", false, ""},
		{"came is no cam", "", "new car came off hard", false, ""},
		{"a change word in another clause", "", "changed lanes, gear was fine", false, ""},
		{"empty", "", "", false, ""},
		// negated
		{"no changes", "", "no changes", false, ""},
		{"didn't change anything", "", "didn't change anything", false, ""},
		{"didn't change the converter", "", "didn't change the converter", false, ""},
		{"no new converter yet", "", "no new converter yet", false, ""},
		{"not retuned", "", "not retuned", false, ""},
		{"no timing change", "", "no timing change", false, ""},
		{"negation in another clause", "", "no shake, new converter", true, "new converter"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			what, ok := ChangeNoted(Pass{Change: tc.change, Notes: tc.notes}, nil)
			if ok != tc.want || what != tc.what {
				t.Errorf("change %q notes %q: (%q, %v), want (%q, %v)", tc.change, tc.notes, what, ok, tc.what, tc.want)
			}
		})
	}
}

// The crew's own words mark a change besides pitcard's (setting
// change_words); the defaults are kept.
func TestChangeWordsWith(t *testing.T) {
	crew := DefaultChangeWords.With([]string{" Chute Packed ", ""})
	if _, ok := ChangeNoted(Pass{Notes: "chute packed tighter"}, nil); ok {
		t.Fatal("pitcard's own list must not know the crew's words")
	}
	if what, ok := ChangeNoted(Pass{Notes: "chute packed tighter"}, crew); !ok || what != "chute packed tighter" {
		t.Errorf("the crew's words: (%q, %v)", what, ok)
	}
	if _, ok := ChangeNoted(Pass{Notes: "rejetted"}, crew); !ok {
		t.Error("the defaults must stay with the crew's words")
	}
	if _, ok := ChangeNoted(Pass{Notes: "chute not packed"}, crew); ok {
		t.Error("a phrase not in order must not match")
	}
	if len(DefaultChangeWords.With(nil)) != len(DefaultChangeWords) {
		t.Error("no extra words: the defaults alone")
	}
}

// Notes longer than ChangeNotesScanned are read up to it only.
func TestChangeNotesScanned(t *testing.T) {
	long := strings.Repeat("good ", ChangeNotesScanned/5) + "new converter"
	if _, ok := ChangeNoted(Pass{Notes: long}, nil); ok {
		t.Error("a change past the scanned notes was read")
	}
	if _, ok := ChangeNoted(Pass{Notes: "new converter " + long}, nil); !ok {
		t.Error("a change at the start of long notes was missed")
	}
}

// A change is one printable line of at most MaxChangeLen bytes.
func TestParseChange(t *testing.T) {
	for _, tc := range []struct {
		name, in, want, reason string
		shows                  string // how the message shows the value: escaped, one line
	}{
		{"plain", " +2 psi boost ", "+2 psi boost", "", ""},
		{"commas and quotes", `4.10 gear, "big" converter`, `4.10 gear, "big" converter`, "", ""},
		{"blank", "", "", "", ""},
		{"at the limit", strings.Repeat("x", MaxChangeLen), strings.Repeat("x", MaxChangeLen), "", ""},
		{"too long", strings.Repeat("x", MaxChangeLen+1), "", "at most 200", ""},
		{"a line break", "new\nconverter", "", "control character", `"new\nconverter"`},
		{"a tab", "new\tconverter", "", "control character", `"new\tconverter"`},
		{"an escape", "new \x1b[31mconverter", "", "control character", `"new \x1b[31mconverter"`},
		{"broken UTF-8", "new \xff converter", "", "control character", `"new \xff converter"`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ParseChange("change", tc.in)
			if tc.reason == "" {
				if err != nil || got != tc.want {
					t.Errorf("ParseChange(%q) = %q, %v; want %q", tc.in, got, err, tc.want)
				}
				return
			}
			var ie *weather.InputError
			if !errors.As(err, &ie) || ie.Field != "change" || !strings.Contains(err.Error(), tc.reason) {
				t.Fatalf("ParseChange(%q): %v, want an input error on change saying %q", tc.in, err, tc.reason)
			}
			if strings.ContainsAny(err.Error(), "\n\t\x1b") {
				t.Errorf("the message carries the control character: %q", err.Error())
			}
			if tc.shows != "" && !strings.Contains(err.Error(), tc.shows) {
				t.Errorf("the message %q should show the value as %s, where the character is", err.Error(), tc.shows)
			}
		})
	}
}
