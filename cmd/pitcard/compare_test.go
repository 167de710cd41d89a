package main

import (
	"encoding/json"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

type compareOut struct {
	Pass, With  string
	DistanceFt  float64  `json:"distance_ft"`
	ThisLaunchG *float64 `json:"this_launch_g"`
	AirCarry    *float64 `json:"air_carry_factor"`
	Note        string
	Segments    []struct {
		FromFt      float64  `json:"from_ft"`
		ToFt        float64  `json:"to_ft"`
		ThisS       *float64 `json:"this_s"`
		OtherS      *float64 `json:"other_s"`
		DiffS       *float64 `json:"diff_s"`
		DiffAirOutS *float64 `json:"diff_air_out_s"`
		ThisMPH     *float64 `json:"this_mph"`
		ThisMissing string   `json:"this_missing"`
	}
}

func compareJSONOf(t *testing.T, args ...string) compareOut {
	t.Helper()
	var c compareOut
	out := mustRun(t, append(append([]string{"log", "compare"}, args...), "--format", "json")...)
	if err := json.Unmarshal([]byte(out), &c); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	return c
}

// A pass against itself gives zeros, raw and with the air taken out (the
// same air carries by a factor of exactly 1).
func TestLogCompareAgainstItself(t *testing.T) {
	for _, with := range []string{"latest", "E2", "2026-06-13 E2"} {
		c := compareJSONOf(t, "--demo", "--with", with)
		if c.Pass != c.With || len(c.Segments) != 5 {
			t.Fatalf("--with %s: %s against %s, %d segments", with, c.Pass, c.With, len(c.Segments))
		}
		for _, s := range c.Segments {
			if s.DiffS == nil || *s.DiffS != 0 || s.DiffAirOutS == nil || *s.DiffAirOutS != 0 {
				t.Errorf("--with %s, %v–%v ft: diff %v, air out %v, want 0", with, s.FromFt, s.ToFt, s.DiffS, s.DiffAirOutS)
			}
		}
	}
}

// The figures are the slip's own arithmetic: each segment's time is the
// difference of the timers 'log list' shows, its difference this less the
// other's, its speed length over time, and the launch 2·60/t² in g
// (standard gravity 32.174 ft/s², ISO 80000-3). The best is the quickest
// other clean pass at 1320 ft.
func TestLogCompareDemoArithmetic(t *testing.T) {
	c := compareJSONOf(t, "--demo")
	var passes []struct {
		Time    string
		Session string
		Notes   string
		ET      map[string]string
	}
	if err := json.Unmarshal([]byte(mustRun(t, "log", "list", "--demo", "--last", "0", "--format", "json")), &passes); err != nil {
		t.Fatal(err)
	}
	et := func(i int, ft string) float64 {
		v, err := strconv.ParseFloat(passes[i].ET[ft], 64)
		if err != nil {
			t.Fatalf("pass %d at %s ft: %v", i, ft, err)
		}
		return v
	}
	last := len(passes) - 1
	best, bestET := -1, math.Inf(1)
	for i := range passes[:last] {
		if v := et(i, "1320"); v < bestET && !strings.Contains(passes[i].Notes, "lifted") {
			best, bestET = i, v
		}
	}
	label := func(i int) string {
		return passes[i].Session + " " + strings.Replace(strings.TrimSuffix(passes[i].Time, ":00Z"), "T", " ", 1)
	}
	if c.Pass != label(last) || c.With != label(best) {
		t.Fatalf("compared %s with %s, want the latest %s with the best %s", c.Pass, c.With, label(last), label(best))
	}
	marks := []string{"0", "60", "330", "660", "1000", "1320"}
	for k, s := range c.Segments {
		at := func(i int, m string) float64 {
			if m == "0" {
				return 0
			}
			return et(i, m)
		}
		this := at(last, marks[k+1]) - at(last, marks[k])
		other := at(best, marks[k+1]) - at(best, marks[k])
		if math.Abs(*s.ThisS-this) > 5e-4 || math.Abs(*s.OtherS-other) > 5e-4 || math.Abs(*s.DiffS-(this-other)) > 5e-4 {
			t.Errorf("%v–%v ft: %v %v %v, want %.3f %.3f %+.3f (the timers' differences)", s.FromFt, s.ToFt, *s.ThisS, *s.OtherS, *s.DiffS, this, other, this-other)
		}
		mph := (s.ToFt - s.FromFt) / this * 3600 / 5280 // definition of average speed
		if math.Abs(*s.ThisMPH-mph) > 0.006 {
			t.Errorf("%v–%v ft: %v mph, want %.2f", s.FromFt, s.ToFt, *s.ThisMPH, mph)
		}
	}
	t60 := et(last, "60")
	if want := 2 * 60 / (t60 * t60) / 32.174; c.ThisLaunchG == nil || math.Abs(*c.ThisLaunchG-want) > 6e-4 { // a = 2d/t², common practice (no source)
		t.Errorf("launch %v g, want %.3f", c.ThisLaunchG, want)
	}
	if c.AirCarry == nil || !strings.Contains(c.Note, "below the peak a data logger shows") {
		t.Errorf("air carry %v, note %q", c.AirCarry, c.Note)
	}
	text := mustRun(t, "log", "compare", "--demo")
	for _, w := range []string{"0–60 ft", "1000–1320 ft", "Most time", "SAE J1349", "below the peak a data logger shows"} {
		if !strings.Contains(text, w) {
			t.Errorf("text lacks %q:\n%s", w, text)
		}
	}
}

// The demo's lifted pass ("lifted at 1000 ft") lost the most time past
// 1000 ft against the pass before it, and is never the best.
func TestLogCompareFindsTheLift(t *testing.T) {
	out := mustRun(t, "log", "compare", "--demo", "2026-04-11 E3", "--with", "last")
	if !strings.Contains(out, "Most time lost: 1000–1320 ft") {
		t.Errorf("the lift is not where the most time went:\n%s", out)
	}
	c := compareJSONOf(t, "--demo", "2026-04-11 E2", "--with", "best")
	if strings.HasPrefix(c.With, "E3 2026-04-11") {
		t.Errorf("the best is the lifted pass %s", c.With)
	}
}

// A slip without a 330-ft timer says so, and the segments either side of it
// are not compared; the rest are.
func TestLogCompareWithoutThe330(t *testing.T) {
	dir := newFolder(t)
	src := filepath.Join(t.TempDir(), "season.csv")
	writeFile(t, src, season(12)) // no 330 or 1000 ft times
	mustRun(t, "log", "import", "--dir", dir, src)
	out := mustRun(t, "log", "compare", "--dir", dir, "--with", "last")
	if !strings.Contains(out, "no 330-ft time on this slip") {
		t.Errorf("the missing 330 is not said:\n%s", out)
	}
	c := compareJSONOf(t, "--dir", dir, "--with", "last")
	for _, s := range c.Segments {
		missing := s.FromFt == 330 || s.ToFt == 330 || s.FromFt == 1000 || s.ToFt == 1000
		if missing != (s.DiffS == nil) || (missing && !strings.Contains(s.ThisMissing, "-ft time on this slip")) {
			t.Errorf("%v–%v ft: diff %v, missing %q", s.FromFt, s.ToFt, s.DiffS, s.ThisMissing)
		}
	}
}

func TestLogCompareBadInput(t *testing.T) {
	cases := []struct {
		args []string
		want []string
	}{
		{[]string{"--with", "E9"}, []string{"--with", `"E9"`, "best, last"}},
		{[]string{"X1"}, []string{"PASS", `"X1"`, "T1, E2, test"}},
		{[]string{"2026-01-01"}, []string{"PASS", "matches no logged pass"}},
		{[]string{"--format", "csv"}, []string{"--format", "text, markdown, json"}},
	}
	for _, tc := range cases {
		t.Run(strings.Join(tc.args, " "), func(t *testing.T) {
			_, errs, code := pitcard(t, append([]string{"log", "compare", "--demo"}, tc.args...)...)
			if code != 2 {
				t.Errorf("exit %d, want 2: %s", code, errs)
			}
			for _, w := range tc.want {
				if !strings.Contains(errs, w) {
					t.Errorf("error lacks %q: %s", w, errs)
				}
			}
		})
	}
}
