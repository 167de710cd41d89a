// Package heldout scores a predictor of the next pass on worlds of the truth
// simulator (internal/truthsim) as race days run: every clean pass after a
// logbook's first few is predicted from the passes before it, from what the
// crew has, and the report gives the figures a crew cares about beside the
// computed noise floor and a plain rule's. It never ships in the pitcard
// command; a test and a command-line runner share it.
//
// Draws (DEVELOPERS.md): drawn worlds truthsim.Draw(1) .. Draw(40) are for
// tuning; Draw(100001) .. Draw(100040) are held out, scored only to report,
// never to choose a model by.
package heldout

import (
	"math"
	"slices"
	"strings"
	"sync"
	"time"

	"pitcard/internal/truthsim"
	"pitcard/weather"
)

// Tuning is the start value of the i-th drawn world a model is tuned on
// (i = 1..).
func Tuning(i int) uint64 { return uint64(i) }

// HeldOut is the start value of the i-th drawn world a model is judged on
// and never tuned to (i = 1..).
func HeldOut(i int) uint64 { return heldOutBase + uint64(i) }

// heldOutBase puts the held-out start values far from any tuning one.
const heldOutBase = 100000

// Skip is how many passes open each logbook before the first target: the
// passes before them are all a predictor has to start from.
const Skip = 2

// Conditions are the target pass's as the crew has them before it runs.
type Conditions struct {
	// Air is the weather log's latest reading: station pressure, humidity,
	// wind and (when HasTrack) the surface; its Time may be minutes before
	// the pass.
	Air       weather.Reading
	HasAir    bool
	WeightLb  float64 // car and driver as weighed; 0: not weighed
	Time      time.Time
	TrackName string
	Prep      float64 // the track's prep, 0 none .. 1 full (track.yaml's prep)
	// Change is the car change made before this pass in the crew's words
	// ("" none): the crew wrote it before the run.
	Change string
}

// Input is exactly what a crew has before a pass.
type Input struct {
	Car    Car              // car.yaml
	Track  Track            // the day's track.yaml
	Tracks map[string]Track // every track the logbook names, by lower-case name
	Before []Pass           // the logged passes before the target, in order
	Target Conditions
}

// Predictor predicts the target's finish ET and its standard deviation, s;
// ok false: no prediction.
type Predictor func(in Input) (et, sd float64, ok bool)

// A DialPredictor is a Predictor that also says the spread its dial is
// planned with (pitcard calibrates the quick tail apart from the interval):
// Score uses it for the breakout share when the predictor is one.
type DialPredictor func(in Input) (et, sd, dialSD float64, ok bool)

// Figures are one predictor's score on a set of passes.
type Figures struct {
	N       int     // passes predicted
	MAE     float64 // mean |predicted − logged| finish ET, s
	Ratio   float64 // MAE over the noise floor's
	Oracle  float64 // worst |predicted − the truth's noiseless run|, s
	Covered int     // logged ET inside predicted ± 1.96 sd
	Broke   int     // logged ET quicker than the dial at 10 % accepted risk
}

// Day is one car-day's score.
type Day struct {
	Day          int
	N            int
	Floor        float64 // the noise floor's MAE, s
	Model, Plain float64 // MAE, s
}

// WorldScore is one world's score.
type WorldScore struct {
	Name         string
	Passes       int     // in the logbook
	Floor        float64 // the noise floor's MAE, s
	FloorOracle  float64 // the truth-knowing predictor's worst |predicted − oracle|, s
	Model, Plain Figures
	Days         []Day
}

// MinScored is the fewest passes scored for a world's ratio to its floor to
// count in the median and the 90th percentile: a ratio of one or two
// passes is noise. Every scored pass counts in the other figures.
const MinScored = 5

// Summary is a predictor's figures across worlds.
type Summary struct {
	// MedianRatio, P90Ratio: of the ratios to their floors of the worlds
	// with MinScored passes scored or more.
	MedianRatio, P90Ratio float64
	Oracle                float64 // the worst single |predicted − oracle|, s
	OracleWorld           string
	Coverage              float64 // share inside ± 1.96 sd (0.95 wanted)
	Breakout              float64 // share quicker than the 10 %-risk dial (0.10 wanted)
	N                     int
}

// Report is the score of a predictor and of PlainRule on the same passes.
type Report struct {
	Worlds       []WorldScore
	Model, Plain Summary
	// WorseDays is the number of car-days where the predictor's MAE is more
	// than WorseBy worse than PlainRule's, of CarDays.
	WorseDays, CarDays int
	// FloorWorseDays counts the car-days where the truth-knowing predictor
	// (Floors) is itself more than WorseBy worse than PlainRule: the
	// car-days a lucky plain rule wins by noise alone, which no honest
	// predictor can be sure of winning back.
	FloorWorseDays int
	// FloorOracle is the truth-knowing predictor's worst miss of the
	// noiseless truth, s: the day's effect it cannot know before the day's
	// first pass, the meters' errors.
	FloorOracle float64
	Elapsed     time.Duration
}

// WorseBy is the margin a car-day's MAE must lose to PlainRule's by to count
// as worse: a hundredth, the step of a dial.
const WorseBy = 0.01

// Risk is the accepted breakout risk of the posted dial the report checks.
const Risk = 0.10

// workers: the machine has two cores.
const workers = 2

// Score scores p and PlainRule on every world, two worlds at a time.
func Score(worlds []truthsim.World, p Predictor) Report {
	return ScoreDial(worlds, func(in Input) (float64, float64, float64, bool) {
		et, sd, ok := p(in)
		return et, sd, sd, ok
	})
}

// ScoreDial is Score for a predictor whose dial has its own spread.
func ScoreDial(worlds []truthsim.World, p DialPredictor) Report {
	start := time.Now()
	scores := make([]WorldScore, len(worlds))
	next := make(chan int)
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				scores[i] = scoreWorld(worlds[i], p)
			}
		}()
	}
	// the longest logbooks first, so neither worker is left with one at the end
	order := make([]int, len(worlds))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int { return worlds[b].Passes() - worlds[a].Passes() })
	for _, i := range order {
		next <- i
	}
	close(next)
	wg.Wait()
	r := Report{Worlds: scores}
	r.Model = summarise(scores, func(s WorldScore) Figures { return s.Model })
	r.Plain = summarise(scores, func(s WorldScore) Figures { return s.Plain })
	for _, s := range scores {
		r.FloorOracle = math.Max(r.FloorOracle, s.FloorOracle)
		for _, d := range s.Days {
			r.CarDays++
			if d.Model > d.Plain+WorseBy {
				r.WorseDays++
			}
			if d.Floor > d.Plain+WorseBy {
				r.FloorWorseDays++
			}
		}
	}
	r.Elapsed = time.Since(start)
	return r
}

// tally gathers one predictor's errors over a world.
type tally struct {
	Figures
	errs    []float64
	dayErrs map[int][]float64
}

func (t *tally) add(day int, et, sd, dialSD, actual, oracle float64) {
	e := math.Abs(et - actual)
	t.errs = append(t.errs, e)
	if t.dayErrs == nil {
		t.dayErrs = map[int][]float64{}
	}
	t.dayErrs[day] = append(t.dayErrs[day], e)
	t.Oracle = math.Max(t.Oracle, math.Abs(et-oracle))
	if Covered(et, sd, actual) {
		t.Covered++
	}
	if actual < Dial(et, dialSD, Risk)-1e-9 {
		t.Broke++
	}
}

// Covered reports whether actual lies inside et ± 1.96 sd, the 95 % interval
// of a normal.
func Covered(et, sd, actual float64) bool { return math.Abs(actual-et) <= 1.96*sd+1e-9 }

// Dial is the dial posted for a breakout risk of risk: et plus the normal
// quantile of risk times sd, rounded down to the hundredth (a dial is
// posted in hundredths; down, so the risk is at most the one accepted).
func Dial(et, sd, risk float64) float64 {
	return math.Floor((et+normalQuantile(risk)*sd)*100+1e-9) / 100
}

// scoreWorld predicts every clean pass of w after the logbook's first Skip.
func scoreWorld(w truthsim.World, p DialPredictor) WorldScore {
	passes := w.Season()
	car, tracks, logged := inputs(w, passes)
	fin := truthsim.FinishIndex(w.Car.DistanceFt)
	floor := Floors(passes, fin, w.Car.DistanceFt)
	s := WorldScore{Name: w.String(), Passes: len(passes)}
	var model, plain tally
	var floors []float64
	dayFloor := map[int][]float64{}
	for k, ps := range passes {
		actual, timed := finishAt(ps.Logged, w.Car.DistanceFt)
		if k < Skip || ps.Aborted || !timed {
			continue
		}
		in := Input{Car: car, Track: ps.Track.Engine(), Tracks: tracks, Before: logged[:k], Target: conditionsOf(ps)}
		et, sd, dialSD, ok := p(in)
		pet, psd, pok := PlainRule(in)
		if !ok || !pok { // scored on the passes both predicted
			continue
		}
		model.add(ps.Day, et, sd, dialSD, actual, ps.Oracle[fin])
		plain.add(ps.Day, pet, psd, psd, actual, ps.Oracle[fin])
		f := math.Abs(floor[k] - actual)
		floors = append(floors, f)
		s.FloorOracle = math.Max(s.FloorOracle, math.Abs(floor[k]-ps.Oracle[fin]))
		dayFloor[ps.Day] = append(dayFloor[ps.Day], f)
	}
	s.Floor = mean(floors)
	s.Model, s.Plain = model.figures(s.Floor), plain.figures(s.Floor)
	days := make([]int, 0, len(dayFloor))
	for d := range dayFloor {
		days = append(days, d)
	}
	slices.Sort(days)
	for _, d := range days {
		s.Days = append(s.Days, Day{Day: d, N: len(dayFloor[d]), Floor: mean(dayFloor[d]), Model: mean(model.dayErrs[d]), Plain: mean(plain.dayErrs[d])})
	}
	return s
}

func (t tally) figures(floor float64) Figures {
	f := t.Figures
	f.N, f.MAE = len(t.errs), mean(t.errs)
	f.Ratio = f.MAE / floor
	return f
}

// conditionsOf is what the crew has of pass p before it runs.
func conditionsOf(p truthsim.Pass) Conditions {
	c := Conditions{Air: p.Logged.Air, HasAir: p.Logged.HasAir, WeightLb: p.Logged.WeightLb, Time: p.Logged.Time,
		TrackName: p.Logged.Track, Prep: p.Track.PrepLevel()}
	if p.ChangedHere { // the change's words lead the notes; what follows came after the run
		c.Change, _, _ = strings.Cut(p.Logged.Notes, "; ")
	}
	return c
}

// summarise gathers one predictor's figures across worlds.
func summarise(ws []WorldScore, of func(WorldScore) Figures) Summary {
	var s Summary
	var ratios []float64
	covered, broke := 0, 0
	for _, w := range ws {
		f := of(w)
		if f.N == 0 {
			continue
		}
		if f.N >= MinScored {
			ratios = append(ratios, f.Ratio)
		}
		s.N += f.N
		covered += f.Covered
		broke += f.Broke
		if f.Oracle > s.Oracle {
			s.Oracle, s.OracleWorld = f.Oracle, w.Name
		}
	}
	s.MedianRatio, s.P90Ratio = Quantile(ratios, 0.5), Quantile(ratios, 0.9)
	if s.N > 0 {
		s.Coverage, s.Breakout = float64(covered)/float64(s.N), float64(broke)/float64(s.N)
	}
	return s
}

// Quantile is the q-quantile of v by linear interpolation between order
// statistics (Hyndman and Fan's type 7, R's default); NaN for none.
func Quantile(v []float64, q float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := slices.Clone(v)
	slices.Sort(s)
	h := q * float64(len(s)-1)
	lo := int(math.Floor(h))
	if lo >= len(s)-1 {
		return s[len(s)-1]
	}
	return s[lo] + (h-float64(lo))*(s[lo+1]-s[lo])
}

func mean(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	var s float64
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}

func variance(v []float64) float64 {
	m := mean(v)
	var s float64
	for _, x := range v {
		s += (x - m) * (x - m)
	}
	return s / float64(max(len(v)-1, 1))
}

// Draws are the first n drawn worlds: the tuning draws, or with held the
// held-out ones.
func Draws(n int, held bool) []truthsim.World {
	out := make([]truthsim.World, n)
	for i := range out {
		seed := Tuning(i + 1)
		if held {
			seed = HeldOut(i + 1)
		}
		out[i] = truthsim.Draw(seed)
	}
	return out
}
