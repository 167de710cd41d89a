package event

import (
	"strings"
	"testing"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/logbook"
)

// Invented passes of an invented car: the quickest was lifted, so it is
// not clean and never the best.
func comparePasses() []logbook.Pass {
	mk := func(day, clock, ses, et, notes string) logbook.Pass {
		tm, _ := time.Parse("2006-01-02 15:04", day+" "+clock)
		s, _ := logbook.ParseSession(ses)
		p := logbook.Pass{Time: tm, Session: s, Notes: notes}
		p.ET[4] = decimal.NewNullDecimal(decimal.RequireFromString(et))
		return p
	}
	return []logbook.Pass{
		mk("2026-05-02", "17:00", "T1", "11.50", ""),
		mk("2026-05-02", "18:00", "E1", "11.40", "lifted early"),
		mk("2026-05-02", "19:00", "E2", "11.45", ""),
		mk("2026-05-09", "17:00", "E1", "11.48", ""),
		mk("2026-05-09", "18:00", "E2", "11.52", ""),
	}
}

func TestPassNamed(t *testing.T) {
	p := comparePasses()
	cases := []struct {
		name string
		want int
	}{
		{"", 4}, {"latest", 4}, {"E1", 3}, {"2026-05-02 E1", 1}, {"e1 2026-05-02", 1},
		{"17:00", 3}, {"2026-05-02 17:00", 0}, {"T1", 0}, {"2", 4},
	}
	for _, tc := range cases {
		if got, err := PassNamed(p, tc.name, "PASS"); err != nil || got != tc.want {
			t.Errorf("%q: %d %v, want %d", tc.name, got, err, tc.want)
		}
	}
	for _, bad := range []string{"E9", "X1", "2026-05-03", "E1 E2", "best"} {
		if _, err := PassNamed(p, bad, "PASS"); err == nil || !strings.Contains(err.Error(), "PASS") || !strings.Contains(err.Error(), bad) {
			t.Errorf("%q: %v", bad, err)
		}
	}
}

func TestComparedWith(t *testing.T) {
	p := comparePasses()
	cases := []struct {
		with string
		i    int
		want int
	}{
		{"best", 4, 2}, // 11.45: the 11.40 was lifted
		{"best", 2, 3}, // the others: 11.48
		{"last", 4, 3}, // the pass logged before
		{"T1", 4, 0},
	}
	for _, tc := range cases {
		if got, err := ComparedWith(p, tc.i, tc.with, "--with", 1320, logbook.DefaultAbortWords); err != nil || got != tc.want {
			t.Errorf("%s for %d: %d %v, want %d", tc.with, tc.i, got, err, tc.want)
		}
	}
	if _, err := ComparedWith(p, 0, "last", "--with", 1320, logbook.DefaultAbortWords); err == nil || !strings.Contains(err.Error(), "--with") {
		t.Errorf("last of the first pass: %v", err)
	}
	if _, err := ComparedWith(p, 4, "quickest", "--with", 1320, logbook.DefaultAbortWords); err == nil || !strings.Contains(err.Error(), "best, last") {
		t.Errorf("an unknown --with: %v", err)
	}
	if _, err := ComparedWith(p[:1], 0, "best", "--with", 1320, logbook.DefaultAbortWords); err == nil {
		t.Error("best with no other pass found one")
	}
}
