package prep

import (
	"fmt"
	"strconv"
	"strings"
	"time"

	"pitcard/engine"
	"pitcard/scripts"
	"pitcard/weather"
)

// SafetyFile is the name the built-in safety checks carry on the checklist
// where a rule's checks carry their file's.
const SafetyFile = "pitcard (car.yaml limits)"

// Safety warning margins: a prediction this close to a limit is worth a
// second look before the car goes up (common practice, no source: about
// one run-to-run spread of a sharp bracket car at each end).
const (
	WarnETMargin  = 0.10 // s
	WarnMPHMargin = 3.0  // mph
)

// SafetyInput is what the built-in safety checks compare: the car's limits,
// the prediction's quick end and fast end at the distance raced, and the
// day (for the belts' date tag).
type SafetyInput struct {
	Limits     engine.Limits
	DistanceFt float64
	// QuickET is the quick end of the finish ET's 95 % interval, s; 0 when
	// there is no prediction.
	QuickET float64
	// FastMPH is the fast end of the finish trap's 95 % interval, mph; 0
	// when no trap speed is predicted.
	FastMPH float64
	Day     time.Time
	// Units are the crew's: a metric card's checks speak km/h (the limits
	// stay as entered, in mph, beside them).
	Units weather.Units
	// CarUnread: car.yaml could not be read, so neither its limits nor its
	// distance are known; the checks say so once.
	CarUnread bool
}

// SafetyFor is the safety input of a prediction (none when p has no timers).
func SafetyFor(car engine.Car, p engine.Prediction, day time.Time, u weather.Units) SafetyInput {
	in := SafetyInput{Limits: car.Limits(), DistanceFt: car.DistanceFt, Day: day, Units: u}
	if len(p.Timers) > 0 {
		in.QuickET = p.Finish().Low
	}
	if n := len(p.Traps); n > 0 {
		in.FastMPH = p.Traps[n-1].High // the finish trap is last
	}
	return in
}

// SafetyChecks compare the prediction with the limits the crew entered for
// its own car: the ET and MPH limits at the distance raced, the parachute,
// the belts' date tag. pitcard carries no rulebook, so a limit not entered
// is a warning that says what is not being checked, and a limit that cannot
// be read is a failure (it cannot be checked either). They are built in, not
// a rule file, so that no broken or deleted rule can silence them, and so
// that every front end (card, dial, the pit page) runs the same ones.
func SafetyChecks(in SafetyInput) []scripts.Check {
	var out []scripts.Check
	add := func(label, status, note string) {
		if label != "" {
			out = append(out, scripts.Check{Label: label, Status: status, Note: note, File: SafetyFile})
		}
	}
	if in.CarUnread {
		add("Safety limits", scripts.Warn, "car.yaml could not be read: no limit is being checked until it is fixed")
		add(rulebookCheck())
		return out
	}
	for _, p := range in.Limits.Problems {
		add("Car's limits", scripts.Fail, p+": that limit is not being checked")
	}
	add(etCheck(in))
	add(mphCheck(in))
	add(chuteCheck(in))
	add(beltsCheck(in.Limits, in.Day))
	add(rulebookCheck())
	return out
}

// rulebookCheck is the item a person ticks: pitcard's checks are only as
// good as the limits entered.
func rulebookCheck() (label, status, note string) {
	return "Rulebook and tech", scripts.Confirm, "equipment and ET/MPH limits verified against the current rulebook and at tech"
}

// etCheck compares the quick end of the finish ET's interval with
// limit_et; "" when limit_et was entered wrong (said among the problems).
func etCheck(in SafetyInput) (label, status, note string) {
	l, dist := in.Limits, TimerName(in.DistanceFt)
	switch {
	case l.Unreadable["limit_et"]:
		return "", "", ""
	case l.ET == 0:
		return "ET limit", scripts.Warn, fmt.Sprintf("no limit_et in car.yaml: the ET is not being checked; enter the quickest %s ET your chassis and cage are certified for", dist)
	case in.QuickET == 0:
		return "ET limit", scripts.Warn, "no prediction to compare with the car's limit_et"
	case in.QuickET < l.ET:
		return "ET limit", scripts.Fail, fmt.Sprintf("could run %.3f s (the quick end of the 95 %% interval): quicker than the car's %s limit of %s s", in.QuickET, dist, limitET(l.ET))
	case in.QuickET < l.ET+WarnETMargin:
		return "ET limit", scripts.Warn, fmt.Sprintf("could run %.3f s (the quick end of the 95 %% interval), within %.2f s of the car's %s limit of %s s", in.QuickET, WarnETMargin, dist, limitET(l.ET))
	}
	return "ET limit", scripts.Pass, fmt.Sprintf("quickest likely %.3f s (the quick end of the 95 %% interval) against the car's %s limit of %s s", in.QuickET, dist, limitET(l.ET))
}

// mphCheck compares the fast end of the finish trap's interval with
// limit_mph.
func mphCheck(in SafetyInput) (label, status, note string) {
	l, dist := in.Limits, TimerName(in.DistanceFt)
	trap, limit := in.speeds()
	switch {
	case l.Unreadable["limit_mph"]:
		return "", "", ""
	case l.MPH == 0:
		return "MPH limit", scripts.Warn, fmt.Sprintf("no limit_mph in car.yaml: the trap speed is not being checked; enter the fastest %s trap speed allowed without more equipment", dist)
	case in.FastMPH == 0:
		return "MPH limit", scripts.Warn, "no trap speed predicted to compare with the car's limit_mph"
	case in.FastMPH > l.MPH:
		return "MPH limit", scripts.Fail, fmt.Sprintf("could trap %s (the fast end of the 95 %% interval): over the car's %s limit of %s", trap(in.FastMPH), dist, limit(l.MPH))
	case in.FastMPH > l.MPH-WarnMPHMargin:
		return "MPH limit", scripts.Warn, fmt.Sprintf("could trap %s (the fast end of the 95 %% interval), within %.0f mph of the car's %s limit of %s", trap(in.FastMPH), WarnMPHMargin, dist, limit(l.MPH))
	}
	return "MPH limit", scripts.Pass, fmt.Sprintf("fastest likely %s (the fast end of the 95 %% interval) against the car's %s limit of %s", trap(in.FastMPH), dist, limit(l.MPH))
}

// chuteCheck: a trap speed that needs a parachute, and whether one is
// fitted (not said counts as not fitted).
func chuteCheck(in SafetyInput) (label, status, note string) {
	l := in.Limits
	trap, limit := in.speeds()
	fitted := "no chute fitted"
	if !l.ChuteSaid {
		fitted = "car.yaml does not say a chute is fitted (chute: true)"
	}
	switch {
	case l.Unreadable["chute_needed_mph"]:
		return "", "", ""
	case l.ChuteNeededMPH == 0:
		return "Parachute", scripts.Warn, "no chute_needed_mph in car.yaml: the need for a parachute is not being checked"
	case in.FastMPH == 0:
		return "Parachute", scripts.Warn, "no trap speed predicted to compare with chute_needed_mph"
	case in.FastMPH >= l.ChuteNeededMPH && !l.Chute:
		return "Parachute", scripts.Fail, fmt.Sprintf("could trap %s and %s; you entered %s as needing one", trap(in.FastMPH), fitted, limit(l.ChuteNeededMPH))
	}
	return "Parachute", scripts.Pass, fmt.Sprintf("fastest likely %s; a chute is needed from %s", trap(in.FastMPH), limit(l.ChuteNeededMPH))
}

// speeds format a predicted trap speed as a slip prints it (hundredths of a
// mph) and a limit as the crew entered it, each in km/h too on a metric
// card.
func (in SafetyInput) speeds() (trap, limit func(mph float64) string) {
	in2 := func(mph float64, places int) string {
		t := strconv.FormatFloat(mph, 'f', places, 64) + " mph"
		if in.Units.Speed == weather.UnitKMH {
			t = weather.MPH(mph).Format(weather.UnitKMH, max(places, 0)) + " (" + t + ")"
		}
		return t
	}
	return func(mph float64) string { return in2(mph, 2) }, func(mph float64) string { return in2(mph, -1) }
}

// limitET prints an ET limit as the crew wrote it, to hundredths at least:
// 11.50, 11.401.
func limitET(v float64) string {
	t := strconv.FormatFloat(v, 'f', -1, 64)
	if i := strings.IndexByte(t, '.'); i < 0 {
		t += ".00"
	} else if len(t)-i-1 < 2 {
		t += strings.Repeat("0", 2-(len(t)-i-1))
	}
	return t
}

// beltsCheck reads the belts' date tag against the day: a tag that runs out
// this month warns, one that ran out before it fails.
func beltsCheck(l engine.Limits, day time.Time) (label, status, note string) {
	switch {
	case l.BeltsExpire == "":
		return "Belts", scripts.Warn, "no belts_expire in car.yaml: the belts' date tag is not being checked; enter its month as " + engine.BeltsForms
	case l.BeltsMonth.IsZero():
		_, err := engine.ParseBeltsMonth(l.BeltsExpire)
		return "Belts", scripts.Warn, err.Error() + "; the belts' date tag is not being checked"
	}
	tag := l.BeltsMonth.Format("2006-01")
	today := time.Date(day.Year(), day.Month(), 1, 0, 0, 0, 0, time.UTC)
	switch {
	case today.After(l.BeltsMonth):
		return "Belts", scripts.Fail, "the belts' date tag ran out in " + tag
	case today.Equal(l.BeltsMonth):
		return "Belts", scripts.Warn, "the belts' date tag runs out this month (" + tag + ")"
	}
	return "Belts", scripts.Pass, "date tag good to " + tag
}

// Failed are the checks that failed, each as "label: note": what the dial
// box shows. A failed check is the crew's to clear before the car goes up,
// whether pitcard's own or a rule's (a rule that cannot run is one too).
func Failed(checks []scripts.Check) []string {
	var out []string
	for _, ch := range checks {
		if ch.Status != scripts.Fail {
			continue
		}
		l := ch.Label
		if ch.Note != "" {
			l += ": " + ch.Note
		}
		if ch.File != "" && ch.File != SafetyFile {
			l += " (" + ch.File + ")"
		}
		out = append(out, l)
	}
	return out
}

// failedWords is the dial box's line for the failed checks.
func failedWords(failed []string) string {
	if len(failed) == 1 {
		return "A CHECK FAILED: " + failed[0]
	}
	return fmt.Sprintf("%d CHECKS FAILED: %s", len(failed), strings.Join(failed, "; "))
}
