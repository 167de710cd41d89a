package logbook

import (
	"bytes"
	"encoding/csv"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"testing"
	"time"
	"unsafe"
)

// demoRows is a logbook file of n passes: the demo's rows and copies of
// them shifted back in time, each to a minute of its own.
func demoRows(b *testing.B, n int) []byte {
	b.Helper()
	f, err := os.Open("../event/demo/logbook.csv")
	if err != nil {
		b.Fatal(err)
	}
	rows, err := csv.NewReader(f).ReadAll()
	f.Close()
	if err != nil {
		b.Fatal(err)
	}
	head, demo := rows[0], rows[1:]
	out := append([][]string(nil), demo...)
	for c := 1; len(out) < n; c++ {
		for _, r := range demo {
			if len(out) >= n {
				break
			}
			t, _ := time.Parse("2006-01-02 15:04", r[0]+" "+r[1])
			t = t.Add(-time.Duration(c) * (80*time.Hour + 37*time.Minute))
			x := append([]string(nil), r...)
			x[0], x[1] = t.Format("2006-01-02"), t.Format("15:04")
			out = append(out, x)
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i][0]+out[i][1] < out[j][0]+out[j][1] })
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	_ = w.Write(head)
	_ = w.WriteAll(out)
	return buf.Bytes()
}

// BenchmarkReadLogbook100000 reads a 100,000-pass logbook from a file on
// disk (an *os.File: its size sizes the slice), every row checked. It
// reports the bytes and allocations per pass; a Pass itself is
// unsafe.Sizeof(Pass{}) bytes, its decimals' digits and strings beside it.
func BenchmarkReadLogbook100000(b *testing.B) { benchRead(b, 100000) }

// BenchmarkReadLogbook500 is a season's logbook, read as often as a card.
func BenchmarkReadLogbook500(b *testing.B) { benchRead(b, 500) }

func benchRead(b *testing.B, n int) {
	path := filepath.Join(b.TempDir(), "logbook.csv")
	if err := os.WriteFile(path, demoRows(b, n), 0o644); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		f, err := os.Open(path)
		if err != nil {
			b.Fatal(err)
		}
		lb, err := ReadSetup(f, "logbook.csv", time.UTC, 0, nil)
		f.Close()
		if err != nil || len(lb.Passes) != n || len(lb.Bad) > 0 {
			b.Fatalf("%d passes, %v, %v", len(lb.Passes), err, lb.Bad)
		}
	}
	b.ReportMetric(float64(unsafe.Sizeof(Pass{})), "B/Pass-struct")
	// what a pass costs once read: the heap the logbook keeps alive
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	f, _ := os.Open(path)
	lb, _ := ReadSetup(f, "logbook.csv", time.UTC, 0, nil)
	f.Close()
	runtime.GC()
	runtime.ReadMemStats(&after)
	b.ReportMetric(float64(after.HeapAlloc-before.HeapAlloc)/float64(len(lb.Passes)), "B-kept/pass")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/pass")
	runtime.KeepAlive(lb)
}
