package bracket

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sync"
	"testing"

	"github.com/shopspring/decimal"

	"pitcard/internal/stats"
	"pitcard/logbook"
)

func dials(from, step float64, n int) []decimal.Decimal {
	var out []decimal.Decimal
	for i := range n {
		out = append(out, decimal.NewFromFloat(from+step*float64(i)).Round(2))
	}
	return out
}

// Symmetry (a reason, not a source): two identical cars on identical dials
// win half each, within the sampling error of WinDraws (±0.5 points, 95 %).
func TestWinChanceSymmetry(t *testing.T) {
	rt := RTModel{Mean: 0.04, SD: 0.025}
	in := WinInput{Us: Estimate{ET: 11.52, SD: 0.03}, UsRT: rt,
		Opp: Opponent{Dial: decimal.RequireFromString("11.50"), Margin: 0.02, MarginSD: 0.03, RT: rt}, Seed: 1}
	w := WinChances(in, []decimal.Decimal{decimal.RequireFromString("11.50")})[0]
	if math.Abs(w.Win-0.5) > 0.006 {
		t.Errorf("identical cars: %.4f to win, want 0.5 ± 0.006", w.Win)
	}
}

// The limits: an opponent who always red-lights hands us the round (unless
// we red-light first); with no spread anywhere the chance is the
// deterministic result of Settle, 0 or 1.
func TestWinChanceLimits(t *testing.T) {
	in := WinInput{Us: Estimate{ET: 11.52, SD: 0.03}, UsRT: RTModel{Mean: 0.05, SD: 0.001},
		Opp: Opponent{Dial: decimal.RequireFromString("11.40"), Margin: 0.0, MarginSD: 0.01, RT: RTModel{Mean: -0.3, SD: 0.001}}, Seed: 2}
	if w := WinChances(in, dials(11.40, 0.05, 3)); w[0].Win != 1 || w[2].Win != 1 {
		t.Errorf("an opponent who always red-lights: %.4f, %.4f", w[0].Win, w[2].Win)
	}
	tiny := 1e-7
	for _, c := range []struct {
		ourET, ourRT, oppMargin, oppRT float64
		dial                           string
	}{
		{11.53, 0.030, 0.020, 0.040, "11.50"}, // we run .030 over with .030: package .060 vs .060 → tie-break by finish
		{11.49, 0.030, 0.020, 0.040, "11.50"}, // we break out
		{11.52, 0.010, 0.040, 0.040, "11.50"}, // we win on the package
		{11.52, -0.010, 0.040, 0.040, "11.50"},
	} {
		t.Run(fmt.Sprintf("ET %.2f RT %.3f on %s", c.ourET, c.ourRT, c.dial), func(t *testing.T) {
			in := WinInput{Us: Estimate{ET: c.ourET, SD: tiny}, UsRT: RTModel{Mean: c.ourRT, SD: tiny},
				Opp: Opponent{Dial: decimal.RequireFromString("11.60"), Margin: c.oppMargin, MarginSD: tiny, RT: RTModel{Mean: c.oppRT, SD: tiny}}, Draws: 500, Seed: 3}
			got := WinChances(in, []decimal.Decimal{decimal.RequireFromString(c.dial)})[0].Win
			o, err := Settle(LaneRun{Dial: decimal.RequireFromString(c.dial), RT: decimal.NewFromFloat(c.ourRT), ET: decimal.NewFromFloat(c.ourET)},
				LaneRun{Dial: decimal.RequireFromString("11.60"), RT: decimal.NewFromFloat(c.oppRT), ET: decimal.NewFromFloat(11.60 + c.oppMargin)}, RaceRules{})
			if err != nil {
				t.Fatal(err)
			}
			want := map[logbook.Lane]float64{logbook.Left: 1, logbook.Right: 0, "": 0.5}[o.Winner]
			if got != want {
				t.Errorf("%+v: win %.3f, Settle says %s (%s)", c, got, o.Winner, o.Explanation)
			}
		})
	}
}

// rtDraw is the reaction-time model as WinChances documents it, written
// again here so the cross-check does not run the code under test: a normal
// of Mean and SD, or with logged times one of them at random plus a normal
// jitter of a fifth of their spread (a smoothed bootstrap).
func rtDraw(m RTModel, r *rand.Rand) float64 {
	if len(m.Samples) == 0 {
		return m.Mean + m.SD*r.NormFloat64()
	}
	_, sd := stats.MeanSD(m.Samples)
	return m.Samples[r.IntN(len(m.Samples))] + 0.2*sd*r.NormFloat64()
}

// Against an independent check: a plain Monte Carlo of races written here,
// each slip built in decimals, its reaction times from rtDraw, settled by
// Settle itself. 10⁶ races agree within 0.3 points (WinChances' own error
// is ±0.5 points at 95 %, the draws are seeded); under -short, 10⁵ races
// within 0.8 (their error grows by √10).
func TestWinChanceAgreesWithSettle(t *testing.T) {
	n, tol := 1_000_000, 0.003
	if testing.Short() {
		n, tol = 100_000, 0.008
	}
	cases := []WinInput{
		{Us: Estimate{ET: 11.50, SD: 0.025}, UsRT: RTModel{Mean: 0.03, SD: 0.02},
			Opp: Opponent{Dial: decimal.RequireFromString("12.10"), Margin: 0.02, MarginSD: 0.03, RT: RTModel{Mean: 0.04, SD: 0.025}}},
		{Us: Estimate{ET: 9.85, SD: 0.04}, UsRT: NewRTModel([]float64{0.012, 0.031, -0.004, 0.025, 0.018, 0.040, 0.009, 0.022, 0.015, 0.028, 0.035}, 0, 0),
			Opp: Opponent{Dial: decimal.RequireFromString("9.80"), Margin: 0.005, MarginSD: 0.01, RT: RTModel{Mean: 0.02, SD: 0.01}}},
	}
	for ci, in := range cases {
		t.Run(fmt.Sprintf("ET %.2f against %s", in.Us.ET, in.Opp.Dial), func(t *testing.T) {
			dial := decimal.NewFromFloat(in.Us.ET - 0.02).Round(2)
			in.Seed = uint64(10 + ci)
			got := WinChances(in, []decimal.Decimal{dial})[0].Win
			var wins float64
			var mu sync.Mutex
			var wg sync.WaitGroup
			for g := range 4 {
				wg.Add(1)
				go func() {
					defer wg.Done()
					r := rand.New(rand.NewPCG(uint64(99+g), uint64(ci)))
					var w float64
					for range n / 4 {
						sec := func(v float64) decimal.Decimal { return decimal.NewFromFloat(v).Round(3) }
						us := LaneRun{Dial: dial, RT: sec(rtDraw(in.UsRT, r)), ET: sec(in.Us.ET + in.Us.SD*r.NormFloat64())}
						op := LaneRun{Dial: in.Opp.Dial, RT: sec(rtDraw(in.Opp.RT, r)), ET: sec(in.Opp.Dial.InexactFloat64() + in.Opp.Margin + in.Opp.MarginSD*r.NormFloat64())}
						o, err := Settle(us, op, RaceRules{})
						if err != nil {
							continue
						}
						switch o.Winner {
						case logbook.Left:
							w++
						case "":
							w += 0.5
						}
					}
					mu.Lock()
					wins += w
					mu.Unlock()
				}()
			}
			wg.Wait()
			mc := wins / float64(n)
			if math.Abs(got-mc) > tol {
				t.Errorf("case %d: WinChances %.4f, Monte Carlo with Settle %.4f (%d races; want within %.3f)", ci, got, mc, n, tol)
			}
			if testing.Verbose() {
				t.Logf("case %d: WinChances %.4f, Monte Carlo %.4f (%d races)", ci, got, mc, n)
			}
		})
	}
}

// The bootstrap's jitter, in closed form: a driver whose logged reaction
// times are five .000s and five .060s (spread 0.0316 s) draws .000 half the
// time, jittered by a normal of 0.2 × 0.0316 s; rounded to the thousandth a
// slip shows, it is a red light below −0.0005 s, so the red-light share is
// ½·Φ(−0.0005/0.00632) = 0.2342 (statistics, the model's own definition).
// Without the jitter it would be 0, with half of it 0.218. Against a slow
// opponent who never red-lights or breaks out, that is all we lose by.
func TestWinChanceRTJitter(t *testing.T) {
	logged := []float64{0, 0.06, 0, 0.06, 0, 0.06, 0, 0.06, 0, 0.06}
	in := WinInput{Us: Estimate{ET: 11.60, SD: 0.005}, UsRT: NewRTModel(logged, 0, 0), Seed: 5,
		Opp: Opponent{Dial: decimal.RequireFromString("12.00"), Margin: 0.30, MarginSD: 0.005, RT: RTModel{Mean: 0.05, SD: 0.005}}}
	w := WinChances(in, []decimal.Decimal{decimal.RequireFromString("11.50")})[0]
	sd := math.Sqrt(10 * 0.03 * 0.03 / 9)
	red := 0.5 * stats.NormalCDF(-0.0005/(0.2*sd))
	// ±0.008: 3.8 standard errors of WinDraws draws (√(0.234·0.766/40000) = 0.0021)
	if math.Abs(w.RedLightChance-red) > 0.008 || math.Abs(w.Win-(1-red)) > 0.008 {
		t.Errorf("red lights %.4f, win %.4f; the smoothed bootstrap gives %.4f and %.4f", w.RedLightChance, w.Win, red, 1-red)
	}
}

// Dead on the dial is not a breakout (common practice, no source): an ET
// equal to the dial to the thousandth, ours or the opponent's, counts as
// on it, so the race goes on the package.
func TestWinChanceDeadOnTheDial(t *testing.T) {
	tiny := 1e-7
	cases := []struct {
		name                     string
		ourET, ourRT, oppMargin  float64
		oppRT, win, bo, oppBreak float64
	}{
		{"we are dead on, they are over: our .020 light wins", 11.50, 0.020, 0.010, 0.040, 1, 0, 0},
		{"they are dead on, we are over: their .020 light wins", 11.51, 0.040, 0, 0.020, 0, 0, 0},
		{"both dead on: the better light wins", 11.50, 0.015, 0, 0.025, 1, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := WinInput{Us: Estimate{ET: c.ourET, SD: tiny}, UsRT: RTModel{Mean: c.ourRT, SD: tiny}, Draws: 500, Seed: 6,
				Opp: Opponent{Dial: decimal.RequireFromString("11.80"), Margin: c.oppMargin, MarginSD: tiny, RT: RTModel{Mean: c.oppRT, SD: tiny}}}
			w := WinChances(in, []decimal.Decimal{decimal.RequireFromString("11.50")})[0]
			if w.Win != c.win || w.BreakoutChance != c.bo || w.OppBreakout != c.oppBreak {
				t.Errorf("win %.3f, our breakout %.3f, theirs %.3f; want %v, %v, %v", w.Win, w.BreakoutChance, w.OppBreakout, c.win, c.bo, c.oppBreak)
			}
		})
	}
}

// A fact of the trade (common practice, no source): the tougher the
// opponent (closer to his dial, sharper on the tree), the closer to the
// expected ET the dial that wins most, taking more breakout risk; against
// a wild one it gives time away safely.
func TestToughOpponentsPullTheDialIn(t *testing.T) {
	us := Estimate{ET: 11.50, SD: 0.02}
	rt := RTModel{Mean: 0.03, SD: 0.02}
	cands := dials(11.40, 0.01, 15)
	tough := WinChances(WinInput{Us: us, UsRT: rt, Seed: 4,
		Opp: Opponent{Dial: decimal.RequireFromString("12.00"), Margin: 0.005, MarginSD: 0.008, RT: RTModel{Mean: 0.015, SD: 0.008}}}, cands)
	wild := WinChances(WinInput{Us: us, UsRT: rt, Seed: 4,
		Opp: Opponent{Dial: decimal.RequireFromString("12.00"), Margin: 0.06, MarginSD: 0.06, RT: RTModel{Mean: 0.07, SD: 0.04}}}, cands)
	bt, bw := BestForWin(tough), BestForWin(wild)
	if !bt.Dial.GreaterThan(bw.Dial) || !(bt.BreakoutChance > bw.BreakoutChance) {
		t.Errorf("tough opponent: best dial %s (breakout %.1f %%); wild: %s (%.1f %%)", bt.Dial, 100*bt.BreakoutChance, bw.Dial, 100*bw.BreakoutChance)
	}
	t.Logf("tough: %s wins %.1f %%, breakout %.1f %%; wild: %s wins %.1f %%, breakout %.1f %%",
		bt.Dial, 100*bt.Win, 100*bt.BreakoutChance, bw.Dial, 100*bw.Win, 100*bw.BreakoutChance)
}

// The card's budget: the chance to win for 11 candidate dials under 20 ms.
func BenchmarkWinChances11(b *testing.B) {
	in := WinInput{Us: Estimate{ET: 11.50, SD: 0.025}, UsRT: RTModel{Mean: 0.03, SD: 0.02},
		Opp: Opponent{Dial: decimal.RequireFromString("12.10"), Margin: 0.02, MarginSD: 0.03, RT: RTModel{Mean: 0.04, SD: 0.025}}}
	cands := dials(11.40, 0.01, 11)
	for b.Loop() {
		WinChances(in, cands)
	}
}

// The shares are fractions of the draws (definition), and the rules' order
// holds inside WinChances too: of two red lights the first to leave loses
// (common practice, no source); of two dials that win equally, BestForWin
// posts the slower (less breakout risk for the same chance).
func TestWinChanceSharesAndRedLights(t *testing.T) {
	tiny := 1e-7
	opts := func(ourET, ourRT, oppMargin, oppRT float64) WinOption {
		in := WinInput{Us: Estimate{ET: ourET, SD: tiny}, UsRT: RTModel{Mean: ourRT, SD: tiny}, Draws: 500, Seed: 7,
			Opp: Opponent{Dial: decimal.RequireFromString("11.50"), Margin: oppMargin, MarginSD: tiny, RT: RTModel{Mean: oppRT, SD: tiny}}}
		return WinChances(in, []decimal.Decimal{decimal.RequireFromString("11.50")})[0]
	}
	if w := opts(11.49, 0.02, -0.01, 0.03); w.BreakoutChance != 1 || w.OppBreakout != 1 || w.RedLightChance != 0 {
		t.Errorf("both always break out: ours %v, theirs %v, red %v; want 1, 1, 0", w.BreakoutChance, w.OppBreakout, w.RedLightChance)
	}
	if w := opts(11.52, -0.010, 0.02, -0.020); w.Win != 1 || w.RedLightChance != 1 {
		t.Errorf("both red, the other lane first (−.020 against our −.010): win %v, red %v; want 1, 1", w.Win, w.RedLightChance)
	}
	if w := opts(11.52, -0.020, 0.02, -0.010); w.Win != 0 {
		t.Errorf("both red, ours first: win %v, want 0", w.Win)
	}
	slow, fast := WinOption{Dial: decimal.RequireFromString("11.47"), Win: 0.6}, WinOption{Dial: decimal.RequireFromString("11.45"), Win: 0.6}
	for _, order := range [][]WinOption{{slow, fast}, {fast, slow}} {
		if got := BestForWin(order); !got.Dial.Equal(slow.Dial) {
			t.Errorf("equal chances %v: best %s, want the slower 11.47", order, got.Dial)
		}
	}
}
