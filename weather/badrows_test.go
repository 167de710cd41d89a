package weather

import (
	"errors"
	"fmt"
	"strings"
	"testing"
	"time"
)

// A weather log's rows that cannot be read are named, each at its line, and
// the rest are read: one bad row costs that row, not the day's log (pitcard's
// own file format, README; common practice (no source) for a logger's file:
// one bad line is the meter's hiccup, not the day).
func TestReadLogSetsBadRowsAside(t *testing.T) {
	log := strings.Join([]string{
		strings.Join(LogColumns, ","),
		"2026-06-13,18:00:00,90,28.90,station,40,,,,,",
		"2026-06-13,18:15:00,abc,28.90,station,40,,,,,",
		"2026-06-13,18:30:00,89,28.91,station,41,,,,,",
		"2026-06-13,18:45:00,88,28.91",
		"2026-06-13,19:00:00,87,28.92,station,42,,,,,",
	}, "\n") + "\n"
	got, err := ReadLog(strings.NewReader(log), "weather.csv", Feet(900), time.UTC)
	var bad *BadReadings
	if !errors.As(err, &bad) || len(bad.Rows) != 2 || len(got) != 3 || bad.Good != 3 {
		t.Fatalf("read %d, err %v", len(got), err)
	}
	msg := err.Error()
	for _, w := range []string{"weather.csv line 3", `temp_f "abc"`, "weather.csv line 5", "has 4 fields"} {
		if !strings.Contains(msg, w) {
			t.Errorf("the message lacks %q:\n%s", w, msg)
		}
	}
	var ie *InputError
	if !errors.As(err, &ie) || ie.Line != 3 {
		t.Errorf("errors.As finds no InputError at line 3: %v", ie)
	}
}

// A station pressure refused at the track's elevation is said in the crew's
// units (a metric crew reads hPa and meters, not inHg and feet). Source of
// the limit: the NWS pressure-altitude formula (REFERENCE.md); 1019 hPa is
// a pressure altitude near −160 ft, far below a 5,200 ft track.
func TestImpossibleStationPressureInTheCrewsUnits(t *testing.T) {
	r := Reading{Temp: Celsius(25), Baro: HPa(1019), BaroKind: StationPressure, RH: 0.3}
	err := r.ValidateIn(Feet(5200), Metric)
	if err == nil || !strings.Contains(err.Error(), "1019.0 hPa") || !strings.Contains(err.Error(), "1585 m") || strings.Contains(err.Error(), "inHg") {
		t.Errorf("metric: %v", err)
	}
}

// A decimal comma is pointed out with the figure to type, and only where
// a comma stands between digits (what a phone's keypad offers in many
// languages; pitcard's own rule, no source).
func TestDecimalCommaIsPointedOut(t *testing.T) {
	for _, tc := range []struct {
		in    string
		comma bool
	}{
		{"82,5F", true}, {"0,9inHg", true}, {"82,", false}, {",5F", false}, {"82,xF", false}, {"82,/F", false}, {"82,:F", false},
	} {
		t.Run(tc.in, func(t *testing.T) {
			_, err := ParseTemperature(tc.in, DegF)
			got := err != nil && strings.Contains(err.Error(), "decimal comma")
			if got != tc.comma {
				t.Errorf("ParseTemperature(%q): %v (a decimal comma: %v)", tc.in, err, tc.comma)
			}
			if tc.comma && !strings.Contains(err.Error(), strings.Replace(tc.in, ",", ".", 1)) {
				t.Errorf("%q: the figure to type is not said: %v", tc.in, err)
			}
		})
	}
}

// The station-pressure limit at its edge, and the figures its message
// gives, worked from the NWS pressure-altitude formula (REFERENCE.md): at a
// 5,200 ft track a station pressure is believable down to a pressure
// altitude of 5,200 − 2,500 = 2,700 ft.
func TestStationPressureLimitAtItsEdge(t *testing.T) {
	h := Feet(5200)
	edge := StationFromPressureAltitude(Feet(5200 - StationMargin))
	ok := Reading{Temp: Fahrenheit(70), Baro: edge - 1, BaroKind: StationPressure, RH: 0.3} // 1 Pa less: a little higher up
	if err := ok.Validate(h); err != nil {
		t.Errorf("just inside the limit (%.3f inHg): %v", ok.Baro.InHg(), err)
	}
	bad := ok
	bad.Baro = InHg(30.10)
	err := bad.Validate(h)
	pa := PressureAltitude(InHg(30.10)).Feet()
	for _, w := range []string{"at 5200 ft", fmt.Sprintf("at most about %.2f inHg", edge.InHg()), fmt.Sprintf("%.0f ft lower", 5200-pa)} {
		if err == nil || !strings.Contains(err.Error(), w) {
			t.Errorf("30.10 inHg at 5,200 ft: %v; want %q", err, w)
		}
	}
	past := ok
	past.Baro = edge + 50 // 50 Pa more: below the limit
	if err := past.Validate(h); err == nil {
		t.Errorf("just past the limit (%.3f inHg) accepted", past.Baro.InHg())
	}
}
