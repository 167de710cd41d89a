package engine

import (
	"bytes"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
	"time"

	"pitcard/internal/stats"
)

// The exponentially weighted average forecaster (source: Cesa-Bianchi and Lugosi
// 2006, ch. 2): a member that misses less on the scored passes takes the
// weight, one that cannot predict a pass (asleep) neither gains nor loses
// there, and one odd pass cannot hand the blend to another member
// (MissLossCap).
func TestOnlineWeights(t *testing.T) {
	hist := func(n int, miss [nMembers]float64, asleep int) []scored {
		var h []scored
		for k := range n {
			s := scored{actual: 10}
			for m := range nMembers {
				sign := 1.0
				if k%2 == 1 {
					sign = -1
				}
				s.est[m] = estimate{ET: 10 + sign*miss[m], SD: 0.02, OK: int(m) != asleep}
			}
			h = append(h, s)
		}
		return h
	}
	t.Run("the better member takes the weight", func(t *testing.T) {
		w := online(hist(30, [nMembers]float64{0.05, 0.01, 0.05, 0.05, 0.05}, -1), memberPrior).weights
		if w[airMember] < 0.9 {
			t.Errorf("weights %v: the member missing by 0.01 s against 0.05 s should hold over 90 %%", w)
		}
	})
	t.Run("equal members keep the prior", func(t *testing.T) {
		w := online(hist(30, [nMembers]float64{0.02, 0.02, 0.02, 0.02, 0.02}, -1), memberPrior).weights
		for m := range nMembers {
			if math.Abs(w[m]-memberPrior[m]) > 1e-9 {
				t.Errorf("weights %v, want the prior %v", w, memberPrior)
			}
		}
	})
	t.Run("asleep neither gains nor loses", func(t *testing.T) {
		w := online(hist(30, [nMembers]float64{0.02, 0.02, 0.02, 0.02, 0.02}, int(todayMember)), memberPrior).weights
		if math.Abs(w[todayMember]-memberPrior[todayMember]) > 0.02 {
			t.Errorf("weights %v: a member asleep on every pass keeps about its prior %.2f", w, memberPrior[todayMember])
		}
	})
	t.Run("one odd pass does not swing the weights", func(t *testing.T) {
		h := hist(20, [nMembers]float64{0.01, 0.02, 0.02, 0.02, 0.02}, -1)
		before := online(h, memberPrior).weights
		h = append(h, scored{actual: 10, est: [nMembers]estimate{{ET: 10.4, SD: 0.02, OK: true}, {ET: 10.02, SD: 0.02, OK: true}, {ET: 10.02, SD: 0.02, OK: true}, {ET: 10.02, SD: 0.02, OK: true}, {ET: 10.02, SD: 0.02, OK: true}}})
		after := online(h, memberPrior).weights
		if after[physicsMember] < before[physicsMember]/6 {
			t.Errorf("one 0.4 s miss cut the pass model's weight from %.3f to %.3f", before[physicsMember], after[physicsMember])
		}
	})
}

// Split conformal calibration with normalized scores (source: Vovk, Gammerman and
// Shafer 2005): misses twice the spread the members claim widen the
// interval about twice; with no history the scale is 1.
func TestConformalScale(t *testing.T) {
	if s := online(nil, memberPrior).Scale; math.Abs(s-1) > 0.1 {
		t.Errorf("no history: scale %.2f, want about 1", s)
	}
	var h []scored
	for k := range 200 {
		// misses spread as a normal with twice the claimed SD: the
		// quantiles of |z| at (k+0.5)/200
		q := (k * 37) % 200 // the quantiles in a scrambled order: recent passes count more
		z := 2 * stats.NormalQuantile(0.5+(float64(q)+0.5)/400)
		if k%2 == 1 {
			z = -z
		}
		s := scored{actual: 10 + 0.01*z}
		for m := range nMembers {
			s.est[m] = estimate{ET: 10, SD: 0.01, OK: true}
		}
		h = append(h, s)
	}
	if s := online(h, memberPrior).Scale; s < 1.6 || s > 2.4 {
		t.Errorf("misses at twice the claimed spread: scale %.2f, want about 2", s)
	}
}

// The cache writes what was used and reads it back; a cache of another
// version or a broken file is an empty cache, never an error.
func TestHeldOutCacheRoundTrip(t *testing.T) {
	c := NewHeldOutCache()
	c.put("a", heldOutEntry{estimate{ET: 11.4, SD: 0.02, OK: true}})
	c.put("b", heldOutEntry{})
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		t.Fatal(err)
	}
	back := ReadHeldOutCache(&buf)
	if e, ok := back.get("a"); !ok || e.model.ET != 11.4 || e.model.SD != 0.02 || !e.model.OK {
		t.Errorf("read back %+v %v", e, ok)
	}
	if e, ok := back.get("b"); !ok || e.model.OK {
		t.Errorf("a pass the model could not predict reads back %+v %v", e, ok)
	}
	for _, broken := range []string{"", "{", `{"version": 1, "entries": {"a": [1, 2, 1]}}`, "not json"} {
		if c := ReadHeldOutCache(strings.NewReader(broken)); len(c.entries) != 0 {
			t.Errorf("%q read as %d entries", broken, len(c.entries))
		}
	}
}

// With one or two clean passes nothing is fitted: the prediction is those
// passes carried by the SAE J1349 factor alone (the cold start), even when
// the round's call time is earlier than the latest pass (a schedule left at
// the morning's time). Source: the cube-root carry of AirCarried, SAE J1349.
func TestColdStartCarriesThePasses(t *testing.T) {
	g := gen{rng: rand.New(rand.NewPCG(5, 6)), truth: Params{PowerScale: 0.95, TractionScale: 1.05, PressureExp: 0.95, TempExp: 0.5, TrackOptF: 105, TrackWidthF: 70}, car: testCar}
	passes := g.season(1, 4)[:1] // one pass (a day of one divides by zero in gen)
	p := passes[0]
	for _, call := range []time.Duration{time.Hour, -time.Hour} {
		pr, _, err := Forecast(CalibrateInput{Car: testCar, Track: testTrack, Passes: passes, Now: p.Time},
			PredictInput{Air: p.Air, Prep: 1, Time: p.Time.Add(call)}, nil)
		if err != nil {
			t.Fatal(err)
		}
		et, _ := p.ETAt(testCar.DistanceFt)
		if !pr.Blend.ColdStart || pr.Blend.Members[airMember].Share != 1 || math.Abs(pr.Finish().ET-et) > 1e-6 {
			t.Errorf("call %v after the pass: cold start %v, shares %+v, ET %.4f (the pass ran %.4f in this very air)", call, pr.Blend.ColdStart, pr.Blend.Members, pr.Finish().ET, et)
		}
		// what it says of itself: carried, not calibrated
		for _, n := range pr.Notes {
			if strings.HasPrefix(n, "calibrated to") {
				t.Errorf("a cold start says %q", n)
			}
		}
		if b := pr.Estimate().Basis; !strings.Contains(b, "1 pass carried") {
			t.Errorf("a cold start's basis %q, want the pass carried to this air", b)
		}
		if e := pr.Blend.Members[similarMember].ET; !math.IsNaN(e) {
			t.Errorf("a member with no estimate shows an ET of %v, want none (NaN)", e)
		}
	}
}

// The shares the card prints are whole percents that add up to 100: each
// rounded down, the points left going to the largest remainders (the
// largest-remainder method of apportionment, Hamilton 1792; source: any
// text on apportionment).
func TestBlendPercentsAddUp(t *testing.T) {
	for _, tc := range []struct {
		shares []float64
		want   []int
	}{
		{[]float64{0.56, 0.0288, 0.05, 0.0, 0.22, 0.1412}, []int{56, 3, 5, 0, 22, 14}},
		{[]float64{1.0 / 3, 1.0 / 3, 1.0 / 3}, []int{34, 33, 33}},
		{[]float64{0.004, 0.996}, []int{0, 100}},
		{[]float64{1, 0}, []int{100, 0}},
	} {
		b := Blend{}
		for _, sh := range tc.shares {
			b.Members = append(b.Members, MemberShare{Share: sh})
		}
		got := b.Percents()
		if !slices.Equal(got, tc.want) {
			t.Errorf("shares %v: percents %v, want %v", tc.shares, got, tc.want)
		}
	}
}
