package main

import (
	"errors"
	"fmt"
	"strings"
	"time"

	"github.com/shopspring/decimal"
	"github.com/spf13/cobra"

	"pitcard/engine"
	"pitcard/event"
	"pitcard/prep"
	"pitcard/scripts"
	"pitcard/weather"
)

// roundFlags choose the round: which session, which lane, the opponent's
// dial, the call time (--at, shared with the air flags), the prep.
type roundFlags struct {
	cond         conditionFlags
	Round        string
	Lane         string
	OpponentDial string
	Prep         string
	Weight       string
	// Unsaved is a reading that could not be written (a full disk): the
	// round's card still uses it.
	Unsaved *weather.Reading
	opp     opponentFlags
}

func (r *roundFlags) bind(cmd *cobra.Command) {
	r.cond.readingFlags.bind(cmd)
	fl := cmd.Flags()
	fl.StringVar(&r.cond.At, "at", "", "call time of the round, HH:MM (default: schedule.yaml's, or now)")
	fl.StringVar(&r.Round, "round", "", "round number (3), or session: T1, T2 ... time trials, E1 ... rounds (default: the schedule's next)")
	fl.StringVar(&r.Lane, "lane", "", "left or right")
	fl.StringVar(&r.OpponentDial, "opponent-dial", "", "the opponent's dial-in, s, if known")
	fl.StringVar(&r.Prep, "prep", "", "track prep today: none, light, full or 0..1 (default: track.yaml's)")
	fl.StringVar(&r.Weight, "weight", "", "car and driver as it will run, lb (default: car.yaml's)")
	bindSettingFlags(cmd)
	r.opp.bind(cmd)
}

// roundInput gathers everything a round's card is made from. Problems that
// leave part of the card blank (no weather log, a forecast too far ahead)
// come back as warnings, not errors: the card still prints what it can.
func roundInput(e *eventFolder, r roundFlags, now time.Time) (prep.Input, []string, error) {
	var in prep.Input
	var warnings []string
	// A broken car.yaml or logbook.csv does not stop the card: it prints
	// what it can (the air, the rules, the checklist, the cautions) and
	// says what is wrong; the command then exits 2.
	var broken []error
	car, err := e.Car()
	if err != nil {
		if !isBadInput(err) {
			return in, nil, err
		}
		broken = append(broken, err)
	}
	trk, err := e.Track()
	if err != nil {
		return in, nil, err
	}
	passes, err := e.RecentLogbook()
	switch {
	case event.OnlyLeftOut(err) && err != nil: // the good rows are used, the bad ones named
		broken = append(broken, err)
	case err != nil && !isBadInput(err):
		return in, nil, err
	case err != nil: // a header pitcard cannot read: no passes at all
		broken = append(broken, err)
		passes = nil
	}
	tracks, err := e.OtherTracks()
	if err != nil {
		return in, nil, err
	}
	sched, haveSched, err := e.Schedule()
	switch {
	case err != nil && r.Round != "" && isBadInput(err):
		// the round is given: a broken schedule costs only its call time
		broken = append(broken, err)
		sched, haveSched = prep.Schedule{}, false
	case err != nil:
		return in, nil, err
	}
	elev, err := r.cond.elevation(e.Settings.Units, trk.Elevation(), true)
	if err != nil {
		return in, nil, err
	}
	log, err := e.WeatherLog(elev)
	if err != nil {
		return in, nil, err
	}
	now, sched, warnings = e.ClockFor(sched, haveSched, log, now)
	if r.Unsaved != nil { // a reading the disk refused: the card still uses it
		log = append(log, *r.Unsaved)
		event.SortReadings(log)
	}

	// The session and its slot in the schedule.
	var slot prep.Slot
	haveSlot := false
	switch {
	case r.Round != "":
		ses, err := engine.ParseSession(r.Round)
		if err != nil {
			return in, nil, flagErr(err, "--round")
		}
		slot.Session = ses
		if s, ok := sched.Find(ses); ok {
			slot, haveSlot = s, true
		}
	case haveSched:
		if s, ok := sched.Next(passes); ok {
			slot, haveSlot = s, true
		} else {
			return in, nil, userErrf("every session of %s has a pass in the logbook: give --round for another", e.Name(event.ScheduleFile))
		}
	default:
		return in, nil, userErrf("which round? give --round (3, E3, T2 ...), or write %s with the day's call times", event.ScheduleFile)
	}

	// The call time: --at, the schedule's, or now.
	day := now
	switch {
	case haveSched:
		day = sched.Date
	case len(log) > 0:
		day = log[len(log)-1].Time
	}
	call := now
	switch {
	case r.cond.At != "":
		t, err := parseWhen(r.cond.At, day)
		if err != nil {
			return in, nil, flagErr(err, "--at")
		}
		call = t
	case haveSlot:
		call = slot.Call
	}

	// The lane.
	lane := slot.Lane
	if r.Lane != "" {
		if lane, err = engine.ParseLane(r.Lane); err != nil {
			return in, nil, flagErr(err, "--lane")
		}
	}
	var opp decimal.NullDecimal
	if r.OpponentDial != "" {
		d, err := engine.ParseSeconds("--opponent-dial", r.OpponentDial)
		if err != nil {
			return in, nil, err
		}
		if err := rangeErr("--opponent-dial", d, engine.DialRange); err != nil {
			return in, nil, err
		}
		opp = decimal.NewNullDecimal(d)
	}

	// The air at the call: the log's forecast (flags replace its fields), or the flags alone.
	var air weather.Reading
	var source string
	var airNow *weather.Reading
	var forecast *weather.Forecast
	// Only the call's day's readings forecast its air.
	var dayLog []weather.Reading
	for _, r := range log {
		if r.Time.Format("2006-01-02") == call.Format("2006-01-02") {
			dayLog = append(dayLog, r)
		}
	}
	if len(dayLog) == 0 && len(log) > 0 {
		warnings = append(warnings, fmt.Sprintf("no weather reading on %s: the air is the last reading, of %s; take a fresh one",
			call.Format("2006-01-02"), log[len(log)-1].Time.Format("2006-01-02 15:04")))
		dayLog = log[len(log)-1:]
	}
	log = dayLog
	switch {
	case len(log) > 0:
		last := log[len(log)-1]
		airNow = &last
		base := last
		source = "the " + last.Time.Format("15:04") + " reading"
		if f, err := weather.ForecastAt(log, call, elev); err == nil {
			forecast = &f
			base = f.Reading
			source = "forecast for " + call.Format("15:04") + ": " + strings.Join(f.Notes, "; ")
			if !f.Trusted {
				warnings = append(warnings, "the weather forecast is not to be trusted: "+strings.Join(f.Notes, "; "))
			}
		} else {
			warnings = append(warnings, fmt.Sprintf("no forecast for the %s call (%v): the air is the %s reading", call.Format("15:04"), err, last.Time.Format("15:04")))
		}
		if air, err = r.cond.reading(e.Settings.Units, call, &base); err != nil {
			return in, nil, err
		}
		if r.cond.given() {
			source += ", with the flags given"
		}
	case r.cond.given():
		if air, err = r.cond.reading(e.Settings.Units, call, nil); err != nil {
			return in, nil, err
		}
		source = "the reading flags"
	default:
		return in, nil, userErrf("no air for the round: %s has no readings; add one with 'pitcard weather add' or give --temp, --baro and --humidity",
			e.Name(event.WeatherFile))
	}
	if err := validateFlags(air, elev); err != nil {
		return in, nil, err
	}
	if w := air.PressureWarning(elev); w != "" {
		warnings = append(warnings, w)
	}
	air.Time = call
	prepLvl, err := prepLevel(r.Prep, trk)
	if err != nil {
		return in, nil, err
	}
	weight := 0.0
	if r.Weight != "" {
		if _, err := fmt.Sscanf(r.Weight, "%g", &weight); err != nil || weight < 500 || weight > 10000 {
			return in, nil, &weather.InputError{Field: "--weight", Value: r.Weight, Reason: "is outside 500..10000 lb"}
		}
	}
	opponent, usRT, err := r.opp.build(e.Settings, opp, passes)
	if err != nil {
		return in, nil, err
	}
	rules, err := scripts.Load(e.FS, e.Settings.RuleLimits)
	if err != nil {
		return in, nil, err
	}
	in = prep.Input{
		Car: car, Track: trk, Tracks: tracks, Passes: passes,
		Settings: prep.Settings{Units: e.Settings.Units, DialStep: e.Settings.DialStep, BreakoutRisk: e.Settings.BreakoutRisk,
			MaxRuleAdjust: e.Settings.MaxAdjust, RuleLimits: e.Settings.RuleLimits, MaxReadingAge: e.Settings.MaxReadingAge},
		Session: slot.Session, Lane: lane, OpponentDial: opp, Opponent: opponent, UsRT: usRT, PostBestForWin: e.Settings.PostBestForWin, Call: call, Now: now,
		Air: air, AirSource: source, AirNow: airNow, Forecast: forecast, Elevation: elev, Prep: prepLvl, WeightLb: weight,
		Rules: rules, RulesFS: e.FS,
	}
	for _, b := range broken {
		in.Problems = append(in.Problems, b.Error())
	}
	in.Problems = append(in.Problems, car.Warnings...)
	if len(broken) > 0 {
		return in, warnings, brokenInput{broken}
	}
	return in, warnings, nil
}

// brokenInput is bad input the card could print around: the input is
// usable, and the errors are reported after the card.
type brokenInput struct{ errs []error }

func (b brokenInput) Error() string {
	msgs := make([]string, len(b.errs))
	for i, e := range b.errs {
		msgs[i] = e.Error()
	}
	return strings.Join(msgs, "\n")
}

func (b brokenInput) BadInput() bool { return true }

// usable reports whether roundInput's error still left an input to gather.
func usable(err error) bool {
	var b brokenInput
	return err == nil || errors.As(err, &b)
}

func rangeErr(field string, d decimal.Decimal, r [2]float64) error {
	if f := d.InexactFloat64(); f < r[0] || f > r[1] {
		return &weather.InputError{Field: field, Value: d.String(), Reason: fmt.Sprintf("is outside %g..%g s", r[0], r[1])}
	}
	return nil
}
