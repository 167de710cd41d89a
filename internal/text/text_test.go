package text

import "testing"

// English plurals of the nouns pitcard counts (English spelling rules, from
// memory: -s, -es after s, -ies after a consonant and y).
func TestPlural(t *testing.T) {
	for _, tc := range []struct {
		n    int
		noun string
		want string
	}{
		{1, "pass", "1 pass"},
		{2, "pass", "2 passes"},
		{0, "clean pass", "0 clean passes"},
		{1, "entry", "1 entry"},
		{3, "entry", "3 entries"},
		{2, "day", "2 days"},
		{2, "key", "2 keys"},
		{2, "reading", "2 readings"},
		{5, "minute", "5 minutes"},
		{2, "y", "2 ys"},
		{0, "entry", "0 entries"},
		{2, "battery", "2 batteries"},
		{4, "tray", "4 trays"},
		{2, "boy", "2 boys"},
		{12, "opponent entry", "12 opponent entries"},
	} {
		t.Run(tc.want, func(t *testing.T) {
			if got := Plural(tc.n, tc.noun); got != tc.want {
				t.Errorf("Plural(%d, %q) = %q, want %q", tc.n, tc.noun, got, tc.want)
			}
		})
	}
}

// A phrase made a sentence, and a blank cell shown as a dash (pitcard's own
// conventions, no source).
func TestUpperFirstAndOrDash(t *testing.T) {
	for _, tc := range []struct{ in, upper, dash string }{
		{"", "", "–"},
		{"  ", "  ", "–"},
		{"lifted at 1000", "Lifted at 1000", "lifted at 1000"},
		{"Track", "Track", "Track"},
	} {
		t.Run(tc.in, func(t *testing.T) {
			if got := UpperFirst(tc.in); got != tc.upper {
				t.Errorf("UpperFirst(%q) = %q, want %q", tc.in, got, tc.upper)
			}
			if got := OrDash(tc.in); got != tc.dash {
				t.Errorf("OrDash(%q) = %q, want %q", tc.in, got, tc.dash)
			}
		})
	}
}
