package main

import (
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"
)

func TestPredictJSONShape(t *testing.T) {
	dir := newFolder(t)
	src := filepath.Join(t.TempDir(), "season.csv")
	writeFile(t, src, season(30))
	mustRun(t, "log", "import", "--dir", dir, src)
	out := mustRun(t, "predict", "--dir", dir, "--temp", "84F", "--baro", "28.95inHg", "--humidity", "40%", "--track-temp", "110F", "--format", "json")
	var j struct {
		Timers []map[string]float64 `json:"timers"`
		Traps  []map[string]float64 `json:"traps"`
		Air    map[string]any       `json:"air"`
		Basis  map[string]any       `json:"basis"`
	}
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	if len(j.Timers) != 5 || len(j.Traps) != 2 {
		t.Fatalf("%d timers, %d traps", len(j.Timers), len(j.Traps))
	}
	for i, tm := range j.Timers {
		for _, k := range []string{"distance_ft", "et", "low", "high"} {
			if _, ok := tm[k]; !ok {
				t.Errorf("timer %d lacks %s", i, k)
			}
		}
		if !(tm["low"] < tm["et"] && tm["et"] < tm["high"]) {
			t.Errorf("timer %v: interval does not hold the ET", tm)
		}
	}
	if j.Traps[1]["distance_ft"] != 1320 || j.Traps[1]["mph"] < 100 {
		t.Errorf("traps %v", j.Traps)
	}
	if _, ok := j.Air["density_altitude_ft"]; !ok {
		t.Error("air lacks density_altitude_ft")
	}
	if j.Basis["passes_calibrated"].(float64) < 20 || j.Basis["physics_only"].(bool) {
		t.Errorf("basis %v", j.Basis)
	}
	// The invented season runs 11.46..11.54 at 80–89 °F; the prediction lands near it.
	if et := j.Timers[4]["et"]; et < 11.3 || et > 11.7 {
		t.Errorf("finish %.3f", et)
	}
	text := mustRun(t, "predict", "--dir", dir, "--temp", "84F", "--baro", "28.95inHg", "--humidity", "40%")
	for _, w := range []string{"1/4 mile", "95 % interval", "1000 ft of density altitude from the barometer alone", "It leans most on", "Track temperature not read", "No logged times at 330 ft"} {
		if !strings.Contains(text, w) {
			t.Errorf("text lacks %q:\n%s", w, text)
		}
	}
}

func TestPredictBadInput(t *testing.T) {
	dir := newFolder(t)
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"--temp", "84F", "--baro", "28.9", "--humidity", "40", "--prep", "wet"}, "--prep"},
		{[]string{"--temp", "84F", "--baro", "28.9", "--humidity", "40", "--weight", "90"}, "--weight"},
		{[]string{"--latest"}, "no readings"},
		{[]string{"--latest", "--at", "21:00"}, "not both"},
		{[]string{"--temp", "84F", "--baro", "28.9", "--humidity", "40", "--car", filepath.Join(dir, "nope.yaml")}, "cannot read"},
	}
	for _, tc := range cases {
		_, errs, code := pitcard(t, append([]string{"predict", "--dir", dir}, tc.args...)...)
		if code != 2 || !strings.Contains(errs, tc.want) {
			t.Errorf("%v: exit %d %q, want %q", tc.args, code, errs, tc.want)
		}
	}
}
