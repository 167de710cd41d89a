package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"pitcard/bracket"
)

// Words a racer reads: each screen says what a figure is, in one form.
func TestPlainWords(t *testing.T) {
	cases := []struct {
		name       string
		args       []string
		want, lack []string
	}{
		{"expected time over the dial", []string{"card", "--demo"}, []string{"Over dial (exp.)"}, []string{"Given away"}},
		{"a left-out pass", []string{"card", "--demo"}, []string{"s slower than the model expects in its air"}, []string{"scatter within"}},
		{"the wind along the strip", []string{"card", "--demo"}, []string{"mph tailwind)"}, []string{"mph tail)"}},
		{"whole passes", []string{"predict", "--demo", "--latest", "--format", "json"}, []string{"leans mostly on the latest"}, []string{"passes' worth"}},
		{"passes left out of the stats", []string{"log", "stats", "--demo"}, []string{"(1 out)", `"7 (1 out)"`}, []string{"ok)"}},
		{"a forecast's pressure", []string{"weather", "forecast", "--demo", "--at", "20:45"}, []string{"forecast from the readings' trend"}, []string{"as read"}},
		{"reaction time's zero", []string{"log", "add", "--help"}, []string{"rt_zero"}, []string{"(negative = red light)"}},
		{"dew point to the degree", []string{"air", "--demo", "--latest"}, []string{"Dew point"}, []string{"52.4 °F"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			out, errs, _ := pitcard(t, tc.args...)
			flat := strings.Join(strings.Fields(out), " ")
			for _, w := range tc.want {
				if !strings.Contains(flat, w) {
					t.Errorf("lacks %q:\n%s%s", w, out, errs)
				}
			}
			for _, w := range tc.lack {
				if strings.Contains(flat, w) {
					t.Errorf("still says %q:\n%s", w, out)
				}
			}
		})
	}
}

// Density altitude to the nearest 10 ft on every screen (a meter's ±1 °F
// and ±0.01 inHg are worth about ±70 ft: NWS formula).
func TestDensityAltitudeToTenFeet(t *testing.T) {
	da := regexp.MustCompile(`(\d{3,5}) ft`)
	for _, args := range [][]string{{"card", "--demo"}, {"air", "--demo", "--latest"}, {"weather", "list", "--demo"}, {"log", "list", "--demo", "--last", "5"}} {
		out := mustRun(t, args...)
		n := 0
		for _, line := range strings.Split(out, "\n") {
			if !strings.Contains(line, "Density altitude") && !strings.Contains(strings.ToLower(line), "da") && args[0] != "weather" && args[0] != "log" {
				continue
			}
			for _, m := range da.FindAllStringSubmatch(line, -1) {
				if strings.Contains(line, "Density altitude") || args[0] == "weather" || args[0] == "log" {
					n++
					if !strings.HasSuffix(m[1], "0") && !strings.Contains(line, "Pressure altitude") && !strings.Contains(line, "sea-level") {
						t.Errorf("%v: %q is not to 10 ft", args, strings.TrimSpace(line))
					}
				}
			}
		}
		if n == 0 {
			t.Errorf("%v: no density altitude found:\n%s", args, out)
		}
	}
}

// JSON numbers are numbers: a script reading a dial gets a number with the
// slip's digits (11.40), never a string it must parse.
func TestJSONNumbersAreNumbers(t *testing.T) {
	var card map[string]any
	if err := json.Unmarshal([]byte(mustRun(t, "card", "--demo", "--opponent-dial", "12.1", "--format", "json")), &card); err != nil {
		t.Fatal(err)
	}
	dial, _ := card["dial"].(map[string]any)
	for name, v := range map[string]any{"opponent_dial": card["opponent_dial"], "final_dial": card["final_dial"],
		"dial.recommended": dial["recommended"], "dial.step": dial["step"], "dial.rule_total": dial["rule_total"]} {
		if _, ok := v.(float64); !ok {
			t.Errorf("%s is %T (%v), not a number", name, v, v)
		}
	}
	var d map[string]any
	if err := json.Unmarshal([]byte(mustRun(t, "dial", "--demo", "--format", "json")), &d); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"post_dial", "recommended_dial", "step"} {
		if _, ok := d[k].(float64); !ok {
			t.Errorf("dial's %s is %T (%v), not a number", k, d[k], d[k])
		}
	}
}

// Text from outside pitcard (a rule's label, a pass's notes) reaches no
// terminal as control codes, and no Markdown viewer as HTML.
func TestNoControlCodesFromOutside(t *testing.T) {
	dir := demoCopy(t)
	rule := "function checks(ctx)\n  return {{label = 'Esc\\27[31mRED\\27[0m\\r\\nFAKE PASS <script>x</script>', status = 'fail'}}\nend\n"
	if err := os.WriteFile(filepath.Join(dir, "rules", "70-esc.lua"), []byte(rule), 0o644); err != nil {
		t.Fatal(err)
	}
	mustRun(t, "log", "add", "--dir", dir, "--round", "E9", "--lane", "left", "--et1320", "11.45", "--mph1320", "118.1", "--notes", "ok\x1b[2J\x1b[31mPWNED\r\nline2")
	for _, args := range [][]string{{"card"}, {"card", "--format", "markdown"}, {"card", "--format", "json"}, {"log", "list", "--last", "3"}} {
		out, errs, _ := pitcard(t, append(args, "--dir", dir)...)
		if strings.ContainsAny(out+errs, "\x1b\r") {
			t.Errorf("%v writes a control code:\n%q", args, out+errs)
		}
		if args[len(args)-1] == "markdown" && strings.Contains(out, "<script>") {
			t.Errorf("markdown card carries raw HTML")
		}
	}
}

// One bad row in weather.csv costs that row: the card prints from the rest
// and exits 2 naming it, the list lists the rest, and a new reading is
// refused with nothing written (writing the log back would drop the row).
func TestABadWeatherRowCostsOnlyItself(t *testing.T) {
	dir := demoCopy(t)
	path := filepath.Join(dir, "weather.csv")
	data, _ := os.ReadFile(path)
	data = append(data, "2026-06-13,20:35:00,abc,27.6,station,40,,,,90,\n"...)
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	out, errs, code := pitcard(t, "card", "--dir", dir)
	if code != exitBadInput || !strings.Contains(out, "POST THIS") || !strings.Contains(errs, `weather.csv line 20: temp_f "abc"`) {
		t.Errorf("card: exit %d\n%s", code, errs)
	}
	out, _, code = pitcard(t, "weather", "list", "--dir", dir)
	if code != exitBadInput || !strings.Contains(out, "20:30") {
		t.Errorf("list: exit %d\n%s", code, out)
	}
	_, errs, code = pitcard(t, "weather", "add", "--dir", dir, "--temp", "80F", "--baro", "27.6inHg", "--humidity", "30%")
	if after, _ := os.ReadFile(path); code != exitBadInput || string(after) != string(data) || !strings.Contains(errs, "nothing was written") {
		t.Errorf("add: exit %d\n%s", code, errs)
	}
	// the slip is still logged (it does not write weather.csv), its air
	// from the rows that read, the bad row named
	out, errs, code = pitcard(t, "log", "add", "--dir", dir, "--round", "E4", "--lane", "left", "--rt", ".03", "--et1320", "11.46", "--mph1320", "117.9")
	if code != 0 || !strings.Contains(out, "Logged") || !strings.Contains(errs, "line 20") {
		t.Errorf("log add: exit %d\n%s%s", code, out, errs)
	}
	// the predictions print from the rest, name the row, exit 2
	for _, args := range [][]string{{"dial"}, {"predict", "--latest"}, {"weather", "forecast", "--at", "20:45"}} {
		out, errs, code := pitcard(t, append(args, "--dir", dir)...)
		if code != exitBadInput || len(out) < 200 || !strings.Contains(errs, "line 20") {
			t.Errorf("%v: exit %d, %d bytes\n%s", args, code, len(out), errs)
		}
	}
}

// A metric crew's logbook list speaks km/h and meters (it printed mph).
func TestMetricLogList(t *testing.T) {
	dir := demoCopy(t)
	editFile(t, dir, "pitcard.yaml", func(s string) string { return strings.Replace(s, "units: imperial", "units: metric", 1) })
	out := mustRun(t, "log", "list", "--dir", dir, "--last", "3")
	if !strings.Contains(out, "km/h") || !strings.Contains(out, "DA m") || strings.Contains(out, "mph") {
		t.Errorf("metric log list:\n%s", out)
	}
}

// In a metric folder a trap speed is typed in km/h (bare or with its unit)
// and kept as the logbook's mph: 190 km/h is 118.06 mph (1 mph = 1.609344
// km/h, NIST); in an imperial folder "190km/h" works too.
func TestTrapSpeedsInTheCrewsUnits(t *testing.T) {
	dir := demoCopy(t)
	editFile(t, dir, "pitcard.yaml", func(s string) string { return strings.Replace(s, "units: imperial", "units: metric", 1) })
	mustRun(t, "log", "add", "--dir", dir, "--round", "E7", "--lane", "left", "--time", "20:50", "--et1320", "11.45", "--mph1320", "190")
	mustRun(t, "log", "add", "--dir", dir, "--round", "E8", "--lane", "left", "--time", "20:55", "--et1320", "11.45", "--mph1320", "190km/h")
	book, _ := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	if n := strings.Count(string(book), ",11.45,,118.06,"); n != 2 {
		t.Errorf("%d passes with 118.06 mph:\n%s", n, book)
	}
}

// rules try speaks like the card: its JSON dials are numbers (null with no
// dial), and a failed check exits 3.
func TestRulesTryLikeTheCard(t *testing.T) {
	var j map[string]any
	if err := json.Unmarshal([]byte(mustRun(t, "rules", "try", "--demo", "--round", "3", "--lane", "left", "--format", "json")), &j); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"final_dial", "recommended_dial", "rule_total"} {
		if _, ok := j[k].(float64); !ok {
			t.Errorf("%s is %T (%v)", k, j[k], j[k])
		}
	}
	if j["session"] != "E3" || j["lane"] != "left" {
		t.Errorf("session %v lane %v", j["session"], j["lane"])
	}
}

// round asks for the reaction time as the slips print it: on an amber-zero
// tree perfect is .500 (full) and .021 would be a red light (common
// practice, no source: a full tree's green is .5 s after the last amber).
func TestRoundAsksRTAsTheSlipsPrintIt(t *testing.T) {
	if q := rtQuestion(bracket.FromAmber); !strings.Contains(q, ".500") || strings.Contains(q, ".021") {
		t.Errorf("amber: %q", q)
	}
	if q := rtQuestion(bracket.FromGreen); !strings.Contains(q, ".021") || !strings.Contains(q, "red light is negative") {
		t.Errorf("green: %q", q)
	}
}
