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
//   - Surface temperature: each tire grips best at one surface temperature
//     (street tires near 100 °F, drag radials 110, slicks 120); below it the
//     rubber is hard and the track lacks bite, above it the surface turns
//     greasy. The loss away from the best is a smooth, bounded well:
//     GripLossMax × (1 − exp(−((T − best)/width)²)), so at most GripLossMax
//     of the grip is ever lost, the response is monotone on each side of the
//     best, and its steepest slope is GripLossMax·√2·e^(−½)/width per °F.
//     The best temperature and the width (128 °F to start, held within
//     TrackWidthRangeF) are fitted per car from its 60-ft times.
const (
	// TrackBestF is the prior's best surface temperature, °F: a drag
	// radial's.
	TrackBestF = 110.0
	// TrackWidthDefaultF is the prior's width of the grip well, °F (see
	// TrackTempFactor). With GripLossMax it sets the prior's curvature at
	// the best, GripLossMax/width² = 3.05e-5 per °F²: a tire 20 °F off its
	// best keeps 98.8 % of its grip, 40 °F off 95 % (common practice, from
	// memory: a cold track costs a drag tire a tenth or two of 60 ft, not
	// its launch).
	TrackWidthDefaultF = 128.0
	// GripLossMax is the most of its best grip a tire can lose to a cold
	// or greasy surface: a bound, not a typical loss. A slick on a cold
	// track spins where it should bite, and a tire can fall off a cliff of
	// grip within a few degrees. A bound of 0.15 (the second generation's)
	// held the well too shallow for that: on internal/truthsim's tuning
	// draws a car slowed by a second on a cold evening was predicted at
	// its warm-track time (misses of 1.0–1.2 s). At 0.5, with the width's
	// prior widened so the curvature at the best is unchanged, the median
	// ratio to the noise floor went from 1.56 to 1.49 on draws 1–20 and
	// from 1.30 to 1.27 on draws 21–40, the worst tenth from 1.89 to 1.69
	// on 21–40, the worst miss from 1.21 to 1.04 s.
	GripLossMax = 0.5
)

// TrackWidthRangeF bounds the fitted well's width, °F: narrow enough for a
// tire whose grip falls off within a few tens of degrees, wide enough that
// no fit makes grip fall faster than GripLossMax·√2·e^(−½)/25 ≈ 1.7 % per
// °F. The fit leaves the width at its prior unless the logbook's 60-ft
// times at several surface temperatures pin it down (the MAP prior).
var TrackWidthRangeF = [2]float64{25, 250}

// TireBestF is the surface temperature a tire kind grips best at, °F (the
// prior's center; common practice, from memory).
func TireBestF(tire string) float64 {
	switch strings.ToLower(tire) {
	case "street":
		return 100
	case "slick":
		return 120
	}
	return TrackBestF
}

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

// PriorGrip is the tire's prior share of best grip at surface temperature
// tF, for a tire best at bestF, as the model carries grip past the surface
// temperatures its logbook has seen (Params.Grip): the gentlest well a
// tire is given, ExtrapolationLoss deep and ExtrapolationWidthF wide. No
// pass says how deep the well goes out there; this says little, so a
// sweep of the surface temperature past the logbook moves the prediction
// by hundredths per 10 °F, not tenths.
func PriorGrip(tF, bestF float64) float64 {
	d := (tF - bestF) / ExtrapolationWidthF
	return 1 - ExtrapolationLoss*(1-math.Exp(-d*d))
}

// The well grip is carried by past the logged surface temperatures
// (PriorGrip): the second generation's prior well, 0.15 deep and 70 °F
// wide (common practice, from memory: a cold track costs a drag tire a
// tenth or two of 60 ft, not its launch).
const (
	ExtrapolationLoss   = 0.15
	ExtrapolationWidthF = 70.0
)

// PrepFactor is the share of full-prep traction at prep level p (0 = none,
// 1 = full): 0.70 + 0.30·p, so light (0.5) is 0.85.
func PrepFactor(p float64) float64 { return 0.70 + 0.30*p }

// TrackTempFactor is the share of best-temperature traction at surface
// temperature t, for a tire best at optF in a well widthF wide (see the
// package's traction notes): 1 − GripLossMax·(1 − exp(−((T − optF)/widthF)²)).
func TrackTempFactor(t weather.Temperature, optF, widthF float64) float64 {
	d := (t.Fahrenheit() - optF) / widthF
	return 1 - GripLossMax*(1-math.Exp(-d*d))
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
