package logbook

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/shopspring/decimal"
	"golang.org/x/text/unicode/norm"

	"pitcard/weather"
)

// TrackName is a track's name as pitcard keeps it: trimmed, in Unicode's
// composed form (NFC), so "Café" typed with a combining accent is the same
// track as "Café" typed with é.
func TrackName(s string) string { return norm.NFC.String(strings.TrimSpace(s)) }

// TimerDistancesFt are the distances, in feet, a drag strip times: 60 ft, 330 ft, the
// eighth mile (660), 1000 ft and the quarter mile (1320).
var TimerDistancesFt = []float64{60, 330, 660, 1000, 1320}

// TimersFor are the timers of a race of distance ft (660, 1000 or 1320).
func TimersFor(distance float64) []float64 {
	var out []float64
	for _, t := range TimerDistancesFt {
		if t <= distance {
			out = append(out, t)
		}
	}
	return out
}

// TimerIndex is the index in Timers (and in Pass.ET) of distance ft, or -1.
func TimerIndex(ft float64) int {
	for i, t := range TimerDistancesFt {
		if t == ft {
			return i
		}
	}
	return -1
}

// ParseSeconds reads a time as a slip prints it, "10.923", ".520", "-.012":
// plain decimal notation only (no exponents), kept exact with its digits.
func ParseSeconds(field, s string) (decimal.Decimal, error) {
	t := strings.TrimSpace(s)
	if !plainDecimal(t) {
		return decimal.Decimal{}, &weather.InputError{Field: field, Value: s, Reason: "is not a time in seconds (e.g. 10.923 or .520)"}
	}
	d, err := decimal.NewFromString(t)
	if err != nil {
		// The decimal parser's words only: what to check for is the InputError.
		return decimal.Decimal{}, &weather.InputError{Field: field, Value: s, Reason: "is not a time in seconds: " + err.Error()}
	}
	return d, nil
}

// ParseSlipTime reads a time from a slip, ours or the other lane's, and
// checks it against its range (DialRange for a dial or a finish ET of any
// distance, RTRange for a reaction time): one parser for every lane's
// figures, so the other lane's are held to what ours are.
func ParseSlipTime(field, s string, r [2]float64) (decimal.Decimal, error) {
	d, err := ParseSeconds(field, s)
	if err != nil {
		return d, err
	}
	return d, rangeCheck(field, d, r[0], r[1], "s")
}

func plainDecimal(s string) bool {
	if s == "" {
		return false
	}
	if s[0] == '+' || s[0] == '-' {
		s = s[1:]
	}
	digits, dot := 0, false
	for _, c := range s {
		switch {
		case c >= '0' && c <= '9':
			digits++
		case c == '.' && !dot:
			dot = true
		default:
			return false
		}
	}
	return digits > 0 && digits <= 12
}

// FormatSeconds prints a slip time with the digits it was typed with, at
// least min decimals: 0.52 typed as ".520" prints "0.520".
func FormatSeconds(d decimal.Decimal, min int) string {
	places := max(int(-d.Exponent()), min)
	return d.StringFixed(int32(places))
}

// Lane is the lane a car ran in.
type Lane string

// Lanes.
const (
	Left  Lane = "left"
	Right Lane = "right"
)

// ParseLane reads left/right (also l/r, any case).
func ParseLane(s string) (Lane, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "left", "l":
		return Left, nil
	case "right", "r":
		return Right, nil
	}
	return "", &weather.InputError{Field: "lane", Value: s, Reason: "is not a lane: write left or right"}
}

// SessionKind is what a pass was for.
type SessionKind int

// Session kinds.
const (
	TimeTrial SessionKind = iota
	Elimination
	Test
)

// Session is a time trial (T1, T2 ...), an elimination round (E1, E2 ...) or
// a test pass.
type Session struct {
	Kind SessionKind
	N    int // round or time-trial number; 0 for a test
}

// String is the session's short form: T1, E2 or test.
func (s Session) String() string {
	switch s.Kind {
	case TimeTrial:
		return "T" + strconv.Itoa(s.N)
	case Elimination:
		return "E" + strconv.Itoa(s.N)
	}
	return "test"
}

// Long is the session in words: "time trial 2", "round 3", "test".
func (s Session) Long() string {
	switch s.Kind {
	case TimeTrial:
		return "time trial " + strconv.Itoa(s.N)
	case Elimination:
		return "round " + strconv.Itoa(s.N)
	}
	return "test"
}

// ParseSession reads a session: "T1", "TT1", "time trial 1"; "E2", "R2",
// "round 2", or a bare round number "2"; "test".
func ParseSession(s string) (Session, error) {
	t := strings.ToLower(strings.Join(strings.Fields(s), ""))
	bad := &weather.InputError{Field: "session", Value: s,
		Reason: "is not a round (T1, T2 ... for time trials; E1, E2 ... or a round number for eliminations; test)"}
	if t == "test" || t == "testing" {
		return Session{Kind: Test}, nil
	}
	kind := Elimination
	for _, p := range []struct {
		prefix string
		kind   SessionKind
	}{{"timetrial", TimeTrial}, {"tt", TimeTrial}, {"t", TimeTrial}, {"round", Elimination}, {"e", Elimination}, {"r", Elimination}} {
		if strings.HasPrefix(t, p.prefix) {
			t, kind = t[len(p.prefix):], p.kind
			break
		}
	}
	n, err := strconv.Atoi(t)
	if err != nil || n < 1 || n > 99 {
		return Session{}, bad
	}
	return Session{Kind: kind, N: n}, nil
}

// rangeCheck reports v outside lo..hi, naming field with unit.
func rangeCheck(field string, v decimal.Decimal, lo, hi float64, unit string) error {
	f := v.InexactFloat64()
	if f < lo || f > hi {
		return &weather.InputError{Field: field, Value: v.String(), Reason: fmt.Sprintf("is outside %g..%g %s", lo, hi, unit)}
	}
	return nil
}
