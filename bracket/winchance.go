package bracket

import (
	"math"
	"math/rand/v2"
	"sort"

	"github.com/shopspring/decimal"

	"pitcard/internal/stats"
	"pitcard/logbook"
)

// The chance to win a round against one car: both lanes' reaction times
// and elapsed times are drawn from their distributions, each draw settled
// by the bracket rules (decide, the same as Settle's), and the wins
// counted. The same draws serve every candidate dial (common random
// numbers), so the dials compare without the sampling noise between them.

// WinDraws is how many races are drawn per candidate dial: enough that a
// chance is good to ±0.5 points (95 %: 1.96·√(¼/N) ≤ 0.005).
const WinDraws = 40000

// RTModel is a driver's reaction time, s from the green (negative: a red
// light): the driver's own recent reaction times when there are enough of
// them, drawn as they came (each nudged by a little so the draws are not
// only those values), or a normal of Mean and SD.
type RTModel struct {
	Samples  []float64
	Mean, SD float64
}

// MinRTSamples is how many logged reaction times a driver needs before
// pitcard draws from them rather than from a normal with the setting's
// mean and spread.
const MinRTSamples = 10

// NewRTModel is the reaction-time model of a driver with the given logged
// reaction times (most recent first; the latest 40 are used) and the
// setting's mean and spread for too few.
func NewRTModel(logged []float64, mean, sd float64) RTModel {
	if len(logged) > 40 {
		logged = logged[:40]
	}
	m := RTModel{Mean: mean, SD: sd}
	if len(logged) >= MinRTSamples {
		m.Samples = append([]float64(nil), logged...)
		m.Mean, m.SD = stats.MeanSD(m.Samples)
	}
	return m
}

// draw is one reaction time. A bootstrap draw is jittered by a fifth of
// the spread (a smoothed bootstrap), so a driver with ten logged reaction
// times has more than ten possible races.
func (m RTModel) draw(r *rand.Rand) float64 {
	if len(m.Samples) > 0 {
		return m.Samples[r.IntN(len(m.Samples))] + 0.2*m.SD*r.NormFloat64()
	}
	return m.Mean + m.SD*r.NormFloat64()
}

// RedLightChance is the share of this driver's reaction times below zero.
func (m RTModel) RedLightChance() float64 {
	if len(m.Samples) == 0 {
		return stats.NormalCDF(-m.Mean / m.SD)
	}
	n := 0
	for _, x := range m.Samples {
		if x < 0 {
			n++
		}
	}
	return float64(n) / float64(len(m.Samples))
}

// Opponent is what is known of the other lane's car.
type Opponent struct {
	Dial decimal.Decimal
	// Margin and MarginSD: its ET over its dial, mean and spread, s
	// (negative margin: it tends to break out).
	Margin, MarginSD float64
	RT               RTModel
	// From says where the figures came from when a car was named ("from 6
	// passes of car 4471 (3 events)"); "" for the settings' and flags'.
	From string
}

// WinOption is one candidate dial against the opponent.
type WinOption struct {
	Dial           decimal.Decimal
	Win            float64 // the chance to win, 0..1 (a tie counts half)
	BreakoutChance float64 // ours, from the same draws
	RedLightChance float64 // ours
	OppBreakout    float64 // the opponent's breakout chance
}

// WinInput is everything the chance to win is computed from.
type WinInput struct {
	Us    Estimate // our finish ET
	UsRT  RTModel
	Opp   Opponent
	Draws int    // 0: WinDraws
	Seed  uint64 // the draws are fixed by it: the same inputs, the same figures
}

// WinChances computes the chance to win for each of dials.
func WinChances(in WinInput, dials []decimal.Decimal) []WinOption {
	n := in.Draws
	if n <= 0 {
		n = WinDraws
	}
	r := rand.New(rand.NewPCG(in.Seed, 0x5eed))
	type draw struct{ rt, et, ort, oet int64 } // thousandths of a second, as slips show them
	ms := func(s float64) int64 { return int64(math.Round(s * 1000)) }
	draws := make([]draw, n)
	odial := ms(in.Opp.Dial.InexactFloat64())
	for i := range draws {
		draws[i] = draw{rt: ms(in.UsRT.draw(r)), et: ms(in.Us.ET + in.Us.SD*r.NormFloat64()),
			ort: ms(in.Opp.RT.draw(r)), oet: odial + ms(in.Opp.Margin+in.Opp.MarginSD*r.NormFloat64())}
	}
	cmp := func(a, b int64) int {
		switch {
		case a < b:
			return -1
		case a > b:
			return 1
		}
		return 0
	}
	out := make([]WinOption, len(dials))
	for k, d := range dials {
		dial := ms(d.InexactFloat64())
		top := max(dial, odial)
		var wins, bo, red, obo float64
		for _, x := range draws {
			// us in the left lane, the opponent in the right: the rules do not care which
			us := laneFacts{RedLight: x.rt < 0, Breakout: x.et < dial}
			op := laneFacts{RedLight: x.ort < 0, Breakout: x.oet < odial}
			startUs, startOp := top-dial, top-odial
			f := raceFacts{L: us, R: op,
				Finish:   cmp(startUs+x.rt+x.et, startOp+x.ort+x.oet),
				OverDial: cmp(x.et-dial, x.oet-odial),
				Leave:    cmp(startUs+x.rt, startOp+x.ort)}
			switch w, _ := decide(f); w {
			case logbook.Left:
				wins++
			case "":
				wins += 0.5
			}
			if us.Breakout {
				bo++
			}
			if us.RedLight {
				red++
			}
			if op.Breakout {
				obo++
			}
		}
		out[k] = WinOption{Dial: d, Win: wins / float64(n), BreakoutChance: bo / float64(n), RedLightChance: red / float64(n), OppBreakout: obo / float64(n)}
	}
	return out
}

// BestForWin is the option that wins most (the slower of two that win
// equally: less breakout risk for the same chance).
func BestForWin(opts []WinOption) WinOption {
	sorted := append([]WinOption(nil), opts...)
	sort.SliceStable(sorted, func(a, b int) bool {
		if sorted[a].Win != sorted[b].Win {
			return sorted[a].Win > sorted[b].Win
		}
		return sorted[a].Dial.GreaterThan(sorted[b].Dial)
	})
	return sorted[0]
}

// HeadStart is who leaves first and by how much: positive when we leave
// after the other lane (its dial is slower), s.
func HeadStart(us, opp decimal.Decimal) decimal.Decimal { return opp.Sub(us) }
