package engine

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"pitcard/weather"
)

// The traction model: the tire's friction coefficient on the track,
// μ = μ_tire × prep × temperature factor × the car's calibrated traction scale.
//
// Assumptions (common practice, from memory; each is calibrated per car and
// track from the logbook's 60-ft times, so they set the shape, not the level):
//   - μ on a fully prepped surface at its best temperature: street tires 1.1,
//     drag radials 1.6, slicks 2.0.
//   - Prep: none 0.70, light 0.85, full 1.00 of that (or a number 0..1 from
//     none to full).
//   - Surface temperature: best near 100 °F; above it the rubber and the
//     traction compound go greasy, losing 0.25 % of μ per °F (140 °F costs
//     10 %); below it the surface is hard and cold, losing 0.15 % per °F.
//     The factor never falls below 0.6.
const (
	TrackBestF        = 100.0  // °F
	TrackHotLossPerF  = 0.0025 // fraction of μ per °F above TrackBestF
	TrackColdLossPerF = 0.0015 // fraction of μ per °F below TrackBestF
)

// TireMu is μ of a tire kind on a fully prepped track at its best temperature.
func TireMu(tire string) float64 {
	switch strings.ToLower(tire) {
	case "street":
		return 1.1
	case "slick":
		return 2.0
	}
	return 1.6 // drag radial, the default
}

// ParsePrep reads a prep level: none, light, full, or a number 0..1.
func ParsePrep(s string) (float64, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "full":
		return 1, nil
	case "light":
		return 0.5, nil
	case "none", "bare":
		return 0, nil
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || !(v >= 0 && v <= 1) {
		return 0, &weather.InputError{Field: "prep", Value: s, Reason: "is not a prep level (none, light, full, or a number 0..1)"}
	}
	return v, nil
}

// PrepFactor is the share of full-prep traction at prep level p (0 = none,
// 1 = full): 0.70 + 0.30·p, so light (0.5) is 0.85.
func PrepFactor(p float64) float64 { return 0.70 + 0.30*p }

// TrackTempFactor is the share of best-temperature traction at surface
// temperature t; hot scales the loss above TrackBestF (1 = the default slope).
func TrackTempFactor(t weather.Temperature, hot float64) float64 {
	f := t.Fahrenheit()
	var x float64
	if f > TrackBestF {
		x = 1 - hot*TrackHotLossPerF*(f-TrackBestF)
	} else {
		x = 1 - TrackColdLossPerF*(TrackBestF-f)
	}
	return math.Max(0.6, math.Min(1, x))
}

// PrepName names a prep level in words.
func PrepName(p float64) string {
	switch p {
	case 0:
		return "none"
	case 0.5:
		return "light"
	case 1:
		return "full"
	}
	return fmt.Sprintf("%.2f", p)
}
