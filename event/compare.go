package event

import (
	"fmt"
	"math"
	"strings"
	"time"

	"pitcard/engine"
	"pitcard/logbook"
	"pitcard/weather"
)

// A pass is named the way the logbook's list and the pit page show it: by
// its round as `log add --round` takes it (T1, E2, test), its date
// (2026-06-13) and its time (20:13), any of them, in any order ("E2",
// "2026-06-13 E2", "E2 20:13"). The latest pass that matches every part is
// the one named; "latest" (or nothing) is the latest pass logged.
const passNameHelp = `a round as 'log add --round' takes it (T1, E2, test), a date (2026-06-13) and/or a time (20:13) as 'log list' shows them, e.g. "E2" or "2026-06-13 E2", or latest`

// PassNamed is the index in passes (oldest first) of the pass name names
// (see passNameHelp), the latest that matches. field is the flag or
// argument the name came from, for the error.
func PassNamed(passes []logbook.Pass, name, field string) (int, error) {
	i, reason := passNamed(passes, name)
	if reason != "" {
		return -1, &weather.InputError{Field: field, Value: name, Reason: reason}
	}
	return i, nil
}

// passNamed is PassNamed's index, or why name names no pass.
func passNamed(passes []logbook.Pass, name string) (int, string) {
	if len(passes) == 0 {
		return -1, "names a pass, but the logbook has none yet"
	}
	words := strings.Fields(strings.ToLower(name))
	if len(words) == 0 || (len(words) == 1 && words[0] == "latest") {
		return len(passes) - 1, ""
	}
	var day, clock string
	var ses *logbook.Session
	for _, w := range words {
		if _, err := time.Parse("2006-01-02", w); err == nil && day == "" {
			day = w
			continue
		}
		if _, err := time.Parse("15:04", w); err == nil && clock == "" {
			clock = w
			continue
		}
		s, err := logbook.ParseSession(w)
		if err != nil || ses != nil {
			return -1, "is not a pass: name one by " + passNameHelp
		}
		ses = &s
	}
	for i := len(passes) - 1; i >= 0; i-- {
		p := passes[i]
		if (day == "" || p.Time.Format("2006-01-02") == day) && (clock == "" || p.Time.Format("15:04") == clock) && (ses == nil || p.Session == *ses) {
			return i, ""
		}
	}
	return -1, fmt.Sprintf("matches no logged pass (the latest is %s); name one by %s", PassLabel(passes[len(passes)-1]), passNameHelp)
}

// PassLabel is a pass as PassNamed reads it back: "E2 2026-06-13 20:13".
func PassLabel(p logbook.Pass) string {
	return p.Session.String() + " " + p.Time.Format("2006-01-02 15:04")
}

// ComparedWith is the pass to set pass i against: "best", the quickest
// other clean pass at distanceFt (a pass whose notes hold one of aborts is
// not clean); "last", the pass logged before it; or any name PassNamed
// reads. field names the flag for the error.
func ComparedWith(passes []logbook.Pass, i int, with, field string, distanceFt float64, aborts logbook.AbortWords) (int, error) {
	switch strings.ToLower(strings.TrimSpace(with)) {
	case "best", "":
		best, at := math.Inf(1), -1
		for j, p := range passes {
			et, ok := p.ETAt(distanceFt)
			if j == i || !ok || aborts.Aborted(p.Notes) {
				continue
			}
			if et < best {
				best, at = et, j
			}
		}
		if at < 0 {
			return -1, &weather.InputError{Field: field, Value: with, Reason: fmt.Sprintf("finds no other clean pass timed at %.0f ft: name a pass (%s)", distanceFt, passNameHelp)}
		}
		return at, nil
	case "last", "previous":
		if i == 0 {
			return -1, &weather.InputError{Field: field, Value: with, Reason: "finds no pass before the first one logged: use best or name a pass (" + passNameHelp + ")"}
		}
		return i - 1, nil
	}
	j, reason := passNamed(passes, with)
	if reason != "" {
		return -1, &weather.InputError{Field: field, Value: with, Reason: "is not best, last or a logged pass: " + strings.TrimPrefix(reason, "is not a pass: ")}
	}
	return j, nil
}

// AirCarryBetween is the factor carrying the other pass's times to this
// pass's air (logbook.AirCarry of their SAE J1349 factors, as
// engine.AirCarried carries a whole pass), and whether both passes logged
// their weather. trk gives the folder's track elevation (ElevationFor).
func AirCarryBetween(this, other logbook.Pass, trk engine.Track) (float64, bool) {
	if !this.HasAir || !other.HasAir {
		return math.NaN(), false
	}
	to := this.Air.Derive(ElevationFor(this, trk)).CFJ1349
	from := other.Air.Derive(ElevationFor(other, trk)).CFJ1349
	k := logbook.AirCarry(from, to)
	return k, !math.IsNaN(k)
}
