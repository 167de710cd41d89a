package prep

import "github.com/shopspring/decimal"

// DialText prints a dial (or a difference of dials) with the places of the
// dial step, at least 2: 11.41 at a 0.01 step, 10.125 at 0.005. A dial finer
// than the step (the other lane's, typed as its slip shows it) prints with
// all its digits: it is never rounded for show. It is the one formatter of
// a dial, for every front end.
func DialText(d, step decimal.Decimal) string {
	places := max(-step.Exponent(), 2)
	if !d.Equal(d.Round(places)) {
		places = -d.Exponent()
	}
	return d.StringFixed(places)
}

// SignedDialText prints a dial adjustment with its sign and the places of
// the dial step: "+0.02", "-0.005".
func SignedDialText(d, step decimal.Decimal) string {
	if d.IsNegative() {
		return DialText(d, step)
	}
	return "+" + DialText(d, step)
}

// hundredth is the places a difference of dials prints with when the step
// is not at hand (at least two, more when the dials had more).
var hundredth = decimal.New(1, -2)
