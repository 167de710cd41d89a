package heldout

import "pitcard/internal/truthsim"

// Floors computes, for every pass, what a predictor that knew this physics
// and the car exactly would have said as the race day ran: the truth's
// typical run in the pass's conditions as the crew measured them (the
// meters' small errors are all a predictor can know), plus its best estimate
// of the day's effect from the day's earlier clean passes (the mean of their
// departures from typical, shrunk toward none by the ratio of the
// pass-to-pass and the day-to-day variances, both measured on the season
// itself). fin is the finish's index in the timers, ft its distance. The
// standard is computed, not quoted: no source.
//
// A season of fewer than minDays days takes the day-to-day variance as the
// effects' mean square about none (see below).
func Floors(passes []truthsim.Pass, fin int, ft float64) []float64 {
	actual := func(p truthsim.Pass) float64 { et, _ := finishAt(p.Logged, ft); return et }
	var noise []float64
	dayMeans := map[int][]float64{}
	for _, p := range passes {
		if p.Aborted {
			continue
		}
		noise = append(noise, actual(p)-p.Oracle[fin])
		dayMeans[p.Day] = append(dayMeans[p.Day], p.Oracle[fin]-p.Typical[fin])
	}
	var effects []float64
	for _, v := range dayMeans {
		effects = append(effects, mean(v))
	}
	sigma2, tau2 := variance(noise), variance(effects)
	if len(effects) < minDays {
		// a season of a day or two says nothing of the spread between days
		// about their mean: the effects are departures from typical, whose
		// mean is none, so their mean square is the spread
		tau2 = 0
		for _, e := range effects {
			tau2 += e * e / float64(len(effects))
		}
	}
	out := make([]float64, len(passes))
	for k, p := range passes {
		var dev []float64
		for j := k - 1; j >= 0 && passes[j].Day == p.Day; j-- {
			if !passes[j].Aborted {
				dev = append(dev, actual(passes[j])-passes[j].TypicalMeasured[fin])
			}
		}
		est := 0.0
		if n := float64(len(dev)); n > 0 {
			est = mean(dev) * n * tau2 / (n*tau2 + sigma2)
		}
		out[k] = p.TypicalMeasured[fin] + est
	}
	return out
}

// minDays is the fewest race days whose effects' variance about their own
// mean is taken as the day-to-day variance.
const minDays = 3
