// Package prep is the per-round prep card: it gathers what a crew needs for
// one round (the air now and at the call, the prediction, the dial options,
// what the crew's rules say, the checklist, today's record and the
// cautions) and renders it for the terminal, Markdown, HTML and JSON.
//
// It reads no files or flags and models nothing itself: the caller hands it
// the event's data, and engine, bracket and weather compute the figures it
// lays out.
package prep

import (
	"errors"
	"fmt"
	"io/fs"
	"maps"
	"math"
	"sort"
	"strings"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/bracket"
	"pitcard/engine"
	"pitcard/internal/text"
	"pitcard/logbook"
	"pitcard/scripts"
	"pitcard/weather"
)

// Cautions are printed on every card, whatever else fails.
var Cautions = []string{
	"Drag racing can kill. These predictions are estimates from data and physics, not promises.",
	"Safety equipment (cage, belts, parachute, fire system) and the ET and MPH limits your chassis is certified for are set by the sanctioning body's current rulebook and the track's tech inspection, not by pitcard.",
	"pitcard's safety checks only compare the prediction with the limits you entered for your own car: verify them with the current rulebook and at tech.",
}

// Settings are the event's settings the card uses.
type Settings struct {
	Units         weather.Units
	DialStep      decimal.Decimal
	BreakoutRisk  float64
	MaxRuleAdjust decimal.Decimal // a total rule adjustment beyond ± this is flagged
	RuleLimits    scripts.Limits
	// MaxReadingAge: the latest reading older than this at Now is flagged;
	// 0 takes DefaultMaxReadingAge.
	MaxReadingAge time.Duration
	// CrossCheckMax, s: the model's ET further than this from the plain
	// cross-check (engine.AirCarried) is flagged in the dial box; 0 takes
	// engine.DefaultCrossCheckMax (the setting cross_check_max_s).
	CrossCheckMax float64
	// DayStart is when a race day begins (setting day_starts): today's
	// passes are the call's race day's, past midnight included.
	DayStart weather.DayStart
	// Aborts are the words in a pass's notes that leave it out of the fit
	// and the card's figures (nil: logbook.DefaultAbortWords).
	Aborts logbook.AbortWords
	// Changes are the words in a pass's notes that say the car was changed
	// before it (change_words); nil: the defaults.
	Changes logbook.ChangeWords
}

// DefaultMaxReadingAge is how old the latest reading may be before the card
// flags it (the setting reading_max_age_min).
const DefaultMaxReadingAge = 45 * time.Minute

// Input is everything the card is made from.
type Input struct {
	Car      engine.Car
	Track    engine.Track
	Tracks   map[string]engine.Track
	Passes   []logbook.Pass
	Settings Settings

	Session      logbook.Session
	Lane         logbook.Lane // "" when not known
	OpponentDial decimal.NullDecimal
	// Opponent is what is known of the other lane (its dial, its margin over
	// it, its reaction times) and UsRT our driver's reaction times: with
	// both, the dial options carry the chance to win. Nil: no opponent dial.
	Opponent *bracket.Opponent
	UsRT     bracket.RTModel
	// PostBestForWin posts the dial that wins most instead of the breakout
	// rule's (the setting post_dial: best-for-win).
	PostBestForWin bool
	Call           time.Time // when the round is called
	Now            time.Time // the crew's clock

	Air           weather.Reading // the air of the pass (forecast for the call, or a reading)
	AirSource     string
	LatestReading *weather.Reading // the latest reading, when the air is a forecast
	Forecast      *weather.Forecast
	Elevation     weather.Length
	TrackPrep     float64
	WeightLb      float64
	// Change is the crew's words for a change made to the car since its
	// last pass (empty: none): the prediction widens for it.
	Change string
	// Setup is the planned setup given for the round (card --set), item
	// name to its cell; an item not given is the last pass's.
	Setup map[string]string

	Rules   []*scripts.Rule
	RulesFS fs.FS
	// Ticked are the checklist items the crew ticked for this round (by
	// label), with when.
	Ticked map[string]time.Time

	// HeldOut keeps the pass model's held-out predictions of the logbook's
	// recent passes, which weigh the prediction's members (engine.Forecast):
	// a front end that keeps it between cards (the pit page; the folder's
	// cache for the command line) spends one calibration per new pass. Nil:
	// computed afresh.
	HeldOut *engine.HeldOutCache

	// Problems found before gathering (a broken car.yaml, say): printed on
	// the card with whatever else can be computed.
	Problems []string
}

// RuleLine is one rule's dial adjustment.
type RuleLine struct {
	File   string
	Adjust decimal.Decimal
	Reason string
}

// RecordLine is one earlier pass of the day: what the model predicted for it
// from the passes before it, and what the car ran.
type RecordLine struct {
	Pass      logbook.Pass
	Predicted float64 // s; NaN when it could not be predicted
	Actual    float64
	Error     float64 // actual − predicted
}

// Card is one round's prep card, every figure computed.
type Card struct {
	Input         Input
	Title         string
	MinutesToGo   float64       // minutes from Now to Call (negative: already called)
	ReadingAge    time.Duration // from the latest reading to Now (0 when the air is the flags)
	StaleReading  string        // set when ReadingAge is past the setting, in words
	LatestAir     weather.Air
	LatestReading weather.Reading
	AirCall       weather.Air
	Prediction    engine.Prediction
	Fit           engine.Fit
	Plan          bracket.DialPlan
	PlanErr       error
	// Win: the chance to win against the opponent for each dial considered
	// (the plan's options and those around them), the one that wins most,
	// and what choosing it over the breakout rule's trades. Empty without an
	// opponent.
	Win        []bracket.WinOption
	BestForWin bracket.WinOption
	WinTrade   string
	// NoDial says why no dial is posted though there is a prediction (too
	// few passes of the car): the estimate is shown as a guide.
	NoDial string
	// FewPasses is set when the dial rests on few passes, in words.
	FewPasses string
	// Cross is the plain cross-check beside the model (HasCross when the
	// logbook has a pass to carry), and CrossFlag, in words, when the two
	// are further apart than the setting.
	Cross       engine.CrossCheck
	HasCross    bool
	CrossFlag   string
	Rules       []scripts.Result
	Adjustments []RuleLine
	TotalAdjust decimal.Decimal
	AdjustFlag  string // set when the total is beyond the setting
	FinalDial   decimal.Decimal
	HasFinal    bool
	Checks      []scripts.Check
	// Failed are the failed checks in words (pitcard's safety checks and the
	// rules' alike): the dial box shows them, and the front ends exit with
	// their own status. Empty when every check passed or warned.
	Failed       []string
	Notes        []string
	Record       []RecordLine
	RecordMAE    float64
	Problems     []string // what could not be computed, in words; the rest still prints
	Cautions     []string
	RuleContext  map[string]any
	GatheredTook time.Duration
}

// Gather computes the card. It never fails: what cannot be computed is said
// in Problems, and the rest of the card is still there.
func Gather(in Input) Card {
	start := time.Now()
	c := Card{Input: in, Cautions: Cautions, Problems: append([]string(nil), in.Problems...)}
	c.Title = roundTitle(in)
	c.MinutesToGo = in.Call.Sub(in.Now).Minutes()
	c.gatherAir()
	cal := calibrateInput(in)
	var fit engine.Fit
	carErr := in.Car.Validate("car.yaml")
	err := carErr
	if err == nil {
		fit, err = c.predict(cal)
	}
	c.planDial(cal, fit, err)
	if in.Opponent != nil && c.PlanErr == nil && len(c.Plan.Options) > 0 {
		c.Win, c.BestForWin, c.WinTrade = winChances(c, in)
	}
	c.runRules(carErr)
	if c.PlanErr == nil && err == nil {
		base := c.Plan.Recommended
		if in.PostBestForWin && len(c.Win) > 0 {
			base = c.BestForWin.Dial
		}
		c.FinalDial = bracket.RoundToStep(base.Add(c.TotalAdjust), in.Settings.DialStep)
		c.HasFinal = true
	}
	c.Failed = Failed(c.Checks)
	c.GatheredTook = time.Since(start)
	return c
}

// roundTitle is the card's title: the session and the lane, "Round 3,
// left lane".
func roundTitle(in Input) string {
	title := strings.ToUpper(in.Session.Long()[:1]) + in.Session.Long()[1:]
	if in.Lane != "" {
		return title + ", " + string(in.Lane) + " lane"
	}
	return title + " (lane not set)"
}

// gatherAir derives the air at the call and now, and says when the latest
// reading is too old to trust (a problem).
func (c *Card) gatherAir() {
	in := c.Input
	c.AirCall = in.Air.Derive(in.Elevation)
	c.LatestReading = in.Air
	if in.LatestReading != nil {
		c.LatestReading = *in.LatestReading
	}
	c.LatestAir = c.LatestReading.Derive(in.Elevation)
	if in.LatestReading == nil {
		return
	}
	c.ReadingAge = in.Now.Sub(in.LatestReading.Time)
	limit := in.Settings.MaxReadingAge
	if limit <= 0 {
		limit = DefaultMaxReadingAge
	}
	if c.ReadingAge > limit {
		c.StaleReading = fmt.Sprintf("the latest weather reading is %s old (%s; the limit is %s, setting reading_max_age_min): the air has moved since; take a fresh reading",
			minutes(c.ReadingAge), in.LatestReading.Time.Format("15:04"), minutes(limit))
		if ahead := in.Call.Sub(in.LatestReading.Time); ahead > limit {
			c.StaleReading += fmt.Sprintf(", the air at the call is carried %s past it", minutes(ahead))
		}
		c.Problems = append(c.Problems, c.StaleReading)
	}
}

// calibrateInput is what the model is calibrated from: the car, the
// tracks and the logbook up to the latest of now, the call and the passes.
func calibrateInput(in Input) engine.CalibrateInput {
	return engine.CalibrateInput{Car: in.Car, Track: in.Track, Tracks: in.Tracks, Passes: in.Passes, Now: latest(in.Now, in.Call, in.Passes),
		DayStart: in.Settings.DayStart, Aborts: in.Settings.Aborts, Changes: in.Settings.Changes}
}

// predict forecasts the round, a changed setup choice counting as a change
// of the car, and applies the planned setup's effects. It sets
// c.Prediction and returns the fit it was made with.
func (c *Card) predict(cal engine.CalibrateInput) (engine.Fit, error) {
	in := c.Input
	planned, last := PlannedSetup(in)
	change := in.Change
	if cc := engine.ChoiceChanges(in.Car.Setup, planned, last); cc != "" { // a changed choice is a change of the car
		change = strings.TrimPrefix(change+"; "+cc, "; ")
	}
	var fit engine.Fit
	var err error
	c.Prediction, fit, err = engine.Forecast(cal, engine.PredictInput{Air: in.Air, Prep: in.TrackPrep, WeightLb: in.WeightLb, Time: in.Call, Change: change}, in.HeldOut)
	if err == nil {
		engine.ApplySetup(&c.Prediction, engine.PlannedSetup(engine.SetupEffects(fit), planned, last))
	}
	return fit, err
}

// planDial turns the prediction made with fit into the dial table, or
// says why there is none (err is why there is no prediction), and adds
// today's record and the cross-check. It applies no rule: runRules does.
func (c *Card) planDial(cal engine.CalibrateInput, fit engine.Fit, err error) {
	in := c.Input
	switch {
	case err != nil && len(in.Problems) > 0:
		c.Problems = append(c.Problems, "no prediction until that is fixed")
		return
	case err != nil:
		c.Problems = append(c.Problems, "no prediction: "+err.Error())
		return
	}
	c.Fit = fit
	if ok, why := c.Prediction.DialReady(); !ok {
		c.NoDial = why
		c.PlanErr = errors.New(why)
	} else {
		c.Plan, c.PlanErr = bracket.PlanDial(c.Prediction.Estimate(), in.Settings.DialStep, in.Settings.BreakoutRisk, 4)
		if c.PlanErr != nil {
			c.Problems = append(c.Problems, "no dial table: "+c.PlanErr.Error())
		}
		if n := c.Prediction.Passes; n < engine.FewPassesForDial {
			c.FewPasses = fmt.Sprintf("this dial rests on %d passes of the car at this distance: the breakout chances are measured on few runs", n)
		}
	}
	c.Record, c.RecordMAE = todaysRecord(fit, cal, in)
	c.Cross, c.HasCross, c.CrossFlag = crossCheck(c.Prediction, in)
}

// runRules runs the crew's rules on the card so far, with the car's own
// safety checks (carErr: car.yaml could not be read), and sums the rules'
// adjustments, flagging a total beyond the settings' allowance. It does
// not apply the total to the dial: Gather does.
func (c *Card) runRules(carErr error) {
	in := c.Input
	c.RuleContext = RuleContext(*c)
	c.Rules = scripts.Run(in.Rules, in.RulesFS, c.RuleContext, in.Settings.RuleLimits)
	safety := SafetyFor(in.Car, c.Prediction, in.Call, in.Settings.Units)
	safety.CarUnread = carErr != nil || len(in.Problems) > 0 && in.Car.DistanceFt == 0
	c.Checks = SafetyChecks(safety)
	for _, r := range c.Rules {
		if r.HasAdjust {
			c.Adjustments = append(c.Adjustments, RuleLine{File: r.File, Adjust: r.Adjust, Reason: r.Reason})
			c.TotalAdjust = c.TotalAdjust.Add(r.Adjust)
		}
		c.Checks = append(c.Checks, r.Checks...)
		c.Notes = append(c.Notes, r.Notes...)
	}
	if lim := in.Settings.MaxRuleAdjust; lim.IsPositive() && c.TotalAdjust.Abs().GreaterThan(lim) {
		c.AdjustFlag = fmt.Sprintf("the rules add up to %s s, beyond the ±%s s the settings allow without a second look (max_rule_adjust)",
			SignedDialText(c.TotalAdjust, in.Settings.DialStep), lim.String())
		c.Checks = append([]scripts.Check{{Label: "Rule adjustments", Status: scripts.Warn, Note: c.AdjustFlag, File: "pitcard"}}, c.Checks...)
	}
}

// crossCheck carries the latest clean passes to the call's air by the air
// alone and flags a model that strays from them: a fitted response reaching
// past the logbook (a track far hotter than any logged) must not move the
// dial half a second unnoticed.
func crossCheck(p engine.Prediction, in Input) (engine.CrossCheck, bool, string) {
	elevation := func(track string) weather.Length {
		if t, ok := in.Tracks[track]; ok {
			return t.Elevation()
		}
		return in.Elevation
	}
	// the car as it is: passes before a noted change ran another car
	cc, ok := engine.AirCarried(logbook.SinceChange(in.Passes, in.Settings.Changes), in.Car.DistanceFt, in.Air, in.Elevation, elevation)
	if !ok || len(p.Timers) == 0 {
		return cc, ok, ""
	}
	limit := crossLimit(in.Settings)
	model := p.Finish().ET
	if d := model - cc.ET; math.Abs(d) > limit {
		dir := "slower"
		if d < 0 {
			dir = "quicker"
		}
		return cc, true, fmt.Sprintf("the model's %.3f s is %.3f s %s than the cross-check's %.3f s (the latest %s carried by the air alone), past the %.2f s allowed (cross_check_max_s): the model may be reaching past what the logbook has seen; look again before dialing on it",
			model, math.Abs(d), dir, cc.ET, text.Plural(len(cc.Passes), "pass"), limit)
	}
	return cc, true, ""
}

// minutes prints a duration as a racer says it: "25 min", "6 h 39 min".
func minutes(d time.Duration) string {
	m := int(d.Round(time.Minute) / time.Minute)
	if m < 0 {
		m = -m
	}
	if m < 60 {
		return fmt.Sprintf("%d min", m)
	}
	if m%60 == 0 {
		return fmt.Sprintf("%d h", m/60)
	}
	return fmt.Sprintf("%d h %d min", m/60, m%60)
}

func latest(ts ...any) time.Time {
	var t time.Time
	for _, x := range ts {
		switch v := x.(type) {
		case time.Time:
			if v.After(t) {
				t = v
			}
		case []logbook.Pass:
			if len(v) > 0 && v[len(v)-1].Time.After(t) {
				t = v[len(v)-1].Time
			}
		}
	}
	return t
}

// todaysRecord backcasts each earlier pass of the call's race day at the track.
func todaysRecord(fit engine.Fit, cal engine.CalibrateInput, in Input) ([]RecordLine, float64) {
	var out []RecordLine
	var sum float64
	n := 0
	for _, p := range in.Passes {
		if !in.Settings.DayStart.Same(p.Time, in.Call) || !p.Time.Before(in.Call) {
			continue
		}
		et, ok := p.ETAt(in.Car.DistanceFt)
		if !ok {
			continue
		}
		line := RecordLine{Pass: p, Actual: et, Predicted: math.NaN(), Error: math.NaN()}
		if pr, ok := engine.Backcast(fit, p, cal); ok {
			line.Predicted, line.Error = pr.ET, et-pr.ET
			if !in.Settings.Aborts.Aborted(p.Notes) {
				sum += math.Abs(line.Error)
				n++
			}
		}
		out = append(out, line)
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].Pass.Time.Before(out[j].Pass.Time) })
	if n == 0 {
		return out, math.NaN()
	}
	return out, sum / float64(n)
}

// WinRows is how many dials either side of the breakout rule's the chance
// to win is searched over.
const WinRows = 10

// winChances are the chances to win of the dials around the plan's
// recommendation, the best of them, and in words what posting it over the
// breakout rule's dial trades when it breaks the crew's limit.
func winChances(c Card, in Input) ([]bracket.WinOption, bracket.WinOption, string) {
	step := in.Settings.DialStep
	var cands []decimal.Decimal
	for i := -WinRows; i <= WinRows; i++ {
		if d := c.Plan.Recommended.Add(step.Mul(decimal.NewFromInt(int64(i)))); d.IsPositive() {
			cands = append(cands, d)
		}
	}
	opts := bracket.WinChances(bracket.WinInput{Us: c.Plan.Estimate, UsRT: in.UsRT, Opp: *in.Opponent, Seed: 1}, cands)
	return opts, bracket.BestForWin(opts), WinTradeWords(c.Plan.Estimate, c.Plan.Risk, c.Plan.Recommended, step, opts)
}

// WinTradeWords says what posting the dial that wins most among opts
// trades against the breakout rule's dial rule, for an estimate est and
// the crew's risk: "the dial that wins most, 11.38, breaks out 14.2 % of
// the time, more than the 10 % you accept: over your rule's 11.40 it gains
// 3.1 points of winning for 4.0 points more breakout risk". "" when it
// keeps within the risk (or is the rule's own dial). The card and the dial
// command print these same words.
func WinTradeWords(est bracket.Estimate, risk float64, rule decimal.Decimal, step decimal.Decimal, opts []bracket.WinOption) string {
	best := bracket.BestForWin(opts)
	var atRule bracket.WinOption
	for _, o := range opts {
		if o.Dial.Equal(rule) {
			atRule = o
		}
	}
	bo := bracket.BreakoutChance(est, best.Dial)
	if bo <= risk || best.Dial.Equal(rule) {
		return ""
	}
	return fmt.Sprintf("the dial that wins most, %s, breaks out %.1f %% of the time, more than the %.0f %% you accept: over your rule's %s it gains %.1f points of winning for %.1f points more breakout risk",
		dialText(best.Dial, step), 100*bo, 100*risk, dialText(rule, step), 100*(best.Win-atRule.Win), 100*(bo-bracket.BreakoutChance(est, rule)))
}

// winOf is the chance to win of dial d, and whether it was computed.
func winOf(c Card, d decimal.Decimal) (float64, bool) {
	for _, o := range c.Win {
		if o.Dial.Equal(d) {
			return o.Win, true
		}
	}
	return 0, false
}

// PlannedSetup is the round's planned setup (the last pass's, each item
// given replacing its value) and the last pass's, item name to cell: what
// the card predicts with, and what the pit page's forms show.
func PlannedSetup(in Input) (planned, last map[string]string) {
	last = logbook.LastSetup(in.Passes, in.Car.Setup)
	planned = maps.Clone(last)
	maps.Copy(planned, in.Setup)
	return planned, last
}
