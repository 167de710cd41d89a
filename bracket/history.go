package bracket

import "math"

// The other lane's figures from its history: a named car's margins over
// its dial and its reaction times, each shrunk toward the settings'
// defaults so that one slip moves them a little and many slips a lot.

// PriorPasses is how many passes the settings' defaults are worth against
// a car's own history (k). Three is common practice (no source): after
// three slips of a car its own mean carries half the weight it has after
// six, and one odd slip (a pedal, a lift the notes missed) moves the
// figure only a quarter of its own distance from the default.
const PriorPasses = 3

// Shrunk is a normal–normal posterior of a mean and a pooled spread: the
// default mean and spread (the prior, worth k passes) and the n values
// seen. The mean is (k·mean0 + n·x̄)/(k + n); the variance is the prior's
// (worth k degrees of freedom) pooled with the sample's (n − 1):
// (k·sd0² + (n−1)·s²)/(k + n − 1). No values (or k ≤ 0 and one value)
// give the default back where the data cannot say. sd0 and the result are
// > 0 in s; the values may be any finite seconds.
func Shrunk(xs []float64, mean0, sd0, k float64) (mean, sd float64) {
	n := float64(len(xs))
	if n == 0 {
		return mean0, sd0
	}
	var sum float64
	for _, x := range xs {
		sum += x
	}
	xbar := sum / n
	var ss float64
	for _, x := range xs {
		ss += (x - xbar) * (x - xbar)
	}
	mean = (k*mean0 + n*xbar) / (k + n)
	dof := k + n - 1
	if dof <= 0 {
		return mean, sd0
	}
	return mean, math.Sqrt((k*sd0*sd0 + ss) / dof)
}
