package bracket

import (
	"math"
	"math/rand/v2"
	"testing"
)

// The limits of the shrinkage (a normal–normal posterior, any Bayesian
// text, e.g. Gelman et al., Bayesian Data Analysis, ch. 2; the pooled
// variance is common practice, no source): one pass stays near the
// default, fifty lean on the car's own figures.
func TestShrunkLimits(t *testing.T) {
	const mean0, sd0 = 0.02, 0.03 // the settings' defaults
	r := rand.New(rand.NewPCG(7, 7))
	fifty := make([]float64, 50)
	for i := range fifty {
		fifty[i] = 0.10 + 0.01*r.NormFloat64() // a car that runs 0.10 over, tight
	}
	bookMean, bookSD := 0.0, 0.0
	for _, x := range fifty {
		bookMean += x / 50
	}
	for _, x := range fifty {
		bookSD += (x - bookMean) * (x - bookMean) / 49
	}
	bookSD = math.Sqrt(bookSD)
	for _, tc := range []struct {
		name             string
		xs               []float64
		wantMean, wantSD float64
		tolMean, tolSD   float64
	}{
		// none: the defaults exactly
		{"no passes", nil, mean0, sd0, 0, 0},
		// one pass 0.10: (3·0.02 + 0.10)/4 = 0.04; spread (3·0.03²+0)/3 = the default's
		{"one pass", []float64{0.10}, 0.04, sd0, 1e-12, 1e-12},
		// fifty: (3·0.02 + 50·x̄)/53 is within 5 % of the way from x̄ to the default
		{"fifty passes", fifty, bookMean, bookSD, 0.06 * (bookMean - mean0), 0.25 * bookSD},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m, sd := Shrunk(tc.xs, mean0, sd0, PriorPasses)
			if math.Abs(m-tc.wantMean) > tc.tolMean || math.Abs(sd-tc.wantSD) > tc.tolSD {
				t.Errorf("Shrunk = %.4f ± %.4f, want %.4f (±%.4f) ± %.4f (±%.4f)", m, sd, tc.wantMean, tc.tolMean, tc.wantSD, tc.tolSD)
			}
		})
	}
	// One pass stays nearer the default than the pass; fifty nearer the book.
	m1, _ := Shrunk([]float64{0.10}, mean0, sd0, PriorPasses)
	if math.Abs(m1-mean0) >= math.Abs(m1-0.10) {
		t.Errorf("one pass of 0.10: %.4f is not nearer the default 0.02 (common practice, no source: k = 3)", m1)
	}
	m50, sd50 := Shrunk(fifty, mean0, sd0, PriorPasses)
	if math.Abs(m50-bookMean) >= math.Abs(m50-mean0)/10 || sd50 > (bookSD+sd0)/2 {
		t.Errorf("fifty passes: %.4f ± %.4f does not lean on the book's %.4f ± %.4f", m50, sd50, bookMean, bookSD)
	}
}
