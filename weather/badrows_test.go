package weather

import (
	"errors"
	"strings"
	"testing"
	"time"
)

// A weather log's rows that cannot be read are named, each at its line, and
// the rest are read: one bad row costs that row, not the day's log.
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
