package weather

import (
	"errors"
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
