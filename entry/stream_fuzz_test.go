package entry

import (
	"testing"

	"pitcard/event"
)

// FuzzReadingLine: any line of a reading stream is read or refused as an
// input error, never a panic; a line read gives only the keys it has.
func FuzzReadingLine(f *testing.F) {
	for _, s := range []string{`temp=88F baro=28.92inHg humidity=40%`, `temp=80 baro=28.9 time=19:12 notes="fan on"`, `notes="open`, `=`, `temp==`, "temp=1 temp=2", "baro=29.9 x=1"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, line string) {
		nr, err := ParseReadingLine(line)
		if err != nil {
			if !event.IsBadInput(err) {
				t.Fatalf("not an input error: %v", err)
			}
			return
		}
		if nr.Fields.Temp == "" && nr.Fields.Baro == "" {
			t.Fatalf("a line without temp= or baro= was read: %q", line)
		}
	})
}
