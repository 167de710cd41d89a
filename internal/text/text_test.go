package text

import "testing"

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
