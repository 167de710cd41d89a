package engine

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"maps"
	"math"
	"runtime"
	"slices"
	"sort"
	"strings"
	"sync"
	"time"

	"github.com/shopspring/decimal"

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
	similarMember               // the passes on a surface nearest today's temperature, carried by the air
	latestMember                // the latest clean pass carried by the air alone (the paper rule)
	nMembers
)

// Name is the member in words, as the card says what it leaned on.
func (m member) Name() string {
	return [...]string{"the pass model", "the latest passes carried by the air", "today's passes", "passes on a like surface", "the last pass carried by the air"}[m]
}

// Blend settings.
const (
	// ScoredPasses is how many of the latest clean passes each member is
	// scored on (each predicted from the passes before it).
	ScoredPasses = 20
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

// ChangePriorShare is the spread, as a share of the ET, of what a change
// of the car no pass has shown yet is worth: a jet, a tune or a few psi of
// boost is worth a few percent of power, a third of that in ET; a gear or a
// converter about as much (common practice, from memory).
const ChangePriorShare = 0.01

// memberPrior is each member's weight before any pass is scored.
// The last pass by air is the paper rule itself: with it in the blend, the
// exponentially weighted forecaster's bound keeps the blend near the paper
// rule on a car where the rule does best (on the tuning draws it cut the
// car-days lost to the rule from 28 to 17 of 200; a prior from 0.17 to 0.26
// of the whole, or one shrinking with the logbook's length, scored alike).
// A sixth member, the latest passes carried by the calibrated model, was
// dropped: every member weighs in through the same misses, and without it
// the tuning draws lost 14 car-days to the rule instead of 17.
var memberPrior = [nMembers]float64{0.43, 0.14, 0.095, 0.095, 0.24}

// MemberShare is a member's share of the blended finish ET.
type MemberShare struct {
	Name  string
	Share float64 // 0..1
	ET    float64 // its own finish ET for the next pass, s (NaN: it has none)
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
// passes 30 %": whole percents that add up to 100 (largest remainders), a
// member that rounds to none left out.
func (b Blend) Text() string {
	var parts []string
	for i, pct := range b.Percents() {
		if pct > 0 {
			parts = append(parts, fmt.Sprintf("%s %d %%", b.Members[i].Name, pct))
		}
	}
	return strings.Join(parts, ", ")
}

// Percents are the members' shares in whole percents adding up to 100 (the
// largest-remainder method: each share rounded down, the points left over
// going to the largest remainders), so the card's shares never sum to 97.
func (b Blend) Percents() []int {
	out := make([]int, len(b.Members))
	rem := make([]int, 0, len(b.Members))
	total := 0
	for i, m := range b.Members {
		out[i] = int(math.Floor(100 * m.Share))
		total += out[i]
		rem = append(rem, i)
	}
	if total == 0 {
		return out // no shares (nothing blended)
	}
	frac := func(i int) float64 { return 100*b.Members[i].Share - float64(out[i]) }
	slices.SortStableFunc(rem, func(a, c int) int { return cmpFloat(frac(c), frac(a)) })
	for k := 0; total < 100 && k < len(rem); k++ {
		out[rem[k]]++
		total++
	}
	return out
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
	entries map[string]heldOutEntry
	used    map[string]bool // asked for or added since it was made or read
	changed bool
	cores   int           // calibrations at once when scoring; 0: GOMAXPROCS
	parent  *HeldOutCache // looked in on a miss and given every put (Behind); nil: none
}

// OnCores limits the calibrations a forecast with this cache runs at once
// (a server leaves cores to the requests that write). It returns c.
func (c *HeldOutCache) OnCores(n int) *HeldOutCache {
	c.cores = n
	return c
}

// Behind puts c in front of parent: a key c lacks is looked up in parent
// (and kept in c, so c's file has it), and what c is given, parent is given
// too. The keys are digests of everything a prediction is made from, so a
// process-wide parent shared by every folder's cache can never answer with
// another logbook's prediction. It returns c.
func (c *HeldOutCache) Behind(parent *HeldOutCache) *HeldOutCache {
	c.parent = parent
	return c
}

// MaxHeldOutEntries bounds a cache kept in memory (the pit page's): past it,
// it starts afresh.
const MaxHeldOutEntries = 100000

// NewHeldOutCache is an empty cache.
func NewHeldOutCache() *HeldOutCache {
	return &HeldOutCache{entries: map[string]heldOutEntry{}, used: map[string]bool{}}
}

// heldOutEntry is what one held-out calibration gives: the pass model's
// prediction.
type heldOutEntry struct{ model estimate }

func (c *HeldOutCache) get(key string) (heldOutEntry, bool) {
	if c == nil {
		return heldOutEntry{}, false
	}
	c.mu.Lock()
	e, ok := c.entries[key]
	if ok {
		c.used[key] = true
	}
	c.mu.Unlock()
	if ok || c.parent == nil {
		return e, ok
	}
	// one cache locked at a time: the parent is shared by many
	if e, ok = c.parent.get(key); ok {
		c.keep(key, e)
	}
	return e, ok
}

func (c *HeldOutCache) put(key string, e heldOutEntry) {
	if c == nil {
		return
	}
	c.keep(key, e)
	if c.parent != nil {
		c.parent.put(key, e)
	}
}

// keep adds an entry to c alone, bounded by MaxHeldOutEntries.
func (c *HeldOutCache) keep(key string, e heldOutEntry) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if len(c.entries) >= MaxHeldOutEntries {
		c.entries, c.used = map[string]heldOutEntry{}, map[string]bool{}
	}
	c.entries[key], c.used[key], c.changed = e, true, true
}

// heldOutFile is the cache as written: a version and the entries.
type heldOutFile struct {
	Version int                   `json:"version"`
	Entries map[string][3]float64 `json:"entries"` // the model's ET, SD, 1 if it could predict
}

// heldOutVersion changes whenever the model changes what it predicts: a
// cache of another version is not read.
const heldOutVersion = 8

// ReadHeldOutCache reads a cache WriteTo wrote. A cache of another version,
// or one that cannot be read, is an empty cache: it is only ever a saving.
func ReadHeldOutCache(r io.Reader) *HeldOutCache {
	c := NewHeldOutCache()
	var f heldOutFile
	if err := json.NewDecoder(io.LimitReader(r, 64<<20)).Decode(&f); err != nil || f.Version != heldOutVersion {
		return c
	}
	for k, v := range f.Entries {
		c.entries[k] = heldOutEntry{estimate{ET: v[0], SD: v[1], OK: v[2] == 1}}
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
	flag := func(ok bool) float64 {
		if ok {
			return 1
		}
		return 0
	}
	for k := range c.used {
		e := c.entries[k]
		f.Entries[k] = [3]float64{e.model.ET, e.model.SD, flag(e.model.OK)}
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
	cal.Passes = MarkSetupChanges(cal.Passes, cal.Car.Setup) // a changed choice item is a change of the car
	fit, err := Calibrate(cal)
	if err != nil {
		return Prediction{}, fit, err
	}
	pr := Predict(fit, next)
	if pr.PhysicsOnly || pr.Raw || len(pr.Timers) == 0 || cal.Ablation.NoBlend {
		return pr, fit, nil
	}
	fin := pr.Finish()
	now := [nMembers]estimate{physicsMember: {ET: fin.ET, SD: fin.SD, OK: true}}
	now[airMember], now[todayMember], now[similarMember], now[latestMember] = carriedMembers(cal, cal.Passes, next, cal.Track.Elevation())
	var blendET, blendSD float64
	if len(fit.Samples) < ColdStartPasses {
		pr.Blend, blendET, blendSD = coldStart(now, fin)
	} else {
		pr.Blend, blendET, blendSD = scoredBlend(cal, fit, cache, now, &pr)
	}
	blendSD = carryChange(&pr, next.Change, blendET, blendSD)
	moveTimers(&pr, fin, blendET, blendSD)
	blendNotes(&pr, len(fit.Samples), cal.Car.DistanceFt)
	return pr, fit, nil
}

// coldStart is the blend of a car with too few passes to fit anything:
// the passes carried by the air, with the model's spread (which carries the
// day-to-day prior); the model alone when none can be carried.
func coldStart(now [nMembers]estimate, fin Timer) (b Blend, et, sd float64) {
	b = Blend{Scale: 1, ColdStart: true}
	w := [nMembers]float64{airMember: 1}
	et, _ = mix(now, w)
	sd = fin.SD
	if math.IsNaN(et) {
		et, w = fin.ET, [nMembers]float64{physicsMember: 1}
	}
	var none [nMembers]float64
	for m := range none {
		none[m] = math.NaN()
	}
	b.Members = shares(now, w, none)
	return b, et, sd
}

// scoredBlend is the blend of the members weighted by how each did on the
// latest scored passes, its spread scaled by their misses (conformal), the
// dial's spread by its own tail (pr.DialSD); the ablations switch parts off.
func scoredBlend(cal CalibrateInput, fit Fit, cache *HeldOutCache, now [nMembers]estimate, pr *Prediction) (b Blend, et, sd float64) {
	hist := scoreMembers(cal, fit, cache)
	prior := memberPrior
	for m := range prior {
		if cal.Ablation.NoMember == member(m).Name() {
			prior[m] = 0
		}
	}
	calib := online(hist, prior)
	if cal.Ablation.NoConformal {
		calib.Scale, calib.DialScale = 1, 1
	}
	if cal.Ablation.NoDialScale {
		calib.DialScale = calib.Scale
	}
	w := calib.weights
	et, sd = mix(now, w)
	pr.DialSD = sd * calib.DialScale
	b = Blend{Scale: calib.Scale, Scored: len(hist), Members: shares(now, w, memberMAE(hist))}
	return b, et, sd * b.Scale
}

// carryChange widens the spread for a change to the car no pass has shown
// yet (change, in the crew's words; "" none): its size is unknown.
func carryChange(pr *Prediction, change string, et, sd float64) float64 {
	if change == "" {
		return sd
	}
	extra := ChangePriorShare * et
	if pr.DialSD > 0 {
		pr.DialSD = math.Hypot(pr.DialSD, extra)
	}
	pr.Notes = append(pr.Notes, fmt.Sprintf("the car was changed since its last pass (%q): the interval carries a change of unknown size (±%.3f s) until a pass shows it",
		change, extra))
	return math.Hypot(sd, extra)
}

// moveTimers moves every timer by the blend's finish shift in proportion to
// its time and scales every spread by the blend's over the model's (a trap
// speed's never narrower than the model's).
func moveTimers(pr *Prediction, fin Timer, et, sd float64) {
	shift, ratio := et-fin.ET, sd/fin.SD
	for i := range pr.Timers {
		t := &pr.Timers[i]
		scale := t.ET / fin.ET
		t.ET += shift * scale
		t.SD *= ratio
		t.Low, t.High = interval(t.ET, t.SD)
	}
	for i := range pr.Traps {
		t := &pr.Traps[i]
		t.SD *= math.Max(ratio, 1)
		t.Low, t.High = interval(t.MPH, t.SD)
	}
}

// blendNotes says what the blend leaned on; a cold start drops the model's
// account of its calibration, which would contradict it.
func blendNotes(pr *Prediction, samples int, distFt float64) {
	b := pr.Blend
	if !b.ColdStart {
		pr.BlendNote = fmt.Sprintf("leaned on %s (by the last %s); interval ×%.2f from their misses",
			b.Text(), text.Plural(b.Scored, "pass"), b.Scale)
		pr.Notes = append(pr.Notes, pr.BlendNote)
		return
	}
	if pr.CalibrationNote != "" {
		pr.Notes = slices.DeleteFunc(pr.Notes, func(n string) bool { return n == pr.CalibrationNote })
		pr.CalibrationNote = ""
	}
	pr.ColdStartNote = fmt.Sprintf("only %s at %.0f ft: the prediction carries them to this air by the SAE J1349 factor alone; nothing is fitted yet",
		text.Plural(samples, "clean pass"), distFt)
	pr.Notes = append(pr.Notes, pr.ColdStartNote)
}

// carriedPass is one clean pass carried to the next pass's air by the SAE
// J1349 factor alone.
type carriedPass struct {
	et     float64   // its finish ET carried to the next pass's air, s
	trackF float64   // its surface temperature, °F (the air's + 10 where not read)
	time   time.Time // when it ran
}

// Carried-pass members' settings.
const (
	// CarriedLatest is how many of the latest clean passes the air member
	// carries (their median is taken), as the cross-check does.
	CarriedLatest = CrossCheckPasses
	// SimilarTrackF and SimilarPasses: the similar-track member carries the
	// SimilarPasses passes whose surface temperature lies nearest the next
	// pass's, within SimilarTrackF, from the latest SimilarWindow.
	SimilarTrackF = 8.0
	SimilarPasses = 3
	SimilarWindow = 60
	// CarriedGross: a carried pass further than this from the median of
	// the latest CarriedRef carried passes (or 4 robust deviations, if
	// more) is taken for a run the notes did not mark (a lift, a pedal).
	CarriedGross = 0.20
	CarriedRef   = 7
)

// carryAll carries the clean passes before next (since the latest change of
// the car) to next's air, most recent first, leaving out gross outliers.
func carryAll(cal CalibrateInput, passes []logbook.Pass, next PredictInput, elev weather.Length) []carriedPass {
	if !cal.Ablation.NoChangeCarry {
		passes = logbook.SinceChange(passes, cal.Changes)
	}
	now := next.Air.Derive(elev)
	if !(now.CFJ1349 > 0) {
		return nil
	}
	var out []carriedPass
	for i := len(passes) - 1; i >= 0 && len(out) < SimilarWindow; i-- {
		p := passes[i]
		et, ok := p.ETAt(cal.Car.DistanceFt)
		if !ok || !p.HasAir || p.Time.After(cal.Now) || cal.Aborts.Aborted(p.Notes) {
			continue
		}
		then := p.Air.Derive(trackOf(cal, p.Track).Elevation())
		if !(then.CFJ1349 > 0) {
			continue
		}
		out = append(out, carriedPass{et: et * math.Cbrt(now.CFJ1349/then.CFJ1349), trackF: surfaceF(p.Air), time: p.Time})
	}
	if len(out) < 3 {
		return out
	}
	ref := make([]float64, 0, CarriedRef)
	for _, c := range out[:min(CarriedRef, len(out))] {
		ref = append(ref, c.et)
	}
	med := stats.Median(ref)
	dev := make([]float64, len(ref))
	for i, v := range ref {
		dev[i] = math.Abs(v - med)
	}
	limit := math.Max(CarriedGross, 4*1.4826*stats.Median(dev))
	kept := out[:0]
	for _, c := range out {
		if math.Abs(c.et-med) <= limit {
			kept = append(kept, c)
		}
	}
	return kept
}

// surfaceF is a reading's surface temperature, °F: the air's + 10 where
// the track was not read (as NewEnv takes it).
func surfaceF(r weather.Reading) float64 {
	if r.HasTrack {
		return r.TrackTemp.Fahrenheit()
	}
	return r.Temp.Fahrenheit() + 10
}

// carriedMembers are the members that carry passes by the air alone: the
// latest passes, today's passes, the passes run on a surface nearest
// today's in temperature, and the last pass alone.
func carriedMembers(cal CalibrateInput, passes []logbook.Pass, next PredictInput, elev weather.Length) (latest, today, similar, last estimate) {
	all := carryAll(cal, passes, next, elev)
	med := func(cs []carriedPass) estimate {
		if len(cs) == 0 {
			return estimate{}
		}
		v := make([]float64, len(cs))
		for i, c := range cs {
			v[i] = c.et
		}
		return estimate{ET: stats.Median(v), SD: bracket.MinSD, OK: true}
	}
	latest = med(all[:min(CarriedLatest, len(all))])
	last = med(all[:min(1, len(all))]) // the paper rule: the latest clean pass alone
	var same []carriedPass
	for _, c := range all {
		if cal.DayStart.Same(c.time, next.Time) && len(same) < CarriedLatest {
			same = append(same, c)
		}
	}
	today = med(same)
	t := surfaceF(next.Air)
	near := slices.Clone(all)
	near = slices.DeleteFunc(near, func(c carriedPass) bool { return math.Abs(c.trackF-t) > SimilarTrackF })
	slices.SortStableFunc(near, func(a, b carriedPass) int { return cmpFloat(math.Abs(a.trackF-t), math.Abs(b.trackF-t)) })
	if len(near) >= 2 {
		similar = med(near[:min(SimilarPasses, len(near))])
	}
	return latest, today, similar, last
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
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
	e, ok := cache.get(key)
	if !ok {
		if fit, err := Calibrate(c); err == nil && len(fit.Samples) > 0 {
			pr := Predict(fit, next)
			f := pr.Finish()
			e = heldOutEntry{estimate{ET: f.ET, SD: f.SD, OK: true}}
		}
		cache.put(key, e)
	}
	s.est[physicsMember] = e.model
	elev := c.Track.Elevation()
	s.est[airMember], s.est[todayMember], s.est[similarMember], s.est[latestMember] = carriedMembers(c, t.before, next, elev)
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
	// the blend's own switches leave the model's predictions as they are
	ab := cal.Ablation
	ab.NoBlend, ab.NoMember, ab.NoConformal, ab.NoDialScale = false, "", false, false
	fmt.Fprintf(h, "v1|%+v|%+v|%v|%v|%v|%+v", cal.Car, cal.Track, cal.DayStart, cal.Aborts, cal.Changes, ab)
	for _, n := range names {
		fmt.Fprintf(h, "|%+v", cal.Tracks[n])
	}
	return hex.EncodeToString(h.Sum(nil))
}

// heldOutKey digests one held-out prediction's inputs. The next pass's
// conditions and every pass before it are written field by field in binary,
// each string and decimal with its length: %+v printed a reading's
// temperatures, pressure and wind rounded as the card shows them (two
// readings 0.01 °F apart had one key), and formatting 5,000 passes for each
// of the ScoredPasses targets cost more than their calibrations.
// TestHeldOutKeySeesEveryField finds the fields by reflection.
func heldOutKey(base string, c CalibrateInput, next PredictInput) string {
	h := sha256.New()
	fmt.Fprintf(h, "v2|%s|%+v|", base, c.Track)
	var k keyWriter
	k.reading(next.Air)
	k.float(next.Prep)
	k.float(next.WeightLb)
	k.clock(next.Time)
	k.str(next.Change)
	k.flag(next.Quick)
	for i := range c.Passes {
		k.pass(&c.Passes[i])
		h.Write(k.b)
		k.b = k.b[:0]
	}
	h.Write(k.b)
	return hex.EncodeToString(h.Sum(nil))
}

// keyWriter writes the values heldOutKey digests into b, each in a form
// that cannot run into the next (lengths before strings, fixed widths for
// floats).
type keyWriter struct {
	b    []byte
	keys []string // the sorted keys of the last pass's Extra
}

func (k *keyWriter) num(v int64) { k.b = binary.AppendVarint(k.b, v) }
func (k *keyWriter) float(v float64) {
	k.b = binary.LittleEndian.AppendUint64(k.b, math.Float64bits(v))
}
func (k *keyWriter) str(v string) { k.num(int64(len(v))); k.b = append(k.b, v...) }

func (k *keyWriter) flag(v bool) {
	if v {
		k.b = append(k.b, 1)
	} else {
		k.b = append(k.b, 0)
	}
}

// clock writes an instant with its zone: the same instant in another zone
// is another day.
func (k *keyWriter) clock(t time.Time) {
	zone, offset := t.Zone()
	k.num(t.Unix())
	k.num(int64(t.Nanosecond()))
	k.str(zone)
	k.num(int64(offset))
}

// dec writes a slip's decimal exactly, as typed (11.40 is not 11.4).
func (k *keyWriter) dec(d decimal.NullDecimal) {
	k.flag(d.Valid)
	k.num(int64(d.Decimal.Exponent()))
	if d.Decimal.NumDigits() <= 18 { // the coefficient fits an int64
		k.num(d.Decimal.CoefficientInt64())
		return
	}
	k.str(d.Decimal.Coefficient().String())
}

// reading writes every field of a weather reading.
func (k *keyWriter) reading(r weather.Reading) {
	k.clock(r.Time)
	k.float(float64(r.Temp))
	k.float(float64(r.Baro))
	k.num(int64(r.BaroKind))
	k.float(r.RH)
	k.flag(r.DewPointSet)
	k.float(float64(r.DewPoint))
	k.float(float64(r.Wind))
	k.float(r.WindFrom)
	k.flag(r.WindDirUnknown)
	k.flag(r.WindUnknown)
	k.float(float64(r.TrackTemp))
	k.flag(r.HasTrack)
	k.str(r.Note)
}

// pass writes every field of a logged pass, the crew's columns by sorted
// name (sorted once for a run of passes with the same ones).
func (k *keyWriter) pass(p *logbook.Pass) {
	k.num(int64(p.Line))
	k.clock(p.Time)
	k.str(p.Track)
	k.num(int64(p.Session.Kind))
	k.num(int64(p.Session.N))
	k.str(string(p.Lane))
	k.dec(p.Dial)
	k.dec(p.RT)
	for _, et := range p.ET {
		k.dec(et)
	}
	k.dec(p.MPH660)
	k.dec(p.MPH1320)
	k.reading(p.Air)
	k.flag(p.HasAir)
	k.float(p.WeightLb)
	k.str(p.Notes)
	k.str(p.Change)
	k.num(int64(len(p.Extra)))
	if !sameKeys(k.keys, p.Extra) {
		k.keys = slices.AppendSeq(k.keys[:0], maps.Keys(p.Extra))
		slices.Sort(k.keys)
	}
	for _, key := range k.keys {
		k.str(key)
		k.str(p.Extra[key])
	}
}

// calibration is what the scored passes say of the blend: the members'
// weights for the next pass and the scales of its spread.
type calibration struct {
	weights [nMembers]float64
	// Scale makes the 95 % interval cover 95 % of the scored passes;
	// DialScale makes the quick tail right where a dial is posted (the
	// 10 % quantile), which heavy tails can put elsewhere than a normal
	// with the interval's spread says.
	Scale, DialScale float64
}

// online replays the scored passes in order as the blend would have seen
// them: the members' weights for the next pass (the discounted
// exponentially weighted average of their capped absolute misses, in units
// of the typical miss, from prior) and the conformal scales of the blend's
// spread: each scored pass's miss over the spread the blend gave it then,
// recent passes weighted more, ConformalPrior passes of a normal's scores
// steadying a short history, and the level raised by the finite-sample
// correction of split conformal prediction, (1 − α)(1 + 1/n) with n the
// scores' effective number.
func online(hist []scored, prior [nMembers]float64) calibration {
	var zs []weighted
	var loss [nMembers]float64
	ref := missScale(hist)
	for k, s := range hist {
		w := expWeights(loss, prior)
		et, sd := mix(s.est, w)
		if math.IsNaN(et) {
			continue
		}
		if sd > 0 {
			zs = append(zs, weighted{(s.actual - et) / sd, math.Pow(ConformalForget, float64(len(hist)-1-k))})
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
	const priorPoints = 16
	for i := range priorPoints {
		zs = append(zs, weighted{stats.NormalQuantile((float64(i) + 0.5) / priorPoints), ConformalPrior / priorPoints})
	}
	var sum, sum2 float64
	abs := make([]weighted, len(zs))
	for i, z := range zs {
		abs[i] = weighted{math.Abs(z.v), z.w}
		sum += z.w
		sum2 += z.w * z.w
	}
	level := math.Min(1, 0.95*(1+sum2/(sum*sum))) // 1/n_eff = Σw²/(Σw)²
	c := calibration{weights: expWeights(loss, prior)}
	c.Scale = clampScale(weightedQuantile(abs, level) / IntervalZ)
	c.DialScale = clampScale(weightedQuantile(zs, DialQuantile) / stats.NormalQuantile(DialQuantile))
	return c
}

// DialQuantile is where the dial's quick tail is calibrated: the breakout
// risk a crew most often accepts (common practice, no source: 5–10 %).
const DialQuantile = 0.10

func clampScale(v float64) float64 { return math.Max(0.5, math.Min(4, v)) }

// weighted is a value with its weight.
type weighted struct{ v, w float64 }

// weightedQuantile is the smallest value whose weight at or below it
// reaches q of the whole.
func weightedQuantile(vs []weighted, q float64) float64 {
	vs = slices.Clone(vs)
	slices.SortFunc(vs, func(a, b weighted) int { return cmpFloat(a.v, b.v) })
	var total, cum float64
	for _, e := range vs {
		total += e.w
	}
	for _, e := range vs {
		cum += e.w
		if cum >= q*total-1e-12 {
			return e.v
		}
	}
	return vs[len(vs)-1].v
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
func expWeights(loss, prior [nMembers]float64) [nMembers]float64 {
	least := math.Inf(1)
	for _, l := range loss {
		least = math.Min(least, l)
	}
	var w [nMembers]float64
	var sum float64
	for m := range nMembers {
		w[m] = prior[m] * math.Exp(-BlendLearningRate*(loss[m]-least))
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
		if !now[m].OK {
			out[m].ET = math.NaN() // no estimate of its own for the next pass
		}
		if now[m].OK && sum > 0 {
			out[m].Share = w[m] / sum
		}
	}
	return out
}

// sameKeys reports whether keys (distinct) are exactly the keys of m.
func sameKeys(keys []string, m map[string]string) bool {
	if len(keys) != len(m) {
		return false
	}
	for _, k := range keys {
		if _, ok := m[k]; !ok {
			return false
		}
	}
	return true
}
