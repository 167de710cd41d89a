package logbook

import (
	"errors"
	"fmt"
	"math"

	"pitcard/weather"
)

// WeightRangeLb is the weight of car and driver pitcard accepts, lb: a
// light dragster to a heavy truck, with room to spare.
var WeightRangeLb = [2]float64{500, 10000}

// ParseWeightLb reads a weight typed for field (a flag, a form field, a
// logbook column): "3300lb", "1500kg", a bare number in unit bare. It
// returns pounds, or an error naming the field with the one message every
// weight input gives.
func ParseWeightLb(field, s string, bare weather.WeightUnit) (float64, error) {
	w, err := weather.ParseWeight(s, bare)
	if err != nil {
		var ie *weather.InputError
		if errors.As(err, &ie) {
			c := *ie
			c.Field = field
			return 0, &c
		}
		return 0, err
	}
	// Rounded to a millionth of a pound: the round trip through kg must
	// not log 3350 as 3349.9999999999995.
	lb := math.Round(w.Lb()*1e6) / 1e6
	if !(lb >= WeightRangeLb[0] && lb <= WeightRangeLb[1]) {
		return 0, &weather.InputError{Field: field, Value: s, Reason: WeightRangeWords}
	}
	return lb, nil
}

// WeightRangeWords is the range every weight input states, in words.
var WeightRangeWords = fmt.Sprintf("is outside %.0f..%.0f lb (%.0f..%.0f kg)", WeightRangeLb[0], WeightRangeLb[1],
	WeightRangeLb[0]*weather.KgPerLb, WeightRangeLb[1]*weather.KgPerLb)
