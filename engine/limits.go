package engine

import (
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
	"time"
)

// Limits are the car's own safety limits as the crew entered them in
// car.yaml. pitcard carries no rulebook: the numbers come from the
// sanctioning body's current rulebook and the track's tech inspection, for
// this car. A zero (or empty) field was not entered; Problems says what was
// entered but cannot be read.
type Limits struct {
	// ET is limit_et: the quickest ET the chassis and cage are certified
	// for, s, at the distance raced (car.yaml's distance_ft). Valid range
	// LimitETRange.
	ET float64
	// MPH is limit_mph: the fastest trap speed allowed without more
	// equipment, mph, at the distance raced. Valid range LimitMPHRange.
	MPH float64
	// Chute is whether a parachute is fitted (chute: true/false); ChuteSaid
	// is whether car.yaml says at all.
	Chute, ChuteSaid bool
	// ChuteNeededMPH is chute_needed_mph: the trap speed from which the
	// crew's rulebook requires a parachute. Valid range LimitMPHRange.
	ChuteNeededMPH float64
	// BeltsExpire is the month the belts' date tag runs out, as written
	// (belts_expire); BeltsMonth is its first day when it reads as one of
	// BeltsForms, zero otherwise.
	BeltsExpire string
	BeltsMonth  time.Time
	// Problems are the limits entered that cannot be read, each naming the
	// key, the value and what is accepted; Unreadable holds their keys (a
	// limit entered wrong is not also "missing").
	Problems   []string
	Unreadable map[string]bool
}

// Ranges of the limits a crew enters: wide enough for any car pitcard
// models (an 0.8 s 60 ft and a 4 s eighth mile to a 25 s street car), narrow
// enough to catch a limit typed in the wrong unit (mph for seconds).
var (
	LimitETRange  = [2]float64{2, 30}   // s
	LimitMPHRange = [2]float64{20, 350} // mph
)

// BeltsForms are the written forms of belts_expire pitcard reads: a month
// as ISO 8601 writes it (2027-03), or as a belt's date tag often prints it
// (03/2027). Anything else is not guessed at.
const BeltsForms = `"YYYY-MM" (2027-03) or "MM/YYYY" (03/2027); a whole date (2027-03-01) counts for its month`

var (
	isoMonth   = regexp.MustCompile(`^(\d{4})-(\d{2})(?:-\d{2})?$`)
	slashMonth = regexp.MustCompile(`^(\d{2})/(\d{4})$`)
)

// ParseBeltsMonth reads belts_expire in one of BeltsForms and returns the
// first day of that month (UTC; only the year and month count).
func ParseBeltsMonth(s string) (time.Time, error) {
	s = strings.TrimSpace(s)
	var y, m string
	if g := isoMonth.FindStringSubmatch(s); g != nil {
		y, m = g[1], g[2]
	} else if g := slashMonth.FindStringSubmatch(s); g != nil {
		y, m = g[2], g[1]
	} else {
		return time.Time{}, fmt.Errorf("belts_expire %q is not a month pitcard reads: write it %s", s, BeltsForms)
	}
	year, _ := strconv.Atoi(y)
	month, _ := strconv.Atoi(m)
	if month < 1 || month > 12 || year < 1950 || year > 2200 {
		return time.Time{}, fmt.Errorf("belts_expire %q is not a month pitcard reads: the month is 01..12 and the year 1950..2200, written %s", s, BeltsForms)
	}
	return time.Date(year, time.Month(month), 1, 0, 0, 0, 0, time.UTC), nil
}

// Limits reads the safety limits from the car's own keys (car.yaml keeps
// them beside the physics, and the crew's rules see them as ctx.car).
func (c Car) Limits() Limits {
	l := Limits{Unreadable: map[string]bool{}}
	bad := func(key, why string) {
		l.Problems = append(l.Problems, why)
		l.Unreadable[key] = true
	}
	num := func(key string, rng [2]float64, unit string) float64 {
		v, ok := c.Extra[key]
		if !ok || v == nil {
			return 0
		}
		var f float64
		switch x := v.(type) {
		case int:
			f = float64(x)
		case int64:
			f = float64(x)
		case float64:
			f = x
		case string: // "11.40" in quotes: the number is plain to read
			n, err := strconv.ParseFloat(strings.TrimSpace(x), 64)
			if err != nil || math.IsNaN(n) || math.IsInf(n, 0) {
				bad(key, fmt.Sprintf("%s %q in car.yaml is not a number of %s (%g..%g)", key, x, unit, rng[0], rng[1]))
				return 0
			}
			f = n
		default:
			bad(key, fmt.Sprintf("%s %q in car.yaml is not a number of %s (%g..%g)", key, fmt.Sprint(v), unit, rng[0], rng[1]))
			return 0
		}
		if f < rng[0] || f > rng[1] {
			bad(key, fmt.Sprintf("%s %g in car.yaml is outside %g..%g %s", key, f, rng[0], rng[1], unit))
			return 0
		}
		return f
	}
	l.ET = num("limit_et", LimitETRange, "s")
	l.MPH = num("limit_mph", LimitMPHRange, "mph")
	l.ChuteNeededMPH = num("chute_needed_mph", LimitMPHRange, "mph")
	if v, ok := c.Extra["chute"]; ok && v != nil {
		switch b := v.(type) {
		case bool:
			l.Chute, l.ChuteSaid = b, true
		case string:
			bad("chute", fmt.Sprintf("chute %q in car.yaml is text, not true or false: write chute: true or chute: false, without quotes", b))
		default:
			bad("chute", fmt.Sprintf("chute %v in car.yaml is not true or false", v))
		}
	}
	if v, ok := c.Extra["belts_expire"]; ok && v != nil {
		l.BeltsExpire = strings.TrimSpace(fmt.Sprint(v))
		if t, ok := v.(time.Time); ok { // an unquoted 2027-03-01 is read as a date
			l.BeltsExpire = t.Format("2006-01-02")
		}
		if m, err := ParseBeltsMonth(l.BeltsExpire); err == nil {
			l.BeltsMonth = m
		}
	}
	return l
}
