package engine

import (
	"math"
	"sort"
	"time"

	"pitcard/bracket"
	"pitcard/logbook"
	"pitcard/weather"
)

// residualPriors are what the structure assumes before the logbook shows
// otherwise, in the residual's unit (s for a timer, mph for a trap).
type residualPriors struct {
	Sigma, Tau, Slope float64 // scatter, day-to-day spread, drift per hour
	MinSigma, MinTau  float64
}

// timerPriors are the priors of timer j's residuals: the scatter of the
// fit's weights (timerSigma), a day-to-day spread of DefaultTau at the
// finish, less at the early timers.
func timerPriors(j, fin int) residualPriors {
	share := (float64(j) + 1) / (float64(fin) + 1)
	return residualPriors{Sigma: timerSigma[j], Tau: DefaultTau * (0.3 + 0.7*share), Slope: SlopePriorSD * (0.3 + 0.7*share),
		MinSigma: bracket.MinSD * (0.5 + 0.5*share), MinTau: MinTau * (0.5 + 0.5*share)}
}

// trapPriors are the priors of a trap speed's residuals, mph.
var trapPriors = residualPriors{Sigma: trapSigma, Tau: 0.5, Slope: 0.2, MinSigma: 0.15, MinTau: 0.1}

// Settings of the residual structure.
const (
	// DayHalfLife: a race day's weight in the base halves every this many
	// race days back (and every BaseHalfLifeDays of calendar).
	DayHalfLife = 6.0
	// SlopePriorSD is the prior spread of the within-day drift, s per hour:
	// rubber and a cooling track are worth a few hundredths over an evening
	// (common practice, no source).
	SlopePriorSD = 0.01
	// MinTau is the least day-to-day spread admitted, s: even a steady car
	// moves a little from one race day to the next.
	MinTau = 0.006
	// TodayHalfLife: within today, a pass's weight in today's offset halves
	// every this many passes back: a track that turns cold shows in the last
	// pass or two before it shows in the day's mean.
	TodayHalfLife = 3.0
	// DefaultTau is the day-to-day spread taken before the logbook has the
	// days to measure it, s (common practice, from memory: a bracket car's
	// day-to-day change is a few hundredths).
	DefaultTau = 0.02
)

// residualFit is the fitted structure of one timer's residuals.
type residualFit struct {
	Base, BaseVar   float64
	Slope, SlopeVar float64 // s per hour since the day's first pass
	Sigma2, Tau2    float64
	Today, TodayVar float64 // today's offset and its uncertainty
	TodayN          int
	Hours           float64 // hours of the predicted pass since today's first
	Weights         []float64
}

// Mean is the correction the structure gives the predicted pass.
func (rf residualFit) Mean() float64 { return rf.Base + rf.Today + rf.Slope*rf.Hours }

// Var is the variance of the predicted pass around the model plus Mean:
// its own scatter and what is not known of the base, today and the slope.
func (rf residualFit) Var() float64 {
	return rf.Sigma2 + rf.BaseVar + rf.TodayVar + rf.Hours*rf.Hours*rf.SlopeVar
}

// fitResiduals fits the structure of what the calibrated physics gets wrong
// to the samples' residuals (res(s) giving one sample's residual, logged
// minus model, and whether it has one), for a pass at time now. The
// structure: a level the car holds over weeks (the base), an offset each
// race day brings (the tune-up, tire pressures, the track's prep that day: a
// random effect, so a day with few passes leans on the base and a day with
// many on itself), a drift through the day as rubber goes down and the
// surface cools (a slope in hours since the day's first pass, shared by the
// days), and the pass-to-pass scatter:
//
//	r = base + day + slope·hours + noise,  day ~ N(0, τ²), noise ~ N(0, σ²)
//
// The steps: σ² and the slope within days (withinDays: the days' pooled
// within-day regression, the slope shrunk toward none); τ² between days
// (betweenDays: the method of moments, the spread of the earlier days'
// levels less what their own scatter explains); the base (setBase: the
// recency-weighted, precision-weighted mean of the earlier days' levels);
// today's offset (setToday: the mean of today's passes, the latest weighing
// most, shrunk toward the base by n·τ²/(n·τ² + σ²), the best linear
// unbiased predictor of a random effect). A first pass of the day carries
// the whole τ² in its interval. Weights are each sample's share of Mean
// (they add to 1), for the explanation and the parameters' uncertainty.
// Under ab.NoDayStructure it is recencyMean instead.
func fitResiduals(ss []Sample, res func(Sample) (float64, bool), now time.Time, pri residualPriors, day weather.DayStart, ab Ablation) residualFit {
	if ab.NoDayStructure {
		return recencyMean(ss, res, now, pri, day)
	}
	out := residualFit{Weights: make([]float64, len(ss)), Sigma2: sq(pri.Sigma), Tau2: sq(pri.Tau), SlopeVar: sq(pri.Slope)}
	g := groupByDay(ss, res, day)
	today := day.Key(now) // a race night past midnight is one day
	if f, ok := g.first[today]; ok && !f.After(now) {
		out.Hours = now.Sub(f).Hours()
	}
	if len(g.obs) == 0 {
		out.BaseVar = sq(PhysicsOnlySpread * 10) // nothing to go on: stands for "unknown"
		return out
	}
	w := g.withinDays(pri)
	out.Sigma2, out.Slope = w.sigma2, w.slope
	out.SlopeVar = 1 / (w.sxx/w.sigma2 + 1/sq(pri.Slope))
	days, todayLevel := g.dayLevels(ss, w.slope, today, ab)
	out.Tau2 = betweenDays(days, w.sigma2, pri)
	dayW := out.setBase(days, now)
	k := out.setToday(todayLevel)
	// Each sample's share of the correction.
	for r, d := range days {
		for _, j := range g.byDay[d.key] {
			out.Weights[g.obs[j].i] += (1 - k) * dayW[r] / float64(d.n)
		}
	}
	if todayLevel != nil {
		var sw float64
		for _, j := range g.byDay[today] {
			sw += g.obs[j].wt
		}
		for _, j := range g.byDay[today] {
			out.Weights[g.obs[j].i] += k * g.obs[j].wt / sw
		}
	}
	return out
}

// residualObs is one sample's residual as the day structure sees it.
type residualObs struct {
	i    int     // the sample's index
	r, h float64 // the residual; hours since its day's first pass
	wt   float64 // today's passes only: its weight in today's level
}

// residualDays are the samples' residuals grouped by race day.
type residualDays struct {
	obs   []residualObs
	byDay map[string][]int     // indexes into obs, by day key (weather.DayStart.Key)
	first map[string]time.Time // each day's first pass, among all the samples
	// keys are byDay's keys in the order the samples first name them (the
	// latest day first): the sums over days run in this order, not a map's,
	// so a fit is the same to the last bit every time.
	keys []string
}

// groupByDay gathers the samples' residuals (those res has) by race day,
// with each one's hours since its day's first pass.
func groupByDay(ss []Sample, res func(Sample) (float64, bool), day weather.DayStart) residualDays {
	g := residualDays{byDay: map[string][]int{}, first: map[string]time.Time{}}
	for _, s := range ss {
		k := day.Key(s.Pass.Time)
		if f, ok := g.first[k]; !ok || s.Pass.Time.Before(f) {
			g.first[k] = s.Pass.Time
		}
	}
	for i, s := range ss {
		r, ok := res(s)
		if !ok {
			continue
		}
		k := day.Key(s.Pass.Time)
		if _, ok := g.byDay[k]; !ok {
			g.keys = append(g.keys, k)
		}
		g.byDay[k] = append(g.byDay[k], len(g.obs))
		g.obs = append(g.obs, residualObs{i: i, r: r, h: s.Pass.Time.Sub(g.first[k]).Hours()})
	}
	return g
}

// withinDay is what the passes within each day say: the scatter σ², the
// drift per hour, and Σ(h − h̄)² (the slope's information, times σ²).
type withinDay struct {
	sigma2, slope, sxx float64
}

// withinDays measures the scatter and the drift within days: the pooled
// within-day regression of the residual on the hours, its slope shrunk
// toward none by the prior (ridge: σ²/SlopePrior² added to Σ(h − h̄)²), σ²
// the residual sum of squares about each day's line with three passes' worth
// of the prior scatter added, when at least three degrees of freedom are
// there to measure it. The slope's shrinkage needs σ² and σ² needs the
// slope: two rounds settle both.
func (g residualDays) withinDays(pri residualPriors) withinDay {
	var sxy, sxx float64
	withinN := 0
	dayMean := map[string][2]float64{} // mean r, mean h
	for _, k := range g.keys {
		idx := g.byDay[k]
		var mr, mh float64
		for _, j := range idx {
			mr += g.obs[j].r
			mh += g.obs[j].h
		}
		mr /= float64(len(idx))
		mh /= float64(len(idx))
		dayMean[k] = [2]float64{mr, mh}
		if len(idx) < 2 {
			continue
		}
		for _, j := range idx {
			sxy += (g.obs[j].h - mh) * (g.obs[j].r - mr)
			sxx += sq(g.obs[j].h - mh)
		}
		withinN += len(idx) - 1
	}
	sigma2 := sq(pri.Sigma)
	slope := 0.0
	for range 2 { // the slope's shrinkage needs σ², σ² needs the slope
		slope = sxy / (sxx + sigma2/sq(pri.Slope))
		within := 0.0
		for _, k := range g.keys {
			idx := g.byDay[k]
			if len(idx) < 2 {
				continue
			}
			m := dayMean[k]
			for _, j := range idx {
				within += sq(g.obs[j].r - m[0] - slope*(g.obs[j].h-m[1]))
			}
		}
		if withinN >= 3 {
			// with a few degrees of freedom, lean on the prior scatter
			sigma2 = (within + 3*sq(pri.Sigma)) / float64(withinN-1+3)
		}
	}
	return withinDay{sigma2: math.Max(sigma2, sq(pri.MinSigma)), slope: slope, sxx: sxx}
}

// dayLevel is one race day's level: its passes' mean residual with the
// drift taken out.
type dayLevel struct {
	key   string
	level float64
	n     int
	nEff  float64 // today's: the weighted passes' worth
	last  time.Time
}

// dayLevels are the earlier days' levels, latest first, and today's (nil
// when today has no pass). Today's leans on its latest passes: a pass's
// weight halves every TodayHalfLife passes back (all alike under
// ab.NoTodayRecency), and g.obs records each one's.
func (g residualDays) dayLevels(ss []Sample, slope float64, today string, ab Ablation) ([]dayLevel, *dayLevel) {
	var days []dayLevel
	var todayLevel *dayLevel
	for _, k := range g.keys {
		idx := g.byDay[k]
		var lv float64
		last := time.Time{}
		for _, j := range idx {
			lv += g.obs[j].r - slope*g.obs[j].h
			if t := ss[g.obs[j].i].Pass.Time; t.After(last) {
				last = t
			}
		}
		d := dayLevel{key: k, level: lv / float64(len(idx)), n: len(idx), nEff: float64(len(idx)), last: last}
		if k == today {
			sorted := append([]int(nil), idx...)
			sort.Slice(sorted, func(a, b int) bool {
				return ss[g.obs[sorted[a]].i].Pass.Time.After(ss[g.obs[sorted[b]].i].Pass.Time)
			})
			var sw, sw2, m float64
			for r, j := range sorted {
				wt := math.Pow(0.5, float64(r)/TodayHalfLife)
				if ab.NoTodayRecency {
					wt = 1
				}
				sw += wt
				sw2 += wt * wt
				m += wt * (g.obs[j].r - slope*g.obs[j].h)
				g.obs[j].wt = wt
			}
			d.level, d.nEff = m/sw, sw*sw/sw2 // Kish's effective number of passes
			todayLevel = &d
			continue
		}
		days = append(days, d)
	}
	sort.Slice(days, func(a, b int) bool { return days[a].last.After(days[b].last) })
	return days, todayLevel
}

// betweenDays is the day-to-day spread τ² by the method of moments: the
// variance of the earlier days' levels less the part their own scatter
// explains (the mean of σ²/nᵢ), from three days on, with one day's worth of
// the prior τ² added; never below MinTau².
func betweenDays(days []dayLevel, sigma2 float64, pri residualPriors) float64 {
	tau2 := sq(pri.Tau)
	if len(days) >= 3 {
		var mean, v, noise float64
		for _, d := range days {
			mean += d.level
		}
		mean /= float64(len(days))
		for _, d := range days {
			v += sq(d.level - mean)
			noise += sigma2 / float64(d.n)
		}
		est := v/float64(len(days)-1) - noise/float64(len(days))
		// lean on the default with few days, as for σ²
		tau2 = (est*float64(len(days)-1) + sq(pri.Tau)) / float64(len(days)-1+1)
	}
	return math.Max(tau2, sq(pri.MinTau))
}

// setBase sets the base, the car's level, and its variance: the earlier
// days' levels weighted by their precision 1/(τ² + σ²/n), halving every
// DayHalfLife race days and every BaseHalfLifeDays of calendar back. It
// returns each day's weight (they add to 1).
func (rf *residualFit) setBase(days []dayLevel, now time.Time) []float64 {
	tau2, sigma2 := rf.Tau2, rf.Sigma2
	dayW := make([]float64, len(days))
	var sw, base, bvar float64
	for r, d := range days {
		age := now.Sub(d.last).Hours() / 24
		dayW[r] = math.Pow(0.5, float64(r)/DayHalfLife) * math.Pow(0.5, math.Max(age, 0)/BaseHalfLifeDays) / (tau2 + sigma2/float64(d.n))
		sw += dayW[r]
	}
	if sw > 0 {
		for r, d := range days {
			dayW[r] /= sw
			base += dayW[r] * d.level
			bvar += sq(dayW[r]) * (tau2 + sigma2/float64(d.n))
		}
	} else {
		bvar = tau2 + sigma2
	}
	rf.Base, rf.BaseVar = base, bvar
	return dayW
}

// setToday sets today's offset from the base: today's level shrunk toward
// the base by k = n·τ²/(n·τ² + σ²) (n: today's passes' worth), with its
// variance τ²σ²/(n·τ² + σ²); with no pass today, none and the whole τ². The
// base's own uncertainty is shrunk away by (1 − k)². It returns k.
func (rf *residualFit) setToday(today *dayLevel) float64 {
	tau2, sigma2 := rf.Tau2, rf.Sigma2
	if today == nil {
		rf.TodayVar = tau2
		return 0
	}
	n := today.nEff
	k := n * tau2 / (n*tau2 + sigma2)
	rf.Today = k * (today.level - rf.Base)
	rf.TodayVar = tau2 * sigma2 / (n*tau2 + sigma2)
	rf.TodayN = today.n
	rf.BaseVar *= sq(1 - k)
	return k
}

// nuisance estimates, for every timer and trap, each day's offset (relative
// to the days' mean, shrunk by the day's number of passes) and the drift
// through the day, from the current fit's residuals, and stores them in the
// samples for the next fit to take out.
func (f *Fit) nuisance() {
	fin := logbook.TimerIndex(f.Car.DistanceFt)
	apply := func(res func(Sample) (float64, bool), pri residualPriors, set func(*Sample, float64)) {
		d := dayStructure(f.Samples, res, pri, f.DayStart)
		for i := range f.Samples {
			set(&f.Samples[i], d.offset(f.Samples[i]))
		}
	}
	for j := range logbook.TimerDistancesFt {
		if j > fin {
			break
		}
		apply(func(s Sample) (float64, bool) { return s.Obs[j] - s.Sim.ET[j], !math.IsNaN(s.Obs[j]) },
			timerPriors(j, fin), func(s *Sample, v float64) { s.Nuisance[j] = v })
	}
	for j := range 2 {
		apply(func(s Sample) (float64, bool) {
			return s.Trap[j] - [2]float64{s.Sim.MPH660, s.Sim.MPH1320}[j], !math.IsNaN(s.Trap[j])
		}, trapPriors, func(s *Sample, v float64) { s.TrapNuisance[j] = v })
	}
}

// structure is the day structure of one residual over the fit's samples.
type structure struct {
	day    weather.DayStart
	slope  float64
	level  map[string]float64 // each day's shrunk offset from the days' mean
	first  map[string]time.Time
	center float64 // mean hours into a day: the slope is taken about it
}

func (d structure) offset(s Sample) float64 {
	k := d.day.Key(s.Pass.Time)
	h := s.Pass.Time.Sub(d.first[k]).Hours()
	return d.level[k] + d.slope*(h-d.center)
}

// dayStructure measures the scatter within days, the spread between them
// and the drift through them with the same estimators as fitResiduals
// (withinDays, betweenDays, over every day the fit has), and returns each
// day's offset from the days' mean, shrunk by n·τ²/(n·τ² + σ²) as today's
// is there.
func dayStructure(ss []Sample, res func(Sample) (float64, bool), pri residualPriors, day weather.DayStart) structure {
	g := groupByDay(ss, res, day)
	d := structure{day: day, level: map[string]float64{}, first: g.first}
	if len(g.byDay) < 2 {
		return d
	}
	w := g.withinDays(pri)
	d.slope = w.slope
	var hsum float64
	for _, o := range g.obs {
		hsum += o.h
	}
	d.center = hsum / float64(len(g.obs))
	var days []dayLevel
	var mean float64
	for _, k := range g.keys {
		idx := g.byDay[k]
		var lv float64
		for _, j := range idx {
			lv += g.obs[j].r - d.slope*(g.obs[j].h-d.center)
		}
		days = append(days, dayLevel{key: k, level: lv / float64(len(idx)), n: len(idx)})
		mean += lv / float64(len(idx))
	}
	mean /= float64(len(days))
	tau2 := betweenDays(days, w.sigma2, pri)
	for _, dl := range days {
		c := float64(dl.n)
		d.level[dl.key] = (dl.level - mean) * c * tau2 / (c*tau2 + w.sigma2)
	}
	return d
}

// recencyMean is the first generation's correction, for the ablation: the
// residuals' mean, a pass's weight halving every 6 passes back and doubled
// for a pass of the same day; the spread of the residuals.
func recencyMean(ss []Sample, res func(Sample) (float64, bool), now time.Time, pri residualPriors, day weather.DayStart) residualFit {
	out := residualFit{Weights: make([]float64, len(ss))}
	var sw, mean, w2 float64
	var vals []float64
	for i, s := range ss {
		r, ok := res(s)
		if !ok {
			continue
		}
		w := math.Pow(0.5, float64(i)/6)
		if day.Same(s.Pass.Time, now) {
			w *= 2
		}
		out.Weights[i] = w
		sw += w
		mean += w * r
		vals = append(vals, r)
	}
	if sw == 0 {
		out.Sigma2 = sq(pri.Sigma)
		return out
	}
	for i := range out.Weights {
		out.Weights[i] /= sw
		w2 += sq(out.Weights[i])
	}
	mean /= sw
	var v float64
	for _, r := range vals {
		v += sq(r - mean)
	}
	out.Sigma2 = math.Max(v/math.Max(float64(len(vals)-1), 1), sq(pri.MinSigma))
	out.Base, out.BaseVar = mean, out.Sigma2*w2
	return out
}
