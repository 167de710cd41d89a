package pitpage

import (
	"path/filepath"
	"strings"
	"testing"

	"pitcard/internal/biglog"
)

// bigFixture is the pit page over a copy of the demo whose logbook holds n
// passes (the demo's, and copies shifted back in time).
func bigFixture(b *testing.B, n int) *fixture {
	b.Helper()
	f := newFixture(b)
	if err := biglog.Grow(filepath.Join(f.dir, "logbook.csv"), n); err != nil {
		b.Fatal(err)
	}
	return f
}

// BenchmarkCardPage5000 is the card page of a 5,000-pass logbook as a
// phone fetches it: its size in bytes is reported (target: under 40 KB).
// The first fetch makes the card; the loop measures the fetches after it.
func BenchmarkCardPage5000(b *testing.B) {
	f := bigFixture(b, 5000)
	first := f.do("GET", "/", testTokens.Crew, nil)
	if first.Code != 200 || !strings.Contains(first.Body.String(), "<svg") {
		b.Fatalf("the card page: %d, no chart:\n%.2000s", first.Code, first.Body.String())
	}
	size := first.Body.Len()
	for b.Loop() {
		w := f.do("GET", "/", testTokens.Crew, nil)
		if w.Code != 200 {
			b.Fatal(w.Code)
		}
		size = w.Body.Len()
	}
	b.ReportMetric(float64(size), "page-bytes")
}
