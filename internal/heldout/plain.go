package heldout

import (
	"math"
	"strings"

	"pitcard/weather"
)

// PlainRule is the yardstick a crew could keep on paper: the latest clean
// pass (no abort word in its notes, timed at the car's distance) carried to
// today's air by the cube root of the ratio of the SAE J1349 correction
// factors (power ∝ 1/CF, and ET ∝ (weight/power)^⅓ by the cube-root law:
// Huntington, Rod & Custom 1958), and for its spread the carried ETs of the
// last plainRecent clean passes, at least plainSDFloor.
func PlainRule(in Input) (et, sd float64, ok bool) {
	var carried []float64
	for i := len(in.Before) - 1; i >= 0 && len(carried) < plainRecent; i-- {
		p := in.Before[i]
		e, timed := finishAt(p, in.Car.DistanceFt)
		if !timed || abortedByNote(p) {
			continue
		}
		carried = append(carried, e*airCarry(p, in))
	}
	if len(carried) == 0 {
		return 0, 0, false
	}
	sd = plainSDFloor
	if len(carried) > 1 {
		sd = math.Max(sd, math.Sqrt(variance(carried)))
	}
	return carried[0], sd, true
}

// plainRecent is how many clean passes give the plain rule its spread; a
// race day's worth.
const plainRecent = 5

// plainSDFloor keeps the plain rule's interval from closing on a few passes
// that happened to agree: a sharp bracket car holds its ET within one to
// two hundredths (common practice, from memory).
const plainSDFloor = 0.02

// airCarry is (CF today / CF then)^⅓ with the SAE J1349 factor of each
// reading (1 when either has no air).
func airCarry(p Pass, in Input) float64 {
	if !p.HasAir || !in.Target.HasAir {
		return 1
	}
	then, now := in.Track, in.Track
	if t, ok := in.Tracks[strings.ToLower(p.Track)]; ok {
		then = t
	}
	if t, ok := in.Tracks[strings.ToLower(in.Target.TrackName)]; ok {
		now = t
	}
	return math.Cbrt(sae(in.Target.Air, now.ElevationFt) / sae(p.Air, then.ElevationFt))
}

// sae is the SAE J1349 (1990) factor of reading r at elevation ft.
func sae(r weather.Reading, ft float64) float64 {
	a := r.Derive(weather.Feet(ft))
	return weather.CFSAEJ1349(r.Temp, a.Dry)
}
