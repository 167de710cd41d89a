package prep

import (
	"strings"
	"testing"
	"time"

	"pitcard/engine"
	"pitcard/scripts"
)

// The built-in safety checks: each limit the crew enters, missing, read,
// unreadable. The limits are the test car's own (invented); the comparisons
// are what the car.yaml comment promises (the quick end of the interval
// against limit_et, the fast end against limit_mph and chute_needed_mph, the
// belts' tag by month: common practice, no source).
func TestSafetyChecks(t *testing.T) {
	day := time.Date(2026, 6, 13, 20, 45, 0, 0, time.UTC)
	full := map[string]any{"limit_et": 10.65, "limit_mph": 126, "chute": false, "chute_needed_mph": 141, "belts_expire": "2027-03"}
	with := func(k string, v any) map[string]any {
		m := map[string]any{}
		for a, b := range full {
			m[a] = b
		}
		if v == nil {
			delete(m, k)
		} else {
			m[k] = v
		}
		return m
	}
	cases := []struct {
		name          string
		extra         map[string]any
		quick, fast   float64
		label, status string
		words         []string
		distance      float64
	}{
		{"ET well clear", full, 11.400, 118.4, "ET limit", scripts.Pass, []string{"11.400 s", "quick end of the 95 % interval", "1/4 mile limit of 10.65 s"}, 1320},
		{"ET past the limit", with("limit_et", 11.50), 11.400, 118.4, "ET limit", scripts.Fail, []string{"could run 11.400 s", "quicker than the car's 1/4 mile limit of 11.50 s"}, 1320},
		{"ET within the margin", with("limit_et", 11.35), 11.400, 118.4, "ET limit", scripts.Warn, []string{"within 0.10 s"}, 1320},
		{"ET on the eighth", with("limit_et", 7.5), 7.276, 94.1, "ET limit", scripts.Fail, []string{"1/8 mile limit of 7.50 s"}, 660},
		{"ET not entered", with("limit_et", nil), 11.400, 118.4, "ET limit", scripts.Warn, []string{"no limit_et", "not being checked", "1/4 mile"}, 1320},
		{"ET no prediction", full, 0, 0, "ET limit", scripts.Warn, []string{"no prediction"}, 1320},
		{"ET typed as text", with("limit_et", "ten"), 11.4, 118.4, "Car's limits", scripts.Fail, []string{`limit_et "ten"`, "not a number of s"}, 1320},
		{"ET in the wrong unit", with("limit_et", 135), 11.4, 118.4, "Car's limits", scripts.Fail, []string{"limit_et 135", "outside 2..30 s"}, 1320},
		{"MPH clear", full, 11.4, 118.4, "MPH limit", scripts.Pass, []string{"118.40 mph", "limit of 126 mph"}, 1320},
		{"MPH over", with("limit_mph", 118), 11.4, 118.4, "MPH limit", scripts.Fail, []string{"could trap 118.40 mph", "over the car's 1/4 mile limit of 118 mph"}, 1320},
		{"MPH close", with("limit_mph", 120), 11.4, 118.4, "MPH limit", scripts.Warn, []string{"within 3 mph"}, 1320},
		{"MPH not entered", with("limit_mph", nil), 11.4, 118.4, "MPH limit", scripts.Warn, []string{"no limit_mph", "not being checked"}, 1320},
		{"chute not needed", full, 11.4, 118.4, "Parachute", scripts.Pass, []string{"needed from 141 mph"}, 1320},
		{"chute needed, none", with("chute_needed_mph", 118), 11.4, 118.4, "Parachute", scripts.Fail, []string{"could trap 118.40 mph and no chute fitted"}, 1320},
		{"chute needed, not said", with("chute", nil), 11.4, 141.2, "Parachute", scripts.Fail, []string{"does not say a chute is fitted"}, 1320},
		{"chute needed, fitted", with("chute", true), 11.4, 141.2, "Parachute", scripts.Pass, nil, 1320},
		{"chute need not entered", with("chute_needed_mph", nil), 11.4, 118.4, "Parachute", scripts.Warn, []string{"no chute_needed_mph", "not being checked"}, 1320},
		{"belts good", full, 11.4, 118.4, "Belts", scripts.Pass, []string{"good to 2027-03"}, 1320},
		{"belts month/year good", with("belts_expire", "03/2027"), 11.4, 118.4, "Belts", scripts.Pass, []string{"good to 2027-03"}, 1320},
		{"belts this month", with("belts_expire", "2026-06"), 11.4, 118.4, "Belts", scripts.Warn, []string{"runs out this month (2026-06)"}, 1320},
		{"belts ran out", with("belts_expire", "2026-05"), 11.4, 118.4, "Belts", scripts.Fail, []string{"ran out in 2026-05"}, 1320},
		{"belts ran out years ago", with("belts_expire", "01/2025"), 11.4, 118.4, "Belts", scripts.Fail, []string{"ran out in 2025-01"}, 1320},
		// text comparison passed these; a date that does not read is a warning naming it
		{"belts one-digit month", with("belts_expire", "2026-1"), 11.4, 118.4, "Belts", scripts.Warn, []string{`"2026-1"`, "YYYY-MM", "not being checked"}, 1320},
		{"belts month name", with("belts_expire", "Jan 2025"), 11.4, 118.4, "Belts", scripts.Warn, []string{`"Jan 2025"`, "MM/YYYY"}, 1320},
		{"belts month 13", with("belts_expire", "2027-13"), 11.4, 118.4, "Belts", scripts.Warn, []string{"01..12"}, 1320},
		// entered in a form pitcard can still read, or named once as wrong
		{"ET in quotes", with("limit_et", "11.50"), 11.400, 118.4, "ET limit", scripts.Fail, []string{"limit of 11.50 s"}, 1320},
		{"ET to the thousandth", with("limit_et", 11.401), 11.400, 118.4, "ET limit", scripts.Fail, []string{"limit of 11.401 s"}, 1320},
		{"belts as a whole date", with("belts_expire", time.Date(2026, 5, 1, 0, 0, 0, 0, time.UTC)), 11.4, 118.4, "Belts", scripts.Fail, []string{"ran out in 2026-05"}, 1320},
		{"chute in quotes", with("chute", "true"), 11.4, 118.4, "Car's limits", scripts.Fail, []string{`chute "true" in car.yaml is text, not true or false: write chute: true`}, 1320},
		{"belts not entered", with("belts_expire", nil), 11.4, 118.4, "Belts", scripts.Warn, []string{"no belts_expire", "not being checked"}, 1320},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			car := engine.Car{DistanceFt: tc.distance, Extra: tc.extra}
			checks := SafetyChecks(SafetyInput{Limits: car.Limits(), DistanceFt: tc.distance, QuickET: tc.quick, FastMPH: tc.fast, Day: day})
			var got *scripts.Check
			for i := range checks {
				if checks[i].Label == tc.label {
					got = &checks[i]
				}
			}
			if got == nil {
				t.Fatalf("no %q check in %+v", tc.label, checks)
			}
			if got.Status != tc.status {
				t.Errorf("%s: %s, want %s (%s)", tc.label, got.Status, tc.status, got.Note)
			}
			for _, w := range tc.words {
				if !strings.Contains(got.Note, w) {
					t.Errorf("%s note %q lacks %q", tc.label, got.Note, w)
				}
			}
			if tc.label == "Car's limits" {
				for _, ch := range checks {
					if strings.Contains(ch.Note, "no limit_et") || strings.Contains(ch.Note, "no limit_mph") || strings.Contains(ch.Note, "no chute_needed") {
						t.Errorf("a limit entered wrong is also called missing: %s", ch.Note)
					}
				}
			}
			if last := checks[len(checks)-1]; last.Label != "Rulebook and tech" || last.Status != scripts.Confirm {
				t.Errorf("the rulebook item is not last: %+v", last)
			}
		})
	}
}

// With car.yaml unread, one line says no limit is checked (not "the
// quickest 0 ft ET").
func TestSafetyWithoutACar(t *testing.T) {
	checks := SafetyChecks(SafetyInput{CarUnread: true})
	if len(checks) != 2 || checks[0].Status != scripts.Warn || !strings.Contains(checks[0].Note, "car.yaml could not be read") {
		t.Errorf("%+v", checks)
	}
}

// A failed check reaches the dial box in every format, and the JSON says it
// where a script looks first.
func TestAFailedCheckStopsTheDial(t *testing.T) {
	in := input(modelLogbook(40), nil, nil)
	in.Car.Extra = map[string]any{"limit_et": 29.0, "limit_mph": 126, "chute_needed_mph": 141, "belts_expire": "2027-03"}
	c := Gather(in)
	if !c.HasFinal || len(c.Failed) != 1 || !strings.Contains(c.Failed[0], "ET limit") {
		t.Fatalf("failed %v, final %v", c.Failed, c.HasFinal)
	}
	var txt, md, html, js strings.Builder
	if err := RenderText(&txt, c, false); err != nil {
		t.Fatal(err)
	}
	_ = RenderMarkdown(&md, c)
	_ = RenderHTML(&html, c)
	_ = RenderJSON(&js, c)
	for name, out := range map[string]string{"text": txt.String(), "markdown": md.String(), "html": html.String()} {
		if i := strings.Index(out, `<div class="dial">`); i >= 0 {
			out = out[i:] // past the page's style
		}
		head := out[:min(len(out), 1500)] // the dial box, before the air
		if !(strings.Contains(head, "STOP") || strings.Contains(head, "DO NOT")) || !strings.Contains(head, "A CHECK FAILED: ET limit") || strings.Contains(head, "POST THIS") {
			t.Errorf("%s card's dial box:\n%s", name, head)
		}
	}
	for _, w := range []string{`"checks_failed": [`, `"post": false`, `"flag": "A CHECK FAILED: ET limit`} {
		if !strings.Contains(js.String(), w) {
			t.Errorf("JSON lacks %s", w)
		}
	}
}
