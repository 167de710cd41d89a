package bracket

import (
	"fmt"
	"math"

	"github.com/shopspring/decimal"

	"pitcard/internal/stats"
	"pitcard/logbook"
	"pitcard/weather"
)

// Estimate is a predicted elapsed time at the finish with its uncertainty:
// the ET is taken as normally distributed with mean ET and standard
// deviation SD.
type Estimate struct {
	ET    float64 // s
	SD    float64 // s, > 0
	Basis string  // what it leaned on, in words
}

// DialOption is one candidate dial-in.
type DialOption struct {
	Dial decimal.Decimal
	// BreakoutChance is P(ET < dial): the chance of running quicker than the dial.
	BreakoutChance float64
	// Giveaway is the expected time the car runs above its dial when it does
	// not break out, E[max(ET − dial, 0)], s: what the opponent is handed.
	Giveaway    float64
	Recommended bool
}

// DialPlan is the table of candidate dials and the recommendation.
type DialPlan struct {
	Estimate    Estimate
	Step        decimal.Decimal
	Risk        float64 // the largest breakout chance the crew accepts
	Recommended decimal.Decimal
	Options     []DialOption
}

// RiskRange bounds the breakout-risk setting.
var RiskRange = [2]float64{0.001, 0.5}

// PlanDial lists candidate dials on the step grid around the estimate and
// recommends the slowest (highest) dial whose breakout chance is at most
// risk: dial* = ET + SD·Φ⁻¹(risk), rounded down to the step. A higher dial
// gives less time away but breaks out more often. rows is the number of
// candidates either side of the recommendation.
func PlanDial(est Estimate, step decimal.Decimal, risk float64, rows int) (DialPlan, error) {
	if !(est.SD > 0) || math.IsInf(est.SD, 0) {
		return DialPlan{}, fmt.Errorf("the ET estimate has no spread (%v s): a dial needs an interval", est.SD)
	}
	if !(est.ET >= logbook.DialRange[0] && est.ET <= logbook.DialRange[1]) {
		return DialPlan{}, &weather.InputError{Field: "et", Value: fmt.Sprintf("%.3f", est.ET), Reason: fmt.Sprintf("is outside %g..%g s", logbook.DialRange[0], logbook.DialRange[1])}
	}
	if !(risk >= RiskRange[0] && risk <= RiskRange[1]) {
		return DialPlan{}, &weather.InputError{Field: "breakout_risk", Value: fmt.Sprint(risk), Reason: fmt.Sprintf("is outside %g..%g (a fraction: 0.10 is 10 %%)", RiskRange[0], RiskRange[1])}
	}
	if !step.IsPositive() {
		return DialPlan{}, &weather.InputError{Field: "dial_step", Value: step.String(), Reason: "must be positive"}
	}
	best := est.ET + est.SD*stats.NormalQuantile(risk)
	rec := RoundDownToStep(best, step)
	// Guard the float-to-decimal rounding: the recommendation never exceeds the risk.
	for BreakoutChance(est, rec) > risk {
		rec = rec.Sub(step)
	}
	p := DialPlan{Estimate: est, Step: step, Risk: risk, Recommended: rec}
	for i := -rows; i <= rows; i++ {
		d := rec.Add(step.Mul(decimal.NewFromInt(int64(i))))
		if !d.IsPositive() {
			continue
		}
		p.Options = append(p.Options, DialOption{Dial: d, BreakoutChance: BreakoutChance(est, d),
			Giveaway: Giveaway(est, d), Recommended: i == 0})
	}
	return p, nil
}

// BreakoutChance is P(ET < dial) for a normal ET.
func BreakoutChance(est Estimate, dial decimal.Decimal) float64 {
	return stats.NormalCDF((dial.InexactFloat64() - est.ET) / est.SD)
}

// Giveaway is E[max(ET − dial, 0)] for a normal ET: (μ − d)·(1 − Φ(z)) + σ·φ(z),
// z = (d − μ)/σ.
func Giveaway(est Estimate, dial decimal.Decimal) float64 {
	d := dial.InexactFloat64()
	z := (d - est.ET) / est.SD
	return (est.ET-d)*(1-stats.NormalCDF(z)) + est.SD*stats.NormalPDF(z)
}

// RoundDownToStep rounds v down to a multiple of step, exactly.
func RoundDownToStep(v float64, step decimal.Decimal) decimal.Decimal {
	return decimal.NewFromFloat(v).Div(step).Floor().Mul(step)
}

// RoundToStep rounds d to the nearest multiple of step (halves away from
// zero), exactly: 10.119999 on a 0.01 step is 10.12.
func RoundToStep(d, step decimal.Decimal) decimal.Decimal {
	return d.Div(step).Round(0).Mul(step)
}

// MinSD is the least spread pitcard admits for a bracket car's ET, s: even the
// most consistent car and driver vary by a few thousandths from the air,
// the track and the timing (common practice, from memory).
const MinSD = 0.012

// RecentEstimate estimates the next ET at distance ft from the car's last n
// clean full passes, unweighted by the air: the stand-in until the pass model
// predicts. Passes whose notes say they were aborted, and those more than
// 4 median absolute deviations from the median, are left out and named;
// aborts are the words that mark an aborted pass (nil: DefaultAbortWords).
func RecentEstimate(passes []logbook.Pass, ft float64, n int, aborts logbook.AbortWords) (Estimate, []logbook.Pass, error) {
	var ets []float64
	var used []logbook.Pass
	for i := len(passes) - 1; i >= 0 && len(used) < n; i-- {
		p := passes[i]
		et, ok := p.ETAt(ft)
		if !ok || aborts.Aborted(p.Notes) {
			continue
		}
		ets, used = append(ets, et), append(used, p)
	}
	if len(ets) < 2 {
		return Estimate{}, nil, fmt.Errorf("the logbook has %d clean pass(es) at %.0f ft: a dial needs at least 2 (or give --et and --sd)", len(ets), ft)
	}
	med := stats.Median(ets)
	dev := make([]float64, len(ets))
	for i, e := range ets {
		dev[i] = math.Abs(e - med)
	}
	mad := math.Max(stats.Median(dev)*1.4826, MinSD)
	var keep []float64
	var kept []logbook.Pass
	for i, e := range ets {
		if math.Abs(e-med) <= 4*mad {
			keep, kept = append(keep, e), append(kept, used[i])
		}
	}
	mean, sd := stats.MeanSD(keep)
	k := float64(len(keep))
	// the spread of a next pass: the sample spread widened for a short sample
	pred := math.Max(sd*math.Sqrt(1+1/k), MinSD)
	span := kept[len(kept)-1].Time.Format("2006-01-02")
	if last := kept[0].Time.Format("2006-01-02"); last != span {
		span += " to " + last
	}
	basis := fmt.Sprintf("mean of the last %d clean passes at %.0f ft (%s), not corrected for the air", len(keep), ft, span)
	return Estimate{ET: mean, SD: pred, Basis: basis}, kept, nil
}
