package engine

import (
	"fmt"
	"math"

	"pitcard/internal/stats"
	"pitcard/internal/text"
	"pitcard/logbook"
)

// Change is a change of the car (a converter, a gear, a jet, a tune) that
// the fit carried its older passes across: what it is worth at the finish,
// learned from the passes since.
type Change struct {
	What  string       // the crew's words (the change column or the notes)
	First logbook.Pass // the first pass of the changed car
	// Since is how many clean passes the fit has of the changed car (the
	// first included); Before, how many it carried across the change.
	Since, Before int
	// Offset is what the change is worth at the finish, s (negative:
	// quicker), and OffsetSD its uncertainty: the passes before the change
	// are moved by Offset (each timer in proportion to its time) and
	// counted at ChangeCarryWeight.
	Offset, OffsetSD float64
}

// Change settings.
const (
	// ChangeCarryWeight is the weight of a pass from before the change,
	// against the same pass of the changed car.
	ChangeCarryWeight = 0.5
	// ChangeShrink is how many passes' worth of belief that a change is
	// worth nothing the offset starts with: one pass since the change moves
	// the offset two thirds of the way to what that pass says.
	ChangeShrink = 0.5
)

// carryAcrossChange finds the latest change among the fitted samples (most
// recent first) and carries the passes before it across: their timers moved
// by the change's offset, learned as the shrunk difference of the model's
// mean residuals after and before it (a level shift fitted by least
// squares, with its standard error from the pooled residual spread), and
// their weight cut. It reports whether it moved anything.
func (f *Fit) carryAcrossChange(words logbook.ChangeWords) bool {
	k := -1
	what := ""
	for i, s := range f.Samples {
		if w, ok := logbook.ChangeNoted(s.Pass, words); ok {
			k, what = i, w
			break
		}
	}
	if k < 0 || k == len(f.Samples)-1 {
		return false // no change, or no pass before it
	}
	fin := logbook.TimerIndex(f.Car.DistanceFt)
	res := func(ss []Sample) []float64 {
		var v []float64
		for _, s := range ss {
			if r := s.Obs[fin] - s.Sim.ET[fin]; !math.IsNaN(r) {
				v = append(v, r)
			}
		}
		return v
	}
	after, before := res(f.Samples[:k+1]), res(f.Samples[k+1:])
	if len(after) == 0 || len(before) == 0 {
		return false
	}
	ma, mb := meanOf(after), meanOf(before)
	var dev []float64
	for _, r := range after {
		dev = append(dev, math.Abs(r-ma))
	}
	for _, r := range before {
		dev = append(dev, math.Abs(r-mb))
	}
	sigma := math.Max(1.4826*stats.Median(dev), timerSigma[fin])
	na := float64(len(after))
	offset := (ma - mb) * na / (na + ChangeShrink)
	sd := sigma * math.Sqrt(1/(na+ChangeShrink)+1/float64(len(before)))
	for i := k + 1; i < len(f.Samples); i++ {
		s := &f.Samples[i]
		for j := range s.Obs {
			if !math.IsNaN(s.Obs[j]) && !math.IsNaN(s.Obs[fin]) {
				s.Obs[j] += offset * s.Obs[j] / s.Obs[fin]
			}
		}
		s.FitShare *= ChangeCarryWeight
	}
	f.Change = &Change{What: what, First: f.Samples[k].Pass, Since: k + 1, Before: len(f.Samples) - k - 1, Offset: offset, OffsetSD: sd}
	return true
}

// Text says the change in words for the card.
func (c Change) Text() string {
	return fmt.Sprintf("the car was changed before the pass of %s (%q): the %s before it are carried across by %+.3f ± %.3f s, learned from the %s since; the prediction rests on %s since the change",
		c.First.Time.Format("2006-01-02 15:04"), c.What, text.Plural(c.Before, "pass"), c.Offset, c.OffsetSD, text.Plural(c.Since, "pass"), text.Plural(c.Since, "pass"))
}

func meanOf(v []float64) float64 {
	var s float64
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}
