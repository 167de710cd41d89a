package engine

import (
	"fmt"
	"math"
	"sort"

	"pitcard/internal/text"
	"pitcard/logbook"
	"pitcard/weather"
)

// CrossCheckPasses is how many of the latest clean passes the plain
// cross-check carries to today's air: enough that one odd pass does not
// decide it (their median is taken), few enough to be today's car.
const CrossCheckPasses = 3

// DefaultCrossCheckMax is how far the model's ET may sit from the plain
// cross-check before the card asks for a second look (the setting
// cross_check_max_s): about two run-to-run spreads of a sharp bracket car
// (common practice, no source: one to two hundredths each).
const DefaultCrossCheckMax = 0.05

// CrossCheck is the paper rule a racer would work by hand: the latest clean
// passes at the distance raced, each carried to today's air by the air
// alone, nothing fitted. It cannot extrapolate a track temperature, a wind
// or a fitted grip curve, which is what makes it a check on the model.
type CrossCheck struct {
	ET     float64        // s: the median of the carried passes
	Passes []logbook.Pass // the passes carried, latest first
	Basis  string         // in words
}

// AirCarried is the cross-check for air today: each of the latest
// CrossCheckPasses clean passes at ft that carry their weather has its ET
// scaled by (CF_today / CF_pass)^(1/3), CF being the SAE J1349 correction
// factor: power observed ∝ 1/CF, and ET ∝ (weight/power)^(1/3) (the
// cube-root law of Huntington, Rod & Custom 1958, and Fox, Am. J. Physics
// 1973). elevation gives a pass's track's elevation (for a barometer
// logged as an altimeter setting). ok is false with no such pass.
func AirCarried(passes []logbook.Pass, ft float64, today weather.Reading, todayElev weather.Length, elevation func(track string) weather.Length) (CrossCheck, bool) {
	now := today.Derive(todayElev)
	var ets []float64
	var used []logbook.Pass
	for i := len(passes) - 1; i >= 0 && len(used) < CrossCheckPasses; i-- {
		p := passes[i]
		et, ok := p.ETAt(ft)
		if !ok || !p.HasAir || logbook.Aborted(p.Notes) {
			continue
		}
		then := p.Air.Derive(elevation(p.Track))
		if !(then.CFJ1349 > 0) || !(now.CFJ1349 > 0) {
			continue
		}
		ets = append(ets, et*math.Cbrt(now.CFJ1349/then.CFJ1349))
		used = append(used, p)
	}
	if len(ets) == 0 {
		return CrossCheck{}, false
	}
	sort.Float64s(ets)
	med := ets[len(ets)/2]
	if len(ets)%2 == 0 {
		med = (ets[len(ets)/2-1] + ets[len(ets)/2]) / 2
	}
	basis := fmt.Sprintf("the median of the latest %s at %.0f ft, each carried to this air by the cube root of the SAE J1349 factor alone",
		text.Plural(len(used), "clean pass"), ft)
	return CrossCheck{ET: med, Passes: used, Basis: basis}, true
}
