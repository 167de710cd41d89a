package text

import (
	"strings"
	"testing"
)

// A wrapped line never parts a figure from its unit: "22 %" and "0.018 s"
// stay on one line (common practice, no source: a reader takes "22" at a
// line's end for a count).
func TestWrapKeepsUnits(t *testing.T) {
	for _, tc := range []struct{ in, keep string }{
		{"It leans most on: 06-13 round 2 (ran 11.454; 11.451 in this round's conditions; 22 % of the weight)", "22 %"},
		{"mean miss on the car's own passes, each predicted from those before it: the pass model 0.018 s, today's", "0.018 s"},
	} {
		for width := 20; width <= 100; width++ {
			out := Wrap(tc.in, width, "  ")
			if !strings.Contains(strings.ReplaceAll(out, "\n  ", "\n"), tc.keep) {
				t.Errorf("width %d parts %q:\n%s", width, tc.keep, out)
				break
			}
		}
	}
}
