package logbook

import "testing"

// What a crew writes on a slip, and whether the pass is the car's time.
// Common practice (no source): spinning, smoking the tires, lifting and
// pedaling lose the run; a mild shake or a negated word does not.
func TestAbortedNotes(t *testing.T) {
	for _, tc := range []struct {
		notes string
		want  bool
	}{
		{"spin", true},
		{"spinning at the hit", true},
		{"smoked the tires", true},
		{"tire spin at the hit", true},
		{"LIFT", true},
		{"lifted at 1000", true},
		{"pedaled it", true},
		{"tire shake", true},
		{"shook hard, pedaled", true},
		{"no shake", false},
		{"smooth, no shake", false},
		{"shook a little", false},
		{"no tire shake, clean", false},
		{"didn't spin", false},
		{"did not lift", false},
		{"no spin, lifted at the stripe", true}, // the negation stays in its clause
		{"broke out by .01", false},             // a breakout is a full run
		{"broke a u-joint", true},
		{"shifted late", false}, // "lift" inside "shifted" is not a word
		{"", false},
	} {
		t.Run(tc.notes, func(t *testing.T) {
			if got := Aborted(tc.notes); got != tc.want {
				t.Errorf("Aborted(%q) = %v, want %v", tc.notes, got, tc.want)
			}
		})
	}
	crew := DefaultAbortWords.With([]string{"Chute out early", " "})
	if !crew.Aborted("chute out early at 900") || Aborted("chute out early at 900") || !crew.Aborted("lifted") {
		t.Errorf("the crew's own words add to the defaults: %v", crew)
	}
}
