package truthsim

import (
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"pitcard/engine"
	"pitcard/logbook"
	"pitcard/weather"
)

// standardCond is the U.S. Standard Atmosphere 1976 at h ft, dry air, as the
// truth's conditions: 59 °F less 3.56 °F per 1000 ft, and its pressure.
func standardCond(h float64) cond {
	return cond{tempF: 59 - 3.56*h/1000, dewF: -60, stationInHg: 29.92 * math.Pow(1-6.8753e-6*h, 5.2559)}
}

// A boost-limited turbo loses nothing to the thinner air below its altitude
// limit at the same intake temperature, and above it loses power as the air
// thins, like an engine without boost (the wastegate holds the manifold
// pressure until the compressor can give no more: common practice, from
// memory).
func TestBoostLimitedTurbo(t *testing.T) {
	l := fixedLaws
	l.BackPressure, l.BoostLimitFt = 0, 5000
	l.BoostLimitInHg = standardDryInHg(l.BoostLimitFt)
	w := World{Car: Car{Induction: engine.Turbo}, Laws: &l}
	at := func(h float64) float64 { c := standardCond(h); c.tempF = 70; return w.airFactor(c) }
	if sea, below := at(0), at(4000); math.Abs(below/sea-1) > 1e-12 {
		t.Errorf("below the limit: %.4f at 4000 ft against %.4f at sea level, want the same", below, sea)
	}
	// above the limit the factor falls with the dry pressure, in proportion
	c7 := standardCond(7000)
	c7.tempF = 70
	want := (c7.stationInHg - vaporHPa(c7.dewF)/33.8639) / l.BoostLimitInHg
	if got := at(7000) / at(0); math.Abs(got-want) > 1e-9 || got > 0.95 {
		t.Errorf("7000 ft: %.4f of sea level's power, want %.4f (and a loss)", got, want)
	}
}

// The truth's natural engine follows the SAE J607 ("STD") correction: power
// ∝ 1/CF, CF = (29.92/Pd_inHg)·√((T_°F + 459.67)/519.67) (SAE J607; the
// weather package's CFSTD). The two differ only in the vapour pressure
// (Magnus–Tetens here, Buck there): within 0.2 %.
func TestNaturalAirLawIsSAEJ607(t *testing.T) {
	w := World{Car: Car{Induction: engine.Natural}}
	for _, tc := range []struct {
		name            string
		tempF, dewF, in float64
	}{
		{"hot humid low", 95, 72, 28.9},
		{"cool dry high", 50, 20, 25.1},
		{"standard", 60, -60, 29.92},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := weather.Reading{Temp: weather.Fahrenheit(tc.tempF), Baro: weather.InHg(tc.in), BaroKind: weather.StationPressure,
				DewPointSet: true, DewPoint: weather.Fahrenheit(tc.dewF)}
			a := r.Derive(weather.Feet(0))
			want := 1 / weather.CFSTD(r.Temp, a.Dry)
			got := w.airFactor(cond{tempF: tc.tempF, dewF: tc.dewF, stationInHg: tc.in})
			if math.Abs(got/want-1) > 0.002 {
				t.Errorf("air factor %.4f, SAE J607 says %.4f", got, want)
			}
		})
	}
}

// A car called back quickly runs a little slower than the same car rested
// (heat soak: common practice, from memory): a few hundredths, not tenths;
// and a less prepped track is slower than a full one.
func TestHeatSoakAndPrep(t *testing.T) {
	w := Worlds()[0]
	l := fixedLaws
	l.SoakLoss = 0.01
	w.Laws = &l
	dy := day{tune: 1, prep: 1, bottle: 1, trk: w.Track}
	c := standardCond(w.Track.ElevationFt)
	c.trackF = 110
	fin := FinishIndex(w.Car.DistanceFt)
	et := func(c cond, dy day) float64 { return w.simulate(dy, c, w.Car.WeightLb, quiet, false).et[fin] }
	rested, hot := c, c
	rested.soakMin, hot.soakMin = 90, 15
	if d := et(hot, dy) - et(rested, dy); d < 0.005 || d > 0.06 {
		t.Errorf("15 min turnaround: %.3f s slower than rested, want 0.005–0.06", d)
	}
	light := dy
	light.trk.LessPrep = 0.5
	if d := et(c, light) - et(c, dy); d < 0.01 {
		t.Errorf("light prep: %.3f s slower than full, want a loss", d)
	}
}

// A drawn world is the same world for the same seed, and the family holds
// what it promises across the tuning seeds: elevation hops of more than
// 2,000 ft, car changes with their words, less prepped tracks, slips with
// only the finish, readings minutes before the pass, logbooks from a few
// passes to hundreds; and every drawn car is still a drag-strip car (60 ft
// 1.1–2.4 s: common practice, from memory, widened for the drawn cliffs).
func TestDrawnFamily(t *testing.T) {
	if a, b := fmt.Sprint(Draw(7).Season()), fmt.Sprint(Draw(7).Season()); a != b {
		t.Fatal("Draw(7) drew two different seasons")
	}
	var hop, changed, lessPrep, finishOnly, lagged, noTrack bool
	sizes := map[bool]bool{}
	for seed := uint64(1); seed <= 40; seed++ {
		w := Draw(seed)
		sizes[w.Passes() >= 100] = true
		for _, o := range w.Others {
			hop = hop || math.Abs(o.ElevationFt-w.Track.ElevationFt) > 2000
		}
		for _, tr := range w.AllTracks() {
			lessPrep = lessPrep || tr.LessPrep > 0
		}
		if seed > 12 { // the seasons of a dozen are enough for the rest
			continue
		}
		fin := FinishIndex(w.Car.DistanceFt)
		for _, p := range w.Season() {
			if p.ChangedHere {
				changed = true
				// the change's words lead the notes, and read as no abort
				if words, _, _ := strings.Cut(p.Logged.Notes, "; "); words == "" || logbook.DefaultAbortWords.Aborted(words) {
					t.Errorf("%s: a change with notes %q", w, p.Logged.Notes)
				}
			}
			if lag := p.Logged.Time.Sub(p.Logged.Air.Time); lag < 3*time.Minute || lag > 15*time.Minute {
				t.Errorf("%s: a reading %s before the pass, want 3–15 min", w, lag)
			} else {
				lagged = true
			}
			noTrack = noTrack || !p.Logged.Air.HasTrack
			if !p.Logged.ET[0].Valid {
				finishOnly = true
			}
			if _, ok := p.Logged.ETAt(w.Car.DistanceFt); !ok {
				t.Errorf("%s: a slip without its finish", w)
			}
			if s := p.Oracle[0]; s < 1.1 || s > 2.4 {
				t.Errorf("%s: 60 ft %.3f s", w, s)
			}
			if p.Oracle[fin] <= p.Oracle[0] {
				t.Errorf("%s: finish %.3f before the 60 ft", w, p.Oracle[fin])
			}
		}
	}
	for what, ok := range map[string]bool{"an elevation hop over 2000 ft": hop, "a car change": changed, "a less prepped track": lessPrep,
		"a slip with only the finish": finishOnly, "a reading before the pass": lagged, "a surface not read": noTrack,
		"a logbook of 100 passes or more": sizes[true], "a short logbook": sizes[false]} {
		if !ok {
			t.Errorf("no draw of the first 40 has %s", what)
		}
	}
}
