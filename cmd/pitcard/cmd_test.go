package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/spf13/cobra"
)

// fixedNow is the clock of every command test: a Saturday evening.
var fixedNow = time.Date(2026, 6, 13, 20, 40, 0, 0, time.Local)

// pitcard runs one command line in-process and returns stdout, stderr and the
// exit code.
func pitcard(t *testing.T, args ...string) (string, string, int) {
	t.Helper()
	var out, errb bytes.Buffer
	s := &IOStreams{In: strings.NewReader(""), Out: &out, Err: &errb, Now: func() time.Time { return fixedNow }}
	code := run(args, s)
	return out.String(), errb.String(), code
}

func mustRun(t *testing.T, args ...string) string {
	t.Helper()
	out, errs, code := pitcard(t, args...)
	if code != 0 {
		t.Fatalf("pitcard %s: exit %d\n%s", strings.Join(args, " "), code, errs)
	}
	return out
}

func newFolder(t *testing.T) string {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "ev")
	mustRun(t, "init", dir)
	return dir
}

func TestAirDemo(t *testing.T) {
	out := mustRun(t, "air", "--demo")
	for _, w := range []string{"Juniper Bend Raceway", "Density altitude", "CF SAE J1349", "Track temperature"} {
		if !strings.Contains(out, w) {
			t.Errorf("air --demo lacks %q:\n%s", w, out)
		}
	}
	md := mustRun(t, "air", "--demo", "--format", "markdown")
	if !strings.Contains(md, "| Density altitude |") {
		t.Errorf("markdown:\n%s", md)
	}
}

// The JSON keys are a documented interface (README); every one must be there.
func TestAirJSONKeys(t *testing.T) {
	out := mustRun(t, "air", "--temp", "88F", "--baro", "28.92inHg", "--humidity", "40%", "--elevation", "1850ft", "--format", "json")
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"density_altitude_ft", "pressure_altitude_ft", "air_density_kg_m3",
		"relative_air_density_pct", "vapor_pressure_hpa", "dew_point_f", "grains_per_lb", "cf_sae_j1349",
		"cf_sae_j1349_2004", "cf_std", "cf_din70020", "virtual_temp_f", "station_pressure_inhg"} {
		if _, ok := m[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	if got := m["station_pressure_inhg"].(float64); got != 28.92 {
		t.Errorf("station pressure %v", got)
	}
}

// An altimeter setting is turned into station pressure at the track's
// elevation (NWS formula, checked in the weather package).
func TestAirAltimeterKind(t *testing.T) {
	out := mustRun(t, "air", "--temp", "70F", "--baro", "29.92inHg", "--baro-kind", "altimeter", "--humidity", "0", "--elevation", "5280ft", "--format", "json")
	var m map[string]float64
	_ = json.Unmarshal([]byte(out), &m)
	// U.S. Standard Atmosphere 1976: pressure at 5280 ft (1609 m) ≈ 834.4 hPa = 24.64 inHg.
	if math.Abs(m["station_pressure_inhg"]-24.64) > 0.02 {
		t.Errorf("station pressure %v, want 24.64 (USSA 1976 at 5280 ft)", m["station_pressure_inhg"])
	}
}

func TestSettingsPrecedence(t *testing.T) {
	dir := newFolder(t)
	if err := os.WriteFile(filepath.Join(dir, "pitcard.yaml"), []byte("units: metric\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	tempF := func(args ...string) float64 {
		out := mustRun(t, append([]string{"air", "--dir", dir, "--temp", "30", "--baro", "980hPa", "--humidity", "40", "--format", "json"}, args...)...)
		var m map[string]any
		_ = json.Unmarshal([]byte(out), &m)
		return m["temp_f"].(float64)
	}
	if got := tempF(); got != 86 {
		t.Errorf("pitcard.yaml metric: 30 read as %v °F, want 86", got)
	}
	t.Setenv("PITCARD_UNITS", "imperial")
	if got := tempF(); got != 30 {
		t.Errorf("env imperial over pitcard.yaml: 30 read as %v °F", got)
	}
	if got := tempF("--units", "metric"); got != 86 {
		t.Errorf("flag metric over env: 30 read as %v °F", got)
	}
}

func TestBadInputExitsTwo(t *testing.T) {
	dir := newFolder(t)
	bad := filepath.Join(t.TempDir(), "bad")
	_ = os.MkdirAll(bad, 0o755)
	_ = os.WriteFile(filepath.Join(bad, "pitcard.yaml"), []byte("units: metric\ndial_stepp: 0.01\n"), 0o644)
	cases := []struct {
		args []string
		want []string
	}{
		{[]string{"air", "--temp", "150F", "--baro", "28.9", "--humidity", "40", "--elevation", "900ft"}, []string{"--temp", "150 °F", "-40..140 °F"}},
		{[]string{"air", "--temp", "88K", "--baro", "28.9", "--humidity", "40", "--elevation", "900ft"}, []string{"--temp", "88K", "F or C"}},
		{[]string{"air", "--temp", "88", "--baro", "33", "--humidity", "40", "--elevation", "900ft"}, []string{"--baro", "15..32.5 inHg"}},
		{[]string{"air", "--temp", "88", "--baro", "28.9", "--humidity", "140", "--elevation", "900ft"}, []string{"--humidity", "0..100 %"}},
		{[]string{"air", "--temp", "88", "--baro", "28.9", "--dewpoint", "95F", "--elevation", "900ft"}, []string{"--dewpoint", "above the air temperature"}},
		{[]string{"air", "--temp", "88", "--baro", "28.9", "--humidity", "40", "--elevation", "16000ft"}, []string{"--elevation", "-1500..15000 ft"}},
		{[]string{"air", "--temp", "88", "--baro", "28.9", "--humidity", "40", "--elevation", "900ft", "--wind", "70mph"}, []string{"--wind", "0..60 mph"}},
		{[]string{"air", "--temp", "88", "--baro", "28.9", "--humidity", "40", "--elevation", "900ft", "--track-temp", "230F"}, []string{"--track-temp", "-20..200 °F"}},
		{[]string{"air", "--temp", "88", "--baro", "28.9", "--humidity", "40", "--elevation", "900ft", "--format", "xml"}, []string{"--format", "xml"}},
		{[]string{"air", "--temp", "88", "--elevation", "900ft"}, []string{"--baro", "required"}},
		{[]string{"air", "--tmep", "88"}, []string{"unknown flag", "--tmep"}},
		{[]string{"air", "--dir", bad, "--temp", "88"}, []string{"pitcard.yaml line 2", "dial_stepp", "not a pitcard setting"}},
		{[]string{"air", "--dir", filepath.Join(dir, "nope"), "--latest"}, []string{"does not exist", "pitcard init"}},
		{[]string{"weather", "add", "--demo", "--temp", "88", "--baro", "28.9", "--humidity", "4"}, []string{"read-only"}},
		{[]string{"weather", "forecast", "--dir", dir}, []string{"--at is required"}},
		{[]string{"weather", "forecast", "--dir", dir, "--at", "21:00"}, []string{"no readings"}},
		{[]string{"init", dir}, []string{"never overwrites", "car.yaml"}},
	}
	for _, tc := range cases {
		_, errs, code := pitcard(t, tc.args...)
		if code != 2 {
			t.Errorf("pitcard %s: exit %d, want 2 (%s)", strings.Join(tc.args, " "), code, errs)
		}
		for _, w := range tc.want {
			if !strings.Contains(errs, w) {
				t.Errorf("pitcard %s: %q lacks %q", strings.Join(tc.args, " "), errs, w)
			}
		}
		if strings.Contains(errs, "goroutine") || strings.Contains(errs, "panic") {
			t.Errorf("stack trace reached the user: %s", errs)
		}
	}
}

func TestWeatherLogFlow(t *testing.T) {
	dir := newFolder(t)
	for i, temp := range []string{"91F", "89F", "87F", "85F"} {
		clock := time.Date(2026, 6, 13, 18, 15*i, 0, 0, time.Local).Format("15:04")
		mustRun(t, "weather", "add", "--dir", dir, "--time", clock, "--temp", temp, "--baro", "28.95inHg",
			"--humidity", "40%", "--track-temp", "120F", "--wind", "5", "--wind-from", "SW")
	}
	path := filepath.Join(dir, "weather.csv")
	before, _ := os.ReadFile(path)
	// a bad reading is refused and nothing is written
	if _, _, code := pitcard(t, "weather", "add", "--dir", dir, "--time", "19:00", "--temp", "190F", "--baro", "28.95", "--humidity", "40"); code != 2 {
		t.Fatalf("bad reading: exit %d", code)
	}
	if after, _ := os.ReadFile(path); !bytes.Equal(before, after) {
		t.Fatal("a refused reading changed weather.csv")
	}
	if _, errs, code := pitcard(t, "weather", "add", "--dir", dir, "--time", "18:15", "--temp", "88F", "--baro", "28.95", "--humidity", "40"); code != 2 || !strings.Contains(errs, "already has a reading at") {
		t.Errorf("duplicate time: exit %d %s", code, errs)
	}
	if _, err := os.Stat(path + ".bak"); err != nil {
		t.Errorf("no weather.csv.bak kept: %v", err)
	}
	list := mustRun(t, "weather", "list", "--dir", dir)
	if strings.Count(list, "°F") < 4 || !strings.Contains(list, "5 mph from 225°") {
		t.Errorf("list:\n%s", list)
	}
	out := mustRun(t, "weather", "forecast", "--dir", dir, "--at", "19:45", "--format", "json")
	var f struct {
		ReadingsUsed int     `json:"readings_used"`
		TrendMinutes float64 `json:"trend_minutes"`
		Trusted      bool    `json:"trusted"`
		Air          struct {
			TempF float64 `json:"temp_f"`
		} `json:"air"`
	}
	if err := json.Unmarshal([]byte(out), &f); err != nil {
		t.Fatal(err)
	}
	// the log cools 2 °F every 15 min: 18:45 85 °F → 19:45 77 °F; an hour
	// ahead on 45 min of trend is not trusted
	if f.ReadingsUsed != 4 || f.TrendMinutes != 45 || f.Trusted || math.Abs(f.Air.TempF-77) > 0.05 {
		t.Errorf("forecast %+v", f)
	}
	// 45 min ahead on 45 min of trend is: 79 °F at 19:30
	_ = json.Unmarshal([]byte(mustRun(t, "weather", "forecast", "--dir", dir, "--at", "19:30", "--format", "json")), &f)
	if !f.Trusted || math.Abs(f.Air.TempF-79) > 0.05 {
		t.Errorf("forecast at 19:30 %+v", f)
	}
	if _, errs, code := pitcard(t, "weather", "forecast", "--dir", dir, "--at", "22:00"); code != 2 || !strings.Contains(errs, "at most 3 h") {
		t.Errorf("far forecast: exit %d %s", code, errs)
	}
	latest := mustRun(t, "air", "--dir", dir, "--latest", "--track-temp", "110F", "--format", "json")
	if !strings.Contains(latest, `"track_temp_f": 110`) || !strings.Contains(latest, `"temp_f": 85`) {
		t.Errorf("--latest with a flag override:\n%s", latest)
	}
}

// A station figure that looks like a sea-level one gets a warning, not an
// error, while it is possible at the elevation (1500 ft); where it is not
// (4300 ft: beyond weather.StationMargin) it is refused.
func TestPressureKindWarningReachesTheUser(t *testing.T) {
	_, errs, code := pitcard(t, "air", "--temp", "80F", "--baro", "29.95inHg", "--humidity", "30", "--elevation", "1500ft")
	if code != 0 || !strings.Contains(errs, "looks like an altimeter") {
		t.Errorf("exit %d, stderr %q", code, errs)
	}
	_, errs, code = pitcard(t, "air", "--temp", "80F", "--baro", "29.95inHg", "--humidity", "30", "--elevation", "4300ft")
	if code != exitBadInput || !strings.Contains(errs, "--baro-kind altimeter") {
		t.Errorf("exit %d, stderr %q", code, errs)
	}
}

func TestInitDemoAndVersion(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "demo")
	mustRun(t, "init", "--demo", dir)
	out := mustRun(t, "air", "--dir", dir, "--latest")
	if !strings.Contains(out, "Juniper Bend Raceway") {
		t.Errorf("demo copy:\n%s", out)
	}
	if v := mustRun(t, "version"); !strings.HasPrefix(v, "pitcard ") {
		t.Errorf("version %q", v)
	}
}

// Every command says what it is for in one line and shows a worked example.
func TestEveryCommandHasHelp(t *testing.T) {
	root := newRootCmd(&IOStreams{In: strings.NewReader(""), Out: &bytes.Buffer{}, Err: &bytes.Buffer{}, Now: func() time.Time { return fixedNow }})
	var walk func(c *cobra.Command)
	walk = func(c *cobra.Command) {
		for _, sub := range c.Commands() {
			if sub.Name() == "help" || sub.Name() == "completion" || sub.Hidden {
				continue
			}
			if sub.Short == "" || strings.Contains(sub.Short, "\n") {
				t.Errorf("%s: no one-line purpose", sub.CommandPath())
			}
			if sub.Example == "" {
				t.Errorf("%s: no example", sub.CommandPath())
			}
			walk(sub)
		}
	}
	walk(root)
	if out := mustRun(t, "completion", "bash"); !strings.Contains(out, "bash completion") {
		t.Error("no bash completion")
	}
}
