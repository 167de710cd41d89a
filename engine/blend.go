package engine

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"runtime"
	"sort"
	"strings"
	"sync"
	"time"

	"pitcard/bracket"
	"pitcard/internal/stats"
	"pitcard/internal/text"
	"pitcard/logbook"
	"pitcard/weather"
)

// A member is one way of predicting the finish ET of the next pass from the
// passes before it. The blend (Forecast) scores every member on the car's
// own logbook, each recent pass predicted from the passes before it, and
// weighs the members by how they did.
type member int

const (
	physicsMember member = iota // the calibrated pass model (Calibrate, Predict)
	airMember                   // the latest clean passes carried by the air alone (AirCarried)
	todayMember                 // today's clean passes carried by the air alone
	nMembers
)

// Name is the member in words, as the card says what it leaned on.
func (m member) Name() string {
	return [...]string{"the pass model", "the latest passes by air", "today's passes"}[m]
}

// Blend settings.
const (
	// ScoredPasses is how many of the latest clean passes each member is
	// scored on (each predicted from the passes before it).
	ScoredPasses = 30
	// BlendForget is the discount per scored pass of a member's past
	// losses: a loss ten passes back counts about a third, so the weights
	// follow a car that changes.
	BlendForget = 0.97
	// ColdStartPasses: with fewer clean passes than this the physics is
	// fitted to nothing; the prediction is the passes carried by the air.
	ColdStartPasses = 3
	// ConformalPrior is how many scored passes' worth of belief the
	// interval's calibration starts with at the model's own spread (a
	// scale of 1), so three scored passes cannot halve the interval.
	ConformalPrior = 8.0
	// ConformalForget is the discount per scored pass of an older pass's
	// say in the interval's calibration.
	ConformalForget = 0.97
)

// memberPrior is each member's weight before any pass is scored.
var memberPrior = [nMembers]float64{0.6, 0.25, 0.15}

// MemberShare is a member's share of the blended finish ET.
type MemberShare struct {
	Name  string
	Share float64 // 0..1
	ET    float64 // its own finish ET for the next pass, s
	MAE   float64 // its mean miss on the scored passes, s (NaN: none scored)
}

// Blend is what the blended prediction rests on.
type Blend struct {
	Members []MemberShare // in the order of member
	Scored  int           // passes scored
	// Scale is the factor the interval was widened (>1) or narrowed (<1)
	// by so that it covers as often as it says on this car's scored passes.
	Scale float64
	// ColdStart: fewer than ColdStartPasses clean passes; nothing fitted.
	ColdStart bool
}

// Text says what the blend leaned on, e.g. "the pass model 70 %, today's
// passes 30 %".
func (b Blend) Text() string {
	var parts []string
	for _, m := range b.Members {
		if m.Share >= 0.03 { // a share under 3 % moves the ET under a thousandth in most cases
			parts = append(parts, fmt.Sprintf("%s %.0f %%", m.Name, 100*m.Share))
		}
	}
	return strings.Join(parts, ", ")
}

// estimate is one member's prediction of one pass.
type estimate struct {
	ET, SD float64
	OK     bool
}

// HeldOutCache keeps the pass model's held-out predictions by the content
// they were computed from (the car, the tracks, the settings, the passes
// before and the target's conditions), so each new pass costs one new
// calibration. The zero value is not usable: NewHeldOutCache. Safe for
// concurrent use.
type HeldOutCache struct {
	mu      sync.Mutex
	entries map[string]estimate
	used    map[string]bool // asked for or added since it was made or read
	changed bool
	cores   int // calibrations at once when scoring; 0: GOMAXPROCS
}

// OnCores limits the calibrations a forecast with this cache runs at once
// (a server leaves cores to the requests that write). It returns c.
func (c *HeldOutCache) OnCores(n int) *HeldOutCache {
	c.cores = n
	return c
}

// MaxHeldOutEntries bounds a cache kept in memory (the pit page's): past it,
// it starts afresh.
const MaxHeldOutEntries = 100000

// NewHeldOutCache is an empty cache.
func NewHeldOutCache() *HeldOutCache {
	return &HeldOutCache{entries: map[string]estimate{}, used: map[string]bool{}}
}

func (c *HeldOutCache) get(key string) (estimate, bool) {
	if c == nil {
		return estimate{}, false
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	e, ok := c.entries[key]
	if ok {
		c.used[key] = true
	}
	return e, ok
}

func (c *HeldOutCache) put(key string, e estimate) {
	if c == nil {
		return
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	if len(c.entries) >= MaxHeldOutEntries {
		c.entries, c.used = map[string]estimate{}, map[string]bool{}
	}
	c.entries[key], c.used[key], c.changed = e, true, true
}

// heldOutFile is the cache as written: a version and the entries.
type heldOutFile struct {
	Version int                   `json:"version"`
	Entries map[string][3]float64 `json:"entries"` // ET, SD, 1 if the model could predict
}

// heldOutVersion changes whenever the model changes what it predicts: a
// cache of another version is not read.
const heldOutVersion = 4

// ReadHeldOutCache reads a cache WriteTo wrote. A cache of another version,
// or one that cannot be read, is an empty cache: it is only ever a saving.
func ReadHeldOutCache(r io.Reader) *HeldOutCache {
	c := NewHeldOutCache()
	var f heldOutFile
	if err := json.NewDecoder(io.LimitReader(r, 64<<20)).Decode(&f); err != nil || f.Version != heldOutVersion {
		return c
	}
	for k, v := range f.Entries {
		c.entries[k] = estimate{ET: v[0], SD: v[1], OK: v[2] == 1}
	}
	return c
}

// Changed says whether a prediction was added since the cache was made or
// read: whether it is worth writing.
func (c *HeldOutCache) Changed() bool {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.changed
}

// WriteTo writes the entries used since the cache was made or read (those
// the next card will ask for again; the rest are left behind).
func (c *HeldOutCache) WriteTo(w io.Writer) (int64, error) {
	c.mu.Lock()
	f := heldOutFile{Version: heldOutVersion, Entries: map[string][3]float64{}}
	for k := range c.used {
		e := c.entries[k]
		ok := 0.0
		if e.OK {
			ok = 1
		}
		f.Entries[k] = [3]float64{e.ET, e.SD, ok}
	}
	c.mu.Unlock()
	data, err := json.Marshal(f)
	if err != nil {
		return 0, err
	}
	n, err := w.Write(data)
	return int64(n), err
}

// target is one scored pass: its index in the clean passes, and the actual.
type target struct {
	pass   logbook.Pass
	before []logbook.Pass // every logbook pass before it
	actual float64
}

// Forecast is pitcard's prediction of the next pass: the members' finish
// ETs blended by how each did on this car, the calibrated model's timers
// and traps moved with it, and the interval calibrated on the car's own
// held-out misses.
//
// The weights are the exponentially weighted average forecaster with
// discounted squared losses (Cesa-Bianchi and Lugosi, Prediction, Learning,
// and Games, 2006, ch. 2; a member that cannot predict a pass, as today's
// passes on a day's first, takes the blend's loss there: the "sleeping
// experts" of Freund, Schapire, Singer and Warmuth, 1997). The interval is
// split conformal prediction with normalized scores (Vovk, Gammerman and
// Shafer, Algorithmic Learning in a Random World, 2005; Lei et al., JASA
// 2018), the older scores discounted as Barber, Candès, Ramdas and
// Tibshirani (Ann. Statist. 2023) do for data that drift. cache may be nil.
func Forecast(cal CalibrateInput, next PredictInput, cache *HeldOutCache) (Prediction, Fit, error) {
	fit, err := Calibrate(cal)
	if err != nil {
		return Prediction{}, fit, err
	}
	pr := Predict(fit, next)
	if pr.PhysicsOnly || pr.Raw || len(pr.Timers) == 0 {
		return pr, fit, nil
	}
	dist := cal.Car.DistanceFt
	fin := pr.Finish()
	now := [nMembers]estimate{physicsMember: {ET: fin.ET, SD: fin.SD, OK: true}}
	elev := cal.Track.Elevation()
	now[airMember] = carried(cal, cal.Passes, next, elev, false)
	now[todayMember] = carried(cal, cal.Passes, next, elev, true)

	b := Blend{Scale: 1}
	var blendET, blendSD float64
	if len(fit.Samples) < ColdStartPasses {
		// Cold start: too few passes to fit anything; carry them by the air.
		b.ColdStart = true
		w := [nMembers]float64{airMember: 1}
		blendET, _ = mix(now, w)
		blendSD = fin.SD // the model's spread, which carries the day-to-day prior
		if math.IsNaN(blendET) {
			blendET, w = fin.ET, [nMembers]float64{physicsMember: 1}
		}
		b.Members = shares(now, w, [nMembers]float64{math.NaN(), math.NaN(), math.NaN()})
	} else {
		hist := scoreMembers(cal, fit, cache)
		w, scale := online(hist)
		blendET, blendSD = mix(now, w)
		b.Scale = scale
		b.Scored = len(hist)
		blendSD *= b.Scale
		b.Members = shares(now, w, memberMAE(hist))
	}
	pr.Blend = b
	shift := blendET - fin.ET
	ratio := blendSD / fin.SD
	for i := range pr.Timers {
		t := &pr.Timers[i]
		scale := t.ET / fin.ET
		t.ET += shift * scale
		t.SD *= ratio
		t.Low, t.High = t.ET-IntervalZ*t.SD, t.ET+IntervalZ*t.SD
	}
	for i := range pr.Traps {
		t := &pr.Traps[i]
		t.SD *= math.Max(ratio, 1)
		t.Low, t.High = t.MPH-IntervalZ*t.SD, t.MPH+IntervalZ*t.SD
	}
	if b.ColdStart {
		pr.Notes = append(pr.Notes, fmt.Sprintf("only %s at %.0f ft: the prediction carries them to this air by the SAE J1349 factor alone; nothing is fitted yet",
			text.Plural(len(fit.Samples), "clean pass"), dist))
	} else {
		pr.Notes = append(pr.Notes, fmt.Sprintf("leaned on %s (by the last %s); interval ×%.2f from their misses",
			b.Text(), text.Plural(b.Scored, "pass"), b.Scale))
	}
	return pr, fit, nil
}

// carried is the air-carried estimate of the next pass from passes: the
// median of the latest clean passes carried by the SAE J1349 factor (today
// only: the day's passes so far).
func carried(cal CalibrateInput, passes []logbook.Pass, next PredictInput, elev weather.Length, today bool) estimate {
	if today {
		var same []logbook.Pass
		for _, p := range passes {
			if !p.Time.After(next.Time) && cal.DayStart.Same(p.Time, next.Time) {
				same = append(same, p)
			}
		}
		passes = same
	}
	passes = sinceChange(passes, cal.Changes)
	elevation := func(track string) weather.Length {
		if strings.EqualFold(track, cal.Track.Name) {
			return cal.Track.Elevation()
		}
		if t, ok := cal.Tracks[strings.ToLower(track)]; ok {
			return t.Elevation()
		}
		return elev
	}
	cc, ok := AirCarried(passes, cal.Car.DistanceFt, next.Air, elev, elevation)
	if !ok {
		return estimate{}
	}
	return estimate{ET: cc.ET, SD: bracket.MinSD, OK: true}
}

// scored is one scored pass: every member's held-out estimate and the actual.
type scored struct {
	est    [nMembers]estimate
	actual float64
}

// scoreMembers predicts each of the latest ScoredPasses clean passes the fit
// kept from the passes before it, by every member, oldest first.
func scoreMembers(cal CalibrateInput, fit Fit, cache *HeldOutCache) []scored {
	dist := cal.Car.DistanceFt
	passes := append([]logbook.Pass(nil), cal.Passes...)
	logbook.SortPasses(passes)
	index := map[string]int{}
	for i, p := range passes {
		index[p.Key()] = i
	}
	// the fit's samples are the clean passes, most recent first
	var targets []target
	for k := 0; k < len(fit.Samples) && len(targets) < ScoredPasses; k++ {
		p := fit.Samples[k].Pass
		i, ok := index[p.Key()]
		if !ok || len(fit.Samples)-k-1 < ColdStartPasses-1 {
			continue
		}
		actual, _ := p.ETAt(dist)
		targets = append(targets, target{pass: p, before: passes[:i], actual: actual})
	}
	// oldest first
	for l, r := 0, len(targets)-1; l < r; l, r = l+1, r-1 {
		targets[l], targets[r] = targets[r], targets[l]
	}
	base := baseKey(cal)
	out := make([]scored, len(targets))
	work := make(chan int)
	var wg sync.WaitGroup
	workers := runtime.GOMAXPROCS(0)
	if cache != nil && cache.cores > 0 {
		workers = cache.cores
	}
	for range max(1, min(workers, len(targets))) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range work {
				out[k] = scoreOne(cal, targets[k], base, cache)
			}
		}()
	}
	for k := range targets {
		work <- k
	}
	close(work)
	wg.Wait()
	return out
}

// scoreOne is every member's held-out estimate of one target pass.
func scoreOne(cal CalibrateInput, t target, base string, cache *HeldOutCache) scored {
	c := cal
	c.Passes, c.Now = t.before, t.pass.Time.Add(-time.Second)
	c.Track = trackOf(cal, t.pass.Track)
	prep, err := ParsePrep(c.Track.Prep)
	if err != nil {
		prep = 1
	}
	next := PredictInput{Air: t.pass.Air, Prep: prep, WeightLb: t.pass.WeightLb, Time: t.pass.Time}
	s := scored{actual: t.actual}
	key := heldOutKey(base, c, next)
	if e, ok := cache.get(key); ok {
		s.est[physicsMember] = e
	} else {
		if fit, err := Calibrate(c); err == nil && len(fit.Samples) > 0 {
			f := Predict(fit, next).Finish()
			s.est[physicsMember] = estimate{ET: f.ET, SD: f.SD, OK: true}
		}
		cache.put(key, s.est[physicsMember])
	}
	elev := c.Track.Elevation()
	s.est[airMember] = carried(c, t.before, next, elev, false)
	s.est[todayMember] = carried(c, t.before, next, elev, true)
	return s
}

// trackOf is the track a pass ran at, as the calibration knows it.
func trackOf(cal CalibrateInput, name string) Track {
	if strings.EqualFold(name, cal.Track.Name) {
		return cal.Track
	}
	if t, ok := cal.Tracks[strings.ToLower(name)]; ok {
		return t
	}
	return Track{Name: name, Prep: "full"}
}

// baseKey digests what every held-out prediction depends on besides the
// passes: the car, the tracks and the settings.
func baseKey(cal CalibrateInput) string {
	h := sha256.New()
	names := make([]string, 0, len(cal.Tracks))
	for n := range cal.Tracks {
		names = append(names, n)
	}
	sort.Strings(names)
	fmt.Fprintf(h, "v1|%+v|%+v|%v|%v|%v|%+v", cal.Car, cal.Track, cal.DayStart, cal.Aborts, cal.Changes, cal.Ablation)
	for _, n := range names {
		fmt.Fprintf(h, "|%+v", cal.Tracks[n])
	}
	return hex.EncodeToString(h.Sum(nil))
}

// heldOutKey digests one held-out prediction's inputs.
func heldOutKey(base string, c CalibrateInput, next PredictInput) string {
	h := sha256.New()
	fmt.Fprintf(h, "%s|%+v|%+v|", base, c.Track, next)
	for _, p := range c.Passes {
		fmt.Fprintf(h, "%+v\n", p)
	}
	return hex.EncodeToString(h.Sum(nil))
}

// online replays the scored passes in order as the blend would have seen
// them: it returns the members' weights for the next pass (the discounted
// exponentially weighted average of their capped absolute misses, in units
// of the typical miss) and the conformal scale of the blend's spread (the factor
// that makes its 95 % interval cover 95 % of the scored passes, each scored
// by its miss over the spread the blend gave it then; recent passes count
// more, and ConformalPrior passes at a scale of 1 steady a short history).
func online(hist []scored) ([nMembers]float64, float64) {
	type score struct{ z, weight float64 }
	var zs []score
	var loss [nMembers]float64
	ref := missScale(hist)
	for k, s := range hist {
		w := expWeights(loss)
		et, sd := mix(s.est, w)
		if math.IsNaN(et) {
			continue
		}
		if sd > 0 {
			zs = append(zs, score{math.Abs(s.actual-et) / sd, math.Pow(ConformalForget, float64(len(hist)-1-k))})
		}
		for m := range nMembers {
			loss[m] *= BlendForget
			if s.est[m].OK {
				loss[m] += missLoss(s.actual-s.est[m].ET, ref)
			} else {
				loss[m] += missLoss(s.actual-et, ref) // asleep: it neither gains nor loses on the blend
			}
		}
	}
	// the prior: ConformalPrior passes whose scores spread as a normal's
	const priorPoints = 8
	for i := range priorPoints {
		p := (float64(i) + 0.5) / priorPoints
		zs = append(zs, score{stats.NormalQuantile(0.5 + p/2), ConformalPrior / priorPoints})
	}
	sort.Slice(zs, func(a, b int) bool { return zs[a].z < zs[b].z })
	var total, cum float64
	for _, e := range zs {
		total += e.weight
	}
	scale := 1.0
	for _, e := range zs {
		cum += e.weight
		if cum >= 0.95*total {
			scale = math.Max(0.5, math.Min(4, e.z/IntervalZ))
			break
		}
	}
	return expWeights(loss), scale
}

// BlendLearningRate is η of the weights, per typical miss; MissLossCap
// caps one pass's loss (in typical misses), so one odd pass (a pedal, a
// timing fault the notes missed) cannot hand the blend to another member.
const (
	BlendLearningRate = 0.5
	MissLossCap       = 3.0
)

// missLoss is a member's loss on one pass: its miss in typical misses,
// capped (an absolute loss, not a squared one: the weights move with a
// member's steady advantage, not with its worst pass).
func missLoss(miss, ref float64) float64 { return math.Min(math.Abs(miss)/ref, MissLossCap) }

// expWeights turns discounted losses into weights, from the members' prior.
func expWeights(loss [nMembers]float64) [nMembers]float64 {
	least := math.Inf(1)
	for _, l := range loss {
		least = math.Min(least, l)
	}
	var w [nMembers]float64
	var sum float64
	for m := range nMembers {
		w[m] = memberPrior[m] * math.Exp(-BlendLearningRate*(loss[m]-least))
		sum += w[m]
	}
	for m := range w {
		w[m] /= sum
	}
	return w
}

// missScale is the typical held-out miss of the members, s (their median
// absolute miss, at least bracket.MinSD).
func missScale(hist []scored) float64 {
	var v []float64
	for _, s := range hist {
		for _, e := range s.est {
			if e.OK {
				v = append(v, math.Abs(s.actual-e.ET))
			}
		}
	}
	if len(v) == 0 {
		return bracket.MinSD
	}
	return math.Max(stats.Median(v), bracket.MinSD)
}

// mix is the weighted mean of the awake members and the mixture's spread.
func mix(est [nMembers]estimate, w [nMembers]float64) (float64, float64) {
	var sum, mean float64
	for m, e := range est {
		if e.OK {
			sum += w[m]
			mean += w[m] * e.ET
		}
	}
	if sum == 0 {
		return math.NaN(), math.NaN()
	}
	mean /= sum
	var v float64
	for m, e := range est {
		if e.OK {
			v += w[m] / sum * (sq(e.SD) + sq(e.ET-mean))
		}
	}
	return mean, math.Sqrt(v)
}

// memberMAE is each member's mean absolute miss on the scored passes.
func memberMAE(hist []scored) [nMembers]float64 {
	var out [nMembers]float64
	for m := range nMembers {
		var sum float64
		var n int
		for _, s := range hist {
			if s.est[m].OK {
				sum += math.Abs(s.actual - s.est[m].ET)
				n++
			}
		}
		out[m] = math.NaN()
		if n > 0 {
			out[m] = sum / float64(n)
		}
	}
	return out
}

func shares(now [nMembers]estimate, w [nMembers]float64, mae [nMembers]float64) []MemberShare {
	var sum float64
	for m, e := range now {
		if e.OK {
			sum += w[m]
		}
	}
	out := make([]MemberShare, nMembers)
	for m := range nMembers {
		out[m] = MemberShare{Name: member(m).Name(), ET: now[m].ET, MAE: mae[m]}
		if now[m].OK && sum > 0 {
			out[m].Share = w[m] / sum
		}
	}
	return out
}
