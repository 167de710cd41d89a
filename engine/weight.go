package engine

import (
	"fmt"
	"math"
	"sort"
	"time"

	"pitcard/logbook"
	"pitcard/weather"
)

// A car gets lighter through a race day as it burns fuel, and the logbook
// has its weight only when the crew wrote it down. weightModel fills the
// gaps: within a day the logged weights fall by a burn per pass (pooled over
// the days that show it), a day without any starts where the days that have
// them start, and a logbook without weights keeps car.yaml's.

// weightModel estimates the car's weight at any pass.
type weightModel struct {
	carLb  float64                // car.yaml's weight
	burn   float64                // lb per pass (negative: lighter), pooled within days
	start  map[string]float64     // each day's weight before its first pass, where known
	usual  float64                // the usual start of a day: the recent days' mean, or car.yaml's
	passes map[string][]time.Time // every pass of each day, in order, for a pass's place in its day
	logged int
	day    weather.DayStart // where one race day ends
}

func newWeightModel(car Car, passes []logbook.Pass, day weather.DayStart) *weightModel {
	m := &weightModel{carLb: car.WeightLb, usual: car.WeightLb, start: map[string]float64{}, passes: map[string][]time.Time{}, day: day}
	type obs struct{ idx, lb float64 }
	byDay := map[string][]obs{}
	for _, p := range passes {
		k := m.day.Key(p.Time)
		m.passes[k] = append(m.passes[k], p.Time)
	}
	for k := range m.passes {
		sort.Slice(m.passes[k], func(a, b int) bool { return m.passes[k][a].Before(m.passes[k][b]) })
	}
	for _, p := range passes {
		if p.WeightLb > 0 {
			k := m.day.Key(p.Time)
			byDay[k] = append(byDay[k], obs{float64(m.index(p.Time)), p.WeightLb})
			m.logged++
		}
	}
	if m.logged == 0 {
		return m
	}
	// the days in order, so the sums (and the card) come out the same to the
	// last bit every time, not in a map's order
	days := make([]string, 0, len(byDay))
	for k := range byDay {
		days = append(days, k)
	}
	sort.Strings(days)
	var sxy, sxx float64
	for _, k := range days {
		obs := byDay[k]
		if len(obs) < 2 {
			continue
		}
		var mi, mw float64
		for _, o := range obs {
			mi += o.idx
			mw += o.lb
		}
		mi /= float64(len(obs))
		mw /= float64(len(obs))
		for _, o := range obs {
			sxy += (o.idx - mi) * (o.lb - mw)
			sxx += sq(o.idx - mi)
		}
	}
	if sxx > 0 {
		// a weak prior of no burn: a day or two of two weighings do not set it
		m.burn = math.Max(-40, math.Min(5, sxy/(sxx+2)))
	}
	for _, k := range days {
		obs := byDay[k]
		var s float64
		for _, o := range obs {
			s += o.lb - m.burn*o.idx
		}
		m.start[k] = s / float64(len(obs))
	}
	if len(days) > 5 {
		days = days[len(days)-5:]
	}
	var s float64
	for _, k := range days {
		s += m.start[k]
	}
	m.usual = s / float64(len(days))
	return m
}

// index is a pass's place in its day: 0 for the first.
func (m *weightModel) index(t time.Time) int {
	n := 0
	for _, x := range m.passes[m.day.Key(t)] {
		if x.Before(t) {
			n++
		}
	}
	return n
}

// At is the car's estimated weight, lb, for a pass at t.
func (m *weightModel) At(t time.Time) float64 {
	start, ok := m.start[m.day.Key(t)]
	if !ok {
		start = m.usual
	}
	return start + m.burn*float64(m.index(t))
}

// note says how a weight was estimated, in words.
func (m *weightModel) note(t time.Time) string {
	if m.logged == 0 || math.Abs(m.At(t)-m.carLb) < 1 {
		return ""
	}
	return fmt.Sprintf("weight not given: %.0f lb estimated from the logged weights (pass %d of the day, %.1f lb lighter a pass)", m.At(t), m.index(t)+1, -m.burn)
}
