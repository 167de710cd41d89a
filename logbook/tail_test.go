package logbook

import (
	"bytes"
	"fmt"
	"strings"
	"testing"
	"time"
)

// tailFile is an invented logbook (the Hollow Pines strip, an invented
// track) of n passes, one a day; bad replaces the row of those line
// numbers with a row whose et1320 is not a number.
func tailFile(n int, bad ...int) string {
	var b strings.Builder
	b.WriteString("date,time,track,session,lane,rt,et60,et1320,notes\n")
	start := time.Date(2020, 1, 1, 12, 0, 0, 0, time.UTC)
	for i := range n {
		line := i + 2
		et := fmt.Sprintf("11.%03d", i%900+50)
		for _, x := range bad {
			if x == line {
				et = "eleven"
			}
		}
		fmt.Fprintf(&b, "%s,12:00,Hollow Pines,T1,left,0.0%02d,1.6%02d,%s,\n", start.AddDate(0, 0, i).Format("2006-01-02"), i%50, i%90, et)
	}
	return b.String()
}

// ReadLast reads the same last passes as the whole read, with the file's
// line numbers, and names the bad rows among them only. The window rule is
// pitcard's own (no source).
func TestReadLast(t *testing.T) {
	for _, tc := range []struct {
		name     string
		data     string
		keep     int
		nilWant  bool  // the whole file must be read instead
		badLines []int // named
	}{
		{"short file", tailFile(40), 100, false, nil},
		{"long file", tailFile(3000), 100, false, nil},
		{"window of 2000", tailFile(3000), 2000, false, nil},
		{"a bad row in the window", tailFile(3000, 2990), 100, false, []int{2990}},
		{"a bad row before it is not read", tailFile(3000, 50), 100, false, nil},
		{"out of order", strings.Replace(tailFile(300), "2020-10-2", "2019-10-2", 3), 100, true, nil},
		{"a note across lines", strings.Replace(tailFile(3000), ",\n2028-01-01,", ",\"two\nlines\"\n2028-01-01,", 1), 100, false, nil},
		{"a torn last line", strings.TrimSuffix(tailFile(500), "\n"), 100, false, []int{501}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ReadLast(strings.NewReader(tc.data), int64(len(tc.data)), "logbook.csv", time.UTC, nil, tc.keep)
			if err != nil {
				t.Fatal(err)
			}
			if tc.nilWant {
				if got != nil {
					t.Fatal("read a window of a file out of order")
				}
				return
			}
			if got == nil {
				t.Fatal("no window read")
			}
			whole, err := ReadRecent(strings.NewReader(tc.data), "logbook.csv", time.UTC, tc.keep)
			if err != nil {
				t.Fatal(err)
			}
			if len(got.Passes) != len(whole.Passes) {
				t.Fatalf("%d passes, the whole read keeps %d", len(got.Passes), len(whole.Passes))
			}
			for i := range got.Passes {
				g, w := got.Passes[i], whole.Passes[i]
				if g.Line != w.Line || !g.Time.Equal(w.Time) || !g.ET[4].Decimal.Equal(w.ET[4].Decimal) {
					t.Fatalf("pass %d: line %d %v, the whole read: line %d %v", i, g.Line, g.Time, w.Line, w.Time)
				}
			}
			var lines []int
			for _, b := range got.Bad {
				lines = append(lines, b.Line)
			}
			if fmt.Sprint(lines) != fmt.Sprint(tc.badLines) && !(len(lines) == 0 && len(tc.badLines) == 0) {
				t.Fatalf("bad rows at %v, want %v", lines, tc.badLines)
			}
		})
	}
}

// FuzzReadLast: any file reads from its end without a panic, and a window
// read is in time order and no longer than asked.
func FuzzReadLast(f *testing.F) {
	f.Add([]byte(tailFile(30)), 5)
	f.Add([]byte(tailFile(30, 31)), 3)
	f.Add([]byte("date,time,track,session,lane,et1320\n2026-01-01,12:00,\"a\nb\",T1,left,11.5\n"), 1)
	f.Add([]byte("date,time\n"), 2)
	f.Fuzz(func(t *testing.T, data []byte, keep int) {
		if keep <= 0 || keep > 50 {
			return
		}
		lb, _ := ReadLast(bytes.NewReader(data), int64(len(data)), "logbook.csv", time.UTC, nil, keep)
		if lb == nil {
			return
		}
		if len(lb.Passes) > keep {
			t.Fatalf("%d passes, asked %d", len(lb.Passes), keep)
		}
		for i := 1; i < len(lb.Passes); i++ {
			if lb.Passes[i].Time.Before(lb.Passes[i-1].Time) {
				t.Fatal("passes out of order")
			}
		}
	})
}
