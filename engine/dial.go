package engine

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/shopspring/decimal"

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
	if !(est.ET >= DialRange[0] && est.ET <= DialRange[1]) {
		return DialPlan{}, &weather.InputError{Field: "et", Value: fmt.Sprintf("%.3f", est.ET), Reason: fmt.Sprintf("is outside %g..%g s", DialRange[0], DialRange[1])}
	}
	if !(risk >= RiskRange[0] && risk <= RiskRange[1]) {
		return DialPlan{}, &weather.InputError{Field: "breakout_risk", Value: fmt.Sprint(risk), Reason: fmt.Sprintf("is outside %g..%g (a fraction: 0.10 is 10 %%)", RiskRange[0], RiskRange[1])}
	}
	if !step.IsPositive() {
		return DialPlan{}, &weather.InputError{Field: "dial_step", Value: step.String(), Reason: "must be positive"}
	}
	best := est.ET + est.SD*NormalQuantile(risk)
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
	return NormalCDF((dial.InexactFloat64() - est.ET) / est.SD)
}

// Giveaway is E[max(ET − dial, 0)] for a normal ET: (μ − d)·(1 − Φ(z)) + σ·φ(z),
// z = (d − μ)/σ.
func Giveaway(est Estimate, dial decimal.Decimal) float64 {
	d := dial.InexactFloat64()
	z := (d - est.ET) / est.SD
	return (est.ET-d)*(1-NormalCDF(z)) + est.SD*NormalPDF(z)
}

// NormalCDF is the standard normal distribution function Φ(z).
func NormalCDF(z float64) float64 { return 0.5 * math.Erfc(-z/math.Sqrt2) }

// NormalPDF is the standard normal density φ(z).
func NormalPDF(z float64) float64 { return math.Exp(-z*z/2) / math.Sqrt(2*math.Pi) }

// NormalQuantile is Φ⁻¹(p), for 0 < p < 1.
func NormalQuantile(p float64) float64 { return math.Sqrt2 * math.Erfinv(2*p-1) }

// RoundDownToStep rounds v down to a multiple of step, exactly.
func RoundDownToStep(v float64, step decimal.Decimal) decimal.Decimal {
	return decimal.NewFromFloat(v).Div(step).Floor().Mul(step)
}

// RoundToStep rounds d to the nearest multiple of step (halves away from
// zero), exactly: 10.119999 on a 0.01 step is 10.12.
func RoundToStep(d, step decimal.Decimal) decimal.Decimal {
	return d.Div(step).Round(0).Mul(step)
}

// AbortWords are the words in a pass's notes that say it was not the car's
// time (lifted, pedaled, spun the tires ...). A word matches at the start of
// a word of the notes, in any case ("lift" finds "Lifted", never "shift");
// a phrase ("tire shake") matches its words in order. An occurrence right
// after a negation ("no shake", "didn't spin") does not count. The crew adds
// its own with the setting abort_words; nil is DefaultAbortWords.
type AbortWords []string

// DefaultAbortWords is pitcard's list (common practice, no source): what a
// crew writes on the slip of a run that did not show the car's pace. A
// mild shake ("shook a little") is no reason to drop a pass: only a tire
// shake or a hard one is.
var DefaultAbortWords = AbortWords{
	"lift", "pedal", "abort", "shut off", "shutoff", "broke", "spun", "spin", "smoked",
	"tire shake", "tires shook", "shook hard", "hard shake", "bad shake", "shook bad",
	"coast", "bog", "wheelie", "no good", "ng run",
}

// negations turn the abort word after them around ("no shake").
var negations = []string{"no", "not", "never", "without", "didn't", "didnt", "did not", "wasn't", "wasnt"}

// notAborts are phrases that hold an abort word but describe a full run:
// a breakout is running quicker than the dial, the fullest run there is.
var notAborts = []string{"broke out", "breakout", "brokeout"}

// With is the list with the crew's own words added.
func (a AbortWords) With(extra []string) AbortWords {
	out := append(AbortWords(nil), a.orDefault()...)
	for _, w := range extra {
		if w = strings.ToLower(strings.TrimSpace(w)); w != "" {
			out = append(out, w)
		}
	}
	return out
}

func (a AbortWords) orDefault() AbortWords {
	if a == nil {
		return DefaultAbortWords
	}
	return a
}

// AbortNotesScanned is how much of a pass's notes, in bytes, is read for an
// abort word: a slip's note says why a run was aborted in its first words,
// and a fit reads every pass's notes many times over, so a pasted megabyte
// must not be split into words each time.
const AbortNotesScanned = 2000

// Aborted reports whether notes say the pass was not a full-effort run: an
// abort word not negated.
func (a AbortWords) Aborted(notes string) bool {
	if len(notes) > AbortNotesScanned {
		notes = notes[:AbortNotesScanned]
	}
	words := noteWords(notes)
	for _, w := range a.orDefault() {
		phrase := strings.Fields(strings.ToLower(w))
		if len(phrase) == 0 {
			continue
		}
		for i := range words {
			if matchPhrase(words[i:], phrase) && !negated(words[:i]) && !inNotAbort(words, i) {
				return true
			}
		}
	}
	return false
}

// noteWords are notes in lower case as words; a clause's end (, ; . !) is
// kept as a word of its own so a negation never reaches past it.
func noteWords(notes string) []string {
	var out []string
	for _, f := range strings.Fields(strings.ToLower(notes)) {
		end := ""
		if t := strings.TrimRight(f, ",;.!?:"); t != f {
			f, end = t, "|"
		}
		f = strings.Trim(f, "\"'()[]-/")
		if f != "" {
			out = append(out, f)
		}
		if end != "" {
			out = append(out, end)
		}
	}
	return out
}

// matchPhrase: the words start with the phrase, each word by its prefix
// ("spin" finds "spinning"), the last one too ("lift" finds "lifted").
func matchPhrase(words, phrase []string) bool {
	if len(words) < len(phrase) {
		return false
	}
	for j, p := range phrase {
		if !strings.HasPrefix(words[j], p) {
			return false
		}
	}
	return true
}

// negated: one of the two words before (in the same clause) is a negation.
func negated(before []string) bool {
	for k := len(before) - 1; k >= 0 && k >= len(before)-2; k-- {
		if before[k] == "|" {
			return false
		}
		for _, n := range negations {
			if matchPhrase(before[k:], strings.Fields(n)) || (strings.Contains(n, " ") && k > 0 && matchPhrase(before[k-1:], strings.Fields(n))) {
				return true
			}
		}
	}
	return false
}

// inNotAbort: the word at i is part of a phrase that is a full run.
func inNotAbort(words []string, i int) bool {
	for _, na := range notAborts {
		p := strings.Fields(na)
		for k := max(0, i-len(p)+1); k <= i; k++ {
			if k+len(p) <= len(words) && slices.Equal(words[k:k+len(p)], p) {
				return true
			}
		}
	}
	return false
}

// Aborted reports whether notes say the pass was not a full-effort run, by
// DefaultAbortWords; where the crew's settings are at hand, use theirs.
func Aborted(notes string) bool { return DefaultAbortWords.Aborted(notes) }

// MinSD is the least spread pitcard admits for a bracket car's ET, s: even the
// most consistent car and driver vary by a few thousandths from the air,
// the track and the timing (common practice, from memory).
const MinSD = 0.012

// RecentEstimate estimates the next ET at distance ft from the car's last n
// clean full passes, unweighted by the air: the stand-in until the pass model
// predicts. Passes whose notes say they were aborted, and those more than
// 4 median absolute deviations from the median, are left out and named;
// aborts are the words that mark an aborted pass (nil: DefaultAbortWords).
func RecentEstimate(passes []Pass, ft float64, n int, aborts AbortWords) (Estimate, []Pass, error) {
	var ets []float64
	var used []Pass
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
	med := median(ets)
	dev := make([]float64, len(ets))
	for i, e := range ets {
		dev[i] = math.Abs(e - med)
	}
	mad := math.Max(median(dev)*1.4826, MinSD)
	var keep []float64
	var kept []Pass
	for i, e := range ets {
		if math.Abs(e-med) <= 4*mad {
			keep, kept = append(keep, e), append(kept, used[i])
		}
	}
	mean, sd := MeanSD(keep)
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

func median(v []float64) float64 {
	s := append([]float64(nil), v...)
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j] < s[j-1]; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
	if len(s)%2 == 1 {
		return s[len(s)/2]
	}
	return (s[len(s)/2-1] + s[len(s)/2]) / 2
}

// MeanSD is the mean and the sample standard deviation of v (0 for one value).
func MeanSD(v []float64) (float64, float64) {
	var m float64
	for _, x := range v {
		m += x
	}
	m /= float64(len(v))
	var ss float64
	for _, x := range v {
		ss += (x - m) * (x - m)
	}
	if len(v) < 2 {
		return m, 0
	}
	return m, math.Sqrt(ss / float64(len(v)-1))
}
