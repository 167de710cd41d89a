package entry

import (
	"math"
	"strings"
	"testing"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/bracket"
	"pitcard/event"
	"pitcard/logbook"
)

// A named car's history sets the other lane (shrunk toward the settings'
// figures: bracket.Shrunk, k = 3, common practice, no source), and the
// chance to win moves with it.
func TestBuildFromTheBook(t *testing.T) {
	s := event.Settings{OppMargin: 0.02, OppMarginSD: 0.03, OppRTMean: 0.04, OppRTSD: 0.025, RTMean: 0.04, RTSD: 0.025}
	book := func(n int, margin, rt float64, notes string) *event.OpponentBook {
		b := &event.OpponentBook{}
		for i := range n {
			dial := decimal.RequireFromString("11.80")
			jitter := 0.004 * float64(i%5-2) // -0.008 .. 0.008
			b.Passes = append(b.Passes, event.OpponentPass{Car: "4471", Date: time.Date(2026, 5, 1+i%10, 0, 0, 0, 0, time.UTC).Format("2006-01-02"),
				Round: logbook.Session{Kind: logbook.Elimination, N: 1 + i/10}, Dial: dial,
				ET: dial.Add(decimal.NewFromFloat(margin + jitter).Round(3)), RT: decimal.NewFromFloat(rt + jitter).Round(3), Notes: notes})
		}
		return b
	}
	dial := decimal.NewNullDecimal(decimal.RequireFromString("11.80"))
	build := func(b *event.OpponentBook, car string) *bracket.Opponent {
		o := OpponentFields{Car: car}
		opp, _, err := o.Build(s, dial, nil, b)
		if err != nil {
			t.Fatal(err)
		}
		return opp
	}
	// A car that runs 0.12 over its dial and leaves late (0.09): a soft car.
	one, fifty := build(book(1, 0.12, 0.09, ""), "4471"), build(book(50, 0.12, 0.09, ""), "4471")
	if math.Abs(one.Margin-0.045) > 0.003 || math.Abs(one.MarginSD-0.03) > 1e-9 || math.Abs(one.RT.Mean-0.0525) > 0.003 {
		t.Errorf("one pass: %+.4f ± %.4f, RT %.4f; want near the defaults: (3·0.02+0.12)/4 = 0.045 ± 0.030, RT (3·0.04+0.09)/4 = 0.0525", one.Margin, one.MarginSD, one.RT.Mean)
	}
	if math.Abs(fifty.Margin-0.12) > 0.007 || fifty.MarginSD > 0.012 || math.Abs(fifty.RT.Mean-0.09) > 0.004 {
		t.Errorf("fifty passes: %+.4f ± %.4f, RT %.4f; want near the book's 0.12 ± 0.006, RT 0.09", fifty.Margin, fifty.MarginSD, fifty.RT.Mean)
	}
	if !strings.Contains(fifty.From, "from 50 passes of car 4471 (10 events)") {
		t.Errorf("From = %q", fifty.From)
	}
	unknown := build(book(50, 0.12, 0.09, ""), "999")
	if unknown.Margin != s.OppMargin || !strings.Contains(unknown.From, "no passes of car 999") {
		t.Errorf("an unknown car: %+v", unknown)
	}
	// Aborted slips give their reaction times, not their ETs.
	lifted := build(book(50, 0.9, 0.09, "lifted at half track"), "4471")
	if lifted.Margin != s.OppMargin || math.Abs(lifted.RT.Mean-0.09) > 0.004 {
		t.Errorf("lifted slips: margin %.4f (want the default), RT %.4f", lifted.Margin, lifted.RT.Mean)
	}
	// The chance to win (bracket.WinChances) against the soft car's history
	// beats that against an unknown car on the same dial: it gives away more.
	us := bracket.Estimate{ET: 11.45, SD: 0.03}
	ds := []decimal.Decimal{decimal.RequireFromString("11.42")}
	win := func(o *bracket.Opponent) float64 {
		return bracket.WinChances(bracket.WinInput{Us: us, UsRT: bracket.RTModel{Mean: 0.04, SD: 0.025}, Opp: *o, Seed: 1}, ds)[0].Win
	}
	wOne, wFifty, wUnknown := win(one), win(fifty), win(unknown)
	if !(wFifty > wOne+0.05 && wOne > wUnknown) {
		t.Errorf("to win: unknown %.3f, one pass %.3f, fifty %.3f: the history must move it, more with more passes", wUnknown, wOne, wFifty)
	}
}
