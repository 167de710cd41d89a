package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// pitcardIn runs a command with stdin, the clock at fixedNow.
func pitcardIn(t *testing.T, stdin string, args ...string) (string, string, int) {
	t.Helper()
	return pitcardAt(t, fixedNow, stdin, args...)
}

// The guided round, fed on standard input as a pipe would: Enter keeps the
// last reading, typed values take their units, the card prints, the slip is
// logged.
func TestGuidedRound(t *testing.T) {
	dir := demoCopy(t)
	answers := strings.Join([]string{
		"",       // round: the schedule's next (E3)
		"81.5F",  // air temperature
		"",       // barometer: keep
		"52F",    // a dew point, by its unit
		"2",      // wind, bare number in mph
		"SE",     // wind from
		"88",     // track temperature, bare °F
		"",       // lane: the schedule's (left)
		"11.52",  // opponent's dial
		"",       // the round is run
		"",       // dial: keep the card's
		".024",   // RT
		"1.611",  // 60 ft
		"4.681",  // 330
		"7.301",  // 1/8
		"93.81",  // 1/8 mph
		"9.566",  // 1000
		"11.482", // 1/4
		"117.52", // 1/4 mph
		"",       // notes
	}, "\n") + "\n"
	out, errs, code := pitcardIn(t, answers, "round", "--dir", dir)
	if code != 0 {
		t.Fatalf("exit %d\n%s\n%s", code, errs, out)
	}
	for _, w := range []string{"Round (3, E3, T2 ...) [E3]", "Air temperature [83.3 °F]", "Lane (left or right) [left]", "POST THIS",
		"the other lane dials 11.52", "Logged 2026-06-13 20:40 round 3, left lane: 11.482"} {
		if !strings.Contains(out, w) {
			t.Errorf("the round lacks %q:\n%s", w, out)
		}
	}
	var readings []map[string]any
	_ = json.Unmarshal([]byte(mustRun(t, "weather", "list", "--dir", dir, "--format", "json")), &readings)
	lastR := readings[len(readings)-1]
	if lastR["temp_f"].(float64) != 81.5 || lastR["track_temp_f"].(float64) != 88 || lastR["wind_from_deg"].(float64) != 135 {
		t.Errorf("the reading logged: %v", lastR)
	}
	// A bad value is asked again; three bad answers stop with exit 2.
	out, _, code = pitcardIn(t, "E4\n150F\n200F\nhot\n", "round", "--dir", dir, "--no-log")
	if code != 2 || strings.Count(out, "Air temperature") != 3 || !strings.Contains(out, "-40..140 °F") {
		t.Errorf("bad answers: exit %d\n%s", code, out)
	}
	// Nothing but the end of input: every answer keeps its default; no slip.
	out, errs, code = pitcardIn(t, "", "round", "--dir", dir, "--round", "E4", "--lane", "right")
	if code != 0 || !strings.Contains(out, "POST THIS") || !strings.Contains(out, "No slip logged") {
		t.Errorf("empty input: exit %d\n%s\n%s", code, errs, out)
	}
}
