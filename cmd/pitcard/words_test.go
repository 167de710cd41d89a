package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// lastLogbookRow is the logbook's last row, split into its columns by name.
func lastLogbookRow(t *testing.T, dir string) map[string]string {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(data)), "\n")
	head, last := strings.Split(lines[0], ","), strings.Split(lines[len(lines)-1], ",")
	row := map[string]string{}
	for i, h := range head {
		if i < len(last) {
			row[h] = last[i]
		}
	}
	return row
}

// A weight was read three ways: predict took "1500kg" as 1500 lb, card and
// predict took "3300abc" as 3300, and log add refused "1500kg" as out of
// range. Every weight now goes through logbook.ParseWeightLb: a unit is
// read, a bare number is in the crew's units, and one message is given.
func TestOneParserForWeight(t *testing.T) {
	reading := []string{"--temp", "85F", "--baro", "27.6inHg", "--humidity", "35%"}
	et660 := func(t *testing.T, weight string) float64 {
		t.Helper()
		out := mustRun(t, append([]string{"predict", "--demo", "--format", "json", "--weight", weight}, reading...)...)
		var j struct {
			Timers []struct {
				DistanceFt float64 `json:"distance_ft"`
				ET         float64 `json:"et"`
			} `json:"timers"`
		}
		if err := json.Unmarshal([]byte(out), &j); err != nil {
			t.Fatal(err)
		}
		for _, x := range j.Timers {
			if x.DistanceFt == 660 {
				return x.ET
			}
		}
		t.Fatalf("no 660 ft timer:\n%s", out)
		return 0
	}
	t.Run("predict reads kg", func(t *testing.T) {
		// 1500 kg = 3306.934 lb (1 lb = 0.45359237 kg exactly, by definition)
		if kg, lb, light := et660(t, "1500kg"), et660(t, "3306.934lb"), et660(t, "1500lb"); kg != lb || kg == light {
			t.Errorf("660 ft ET: 1500kg %.3f, 3306.934lb %.3f, 1500lb %.3f", kg, lb, light)
		}
	})
	t.Run("metric crew's bare number is kg", func(t *testing.T) {
		out := mustRun(t, append([]string{"predict", "--demo", "--units", "metric", "--format", "json", "--weight", "1500"}, reading...)...)
		kgOut := mustRun(t, append([]string{"predict", "--demo", "--units", "metric", "--format", "json", "--weight", "1500kg"}, reading...)...)
		if out != kgOut {
			t.Errorf("a metric crew's --weight 1500 is not 1500 kg")
		}
	})
	dir := demoCopy(t)
	slip := []string{"log", "add", "--dir", dir, "--session", "E9", "--lane", "left", "--et1320", "11.5"}
	for _, tc := range []struct {
		name  string
		args  []string
		code  int
		words []string
	}{
		{"card refuses a stray unit", []string{"card", "--demo", "--weight", "3300abc"}, 2, []string{"--weight", `"3300abc"`, `unknown unit "abc"`, "lb or kg"}},
		{"predict refuses a stray unit", append([]string{"predict", "--demo", "--weight", "3300abc"}, reading...), 2, []string{"--weight", `unknown unit "abc"`}},
		{"log add refuses a stray unit", append(append([]string{}, slip...), "--weight", "3300abc"), 2, []string{"--weight", `unknown unit "abc"`}},
		{"one range message", append(append([]string{}, slip...), "--weight", "50"), 2, []string{"--weight", "is outside 500..10000 lb (227..4536 kg)"}},
		{"the same for predict", append([]string{"predict", "--demo", "--weight", "50kg"}, reading...), 2, []string{"--weight", "is outside 500..10000 lb (227..4536 kg)"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out, errs, code := pitcard(t, tc.args...)
			if code != tc.code {
				t.Fatalf("exit %d, want %d\n%s%s", code, tc.code, out, errs)
			}
			for _, w := range tc.words {
				if !strings.Contains(errs, w) {
					t.Errorf("%q lacks %q", errs, w)
				}
			}
		})
	}
	t.Run("log add reads kg", func(t *testing.T) {
		mustRun(t, append(append([]string{}, slip...), "--weight", "1500kg")...)
		if w := lastLogbookRow(t, dir)["weight_lb"]; !strings.HasPrefix(w, "3306.9") {
			t.Errorf("1500kg logged as weight_lb %s, want 3306.9", w)
		}
	})
	t.Run("log add: a metric crew's bare number is kg", func(t *testing.T) {
		mustRun(t, "log", "add", "--dir", dir, "--units", "metric", "--session", "E8", "--lane", "right", "--et1320", "11.5", "--weight", "1500")
		if w := lastLogbookRow(t, dir)["weight_lb"]; !strings.HasPrefix(w, "3306.9") {
			t.Errorf("metric 1500 logged as weight_lb %s, want 3306.9", w)
		}
	})
}

// A dial was printed three ways: with --dial-step 0.005 the other lane's
// 10.125 came out as 10.13 in one place and 10.125 in another. Every dial
// now goes through prep.DialText, which knows the step and never rounds a
// dial typed finer than it.
func TestOneFormatterForADial(t *testing.T) {
	for _, tc := range []struct {
		name       string
		args       []string
		want, lack []string
	}{
		{"dial", []string{"dial", "--demo", "--dial-step", "0.005", "--opponent-dial", "10.125"},
			[]string{"Against the other lane's 10.125:"}, []string{"10.13"}},
		{"dial, coarse step", []string{"dial", "--demo", "--opponent-dial", "10.125"},
			[]string{"Against the other lane's 10.125:"}, []string{"10.13"}},
		{"card", []string{"card", "--demo", "--dial-step", "0.005", "--opponent-dial", "10.125"},
			[]string{"the other lane dials 10.125", "the other lane's 10.125 dial"}, []string{"10.13"}},
		{"dial json", []string{"dial", "--demo", "--dial-step", "0.005", "--opponent-dial", "10.125", "--format", "json"},
			[]string{`"recommended_dial": 11.405`, `"post_dial": 11.395`}, nil},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out := mustRun(t, tc.args...)
			for _, w := range tc.want {
				if !strings.Contains(out, w) {
					t.Errorf("lacks %q:\n%s", w, out)
				}
			}
			for _, w := range tc.lack {
				if strings.Contains(out, w) {
					t.Errorf("still says %q:\n%s", w, out)
				}
			}
		})
	}
}

// The guided round asked an eighth-mile car for its "1/4 mile ET", asked
// for the other lane's dial on a time trial, and told a metric crew its
// 68 (°C) was "outside -40..140 °F".
func TestRoundAsksWhatTheRoundHas(t *testing.T) {
	keep := strings.Repeat("\n", 6) // the readings: keep the last
	t.Run("eighth-mile car", func(t *testing.T) {
		dir := demoCopy(t)
		editFile(t, dir, "car.yaml", func(s string) string {
			return regexp.MustCompile(`(?m)^distance_ft:.*$`).ReplaceAllString(s, "distance_ft: 660")
		})
		// round, readings, lane, the other lane's dial, run it, then the slip
		answers := "E4\n" + keep + "left\n\n\n\n.024\n1.611\n4.681\n7.301\n93.81\n\n"
		out, errs, _ := pitcardIn(t, answers, "round", "--dir", dir)
		_, slip, _ := strings.Cut(out, "Run the round") // the slip's questions, after the card
		if !strings.Contains(slip, "1/8 mile ET") || strings.Contains(slip, "1/4 mile") || strings.Contains(slip, "1000 ft") {
			t.Errorf("an eighth-mile car's slip questions:\n%s\n%s", out, errs)
		}
	})
	t.Run("time trial", func(t *testing.T) {
		dir := demoCopy(t)
		out, errs, _ := pitcardIn(t, "T4\n"+keep+"left\n", "round", "--dir", dir, "--no-log")
		if strings.Contains(out, "Other lane") || strings.Contains(out, "Opponent") || !strings.Contains(out, "Lane (left or right)") {
			t.Errorf("a time trial asks for the other lane:\n%s\n%s", out, errs)
		}
	})
	t.Run("metric crew", func(t *testing.T) {
		dir := demoCopy(t)
		out, _, code := pitcardIn(t, "E4\n68\n68\n68\n", "round", "--dir", dir, "--units", "metric", "--no-log")
		if code != 2 || !strings.Contains(out, "-40..60 °C") || strings.Contains(out, "°F") {
			t.Errorf("exit %d; a metric crew's temperature:\n%s", code, out)
		}
	})
}

// A metric crew's bare --temp 68 is read as 68 °C, and the message says so
// in °C: it said "154.4 °F is outside -40..140 °F".
func TestReadingRangesInTheCrewsUnits(t *testing.T) {
	for _, tc := range []struct {
		name string
		args []string
		want string
	}{
		{"air", []string{"air", "--demo", "--units", "metric", "--temp", "68", "--baro", "980", "--humidity", "40"}, `--temp "68 °C" is outside -40..60 °C`},
		{"predict", []string{"predict", "--demo", "--units", "metric", "--temp", "68", "--baro", "980", "--humidity", "40"}, `--temp "68 °C" is outside -40..60 °C`},
		{"imperial as before", []string{"air", "--demo", "--temp", "168", "--baro", "28", "--humidity", "40"}, `--temp "168 °F" is outside -40..140 °F`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, errs, code := pitcard(t, tc.args...)
			if code != 2 || !strings.Contains(errs, tc.want) {
				t.Errorf("exit %d %q, want %q", code, errs, tc.want)
			}
		})
	}
}

// Settings each get the clear word: PITCARD_DIAL_STEP=1e-2 was refused while
// dial_step: 1e-2 was taken (one parser now reads both); a setting that is
// not a number said "outside" a range; units: [metric] and a misspelt
// PITCARD_ variable were silently ignored.
func TestSettingsWords(t *testing.T) {
	for _, tc := range []struct {
		name      string
		env, yaml string // a variable NAME=VALUE, a line for pitcard.yaml
		code      int
		want      []string
	}{
		{"env step in e-notation", "PITCARD_DIAL_STEP=1e-2", "", 0, []string{"Dial-ins (step 0.01 s"}},
		{"yaml step in e-notation", "", "dial_step: 1e-2", 0, []string{"Dial-ins (step 0.01 s"}},
		{"env step 0.010", "PITCARD_DIAL_STEP=0.010", "", 0, []string{"the breakout rule's 11.40,"}},
		{"env risk not a number", "PITCARD_BREAKOUT_RISK=abc", "", 2, []string{"PITCARD_BREAKOUT_RISK", `"abc" is not a number`, "0.001..0.5"}},
		{"yaml risk not a number", "", "breakout_risk: abc", 2, []string{"pitcard.yaml line", "breakout_risk", "is not a number"}},
		{"env rule time not a number", "PITCARD_RULE_TIME_MS=fast", "", 2, []string{"PITCARD_RULE_TIME_MS", "is not a number", "10..10000 ms"}},
		{"units as a list", "", "units: [metric]", 2, []string{"pitcard.yaml line", "units", "a list", "units: imperial"}},
		{"misspelt variable", "PITCARD_DIAL_SETP=0.01", "", 2, []string{"PITCARD_DIAL_SETP", "not a pitcard setting", "PITCARD_DIAL_STEP", "PITCARD_UNITS"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := demoCopy(t)
			if tc.env != "" {
				k, v, _ := strings.Cut(tc.env, "=")
				t.Setenv(k, v)
			}
			if tc.yaml != "" {
				key, _, _ := strings.Cut(tc.yaml, ":")
				editFile(t, dir, "pitcard.yaml", func(s string) string {
					return regexp.MustCompile(`(?m)^`+key+`:.*$`).ReplaceAllString(s, "") + tc.yaml + "\n"
				})
			}
			out, errs, code := pitcard(t, "dial", "--dir", dir)
			if code != tc.code {
				t.Fatalf("exit %d, want %d\n%s%s", code, tc.code, out, errs)
			}
			for _, w := range tc.want {
				if !strings.Contains(out+errs, w) {
					t.Errorf("lacks %q:\n%s%s", w, out, errs)
				}
			}
		})
	}
}

// log stats named one figure two ways: sixty_sd/corrected_sd in its CSV and
// et60_sd/et_sd_corrected in its JSON. One name each now, the JSON's.
func TestStatsNamesAgree(t *testing.T) {
	csvHead, _, _ := strings.Cut(mustRun(t, "log", "stats", "--demo", "--format", "csv"), "\n")
	var rows []map[string]any
	if err := json.Unmarshal([]byte(mustRun(t, "log", "stats", "--demo", "--format", "json")), &rows); err != nil || len(rows) == 0 {
		t.Fatal(err)
	}
	cols := strings.Split(csvHead, ",")
	if len(cols) != len(rows[0]) {
		t.Errorf("CSV has %d columns, JSON %d keys", len(cols), len(rows[0]))
	}
	for _, c := range cols {
		if _, ok := rows[0][c]; !ok {
			t.Errorf("CSV column %q is not a JSON key", c)
		}
	}
}
