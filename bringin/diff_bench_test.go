package bringin

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
	"time"

	"pitcard/event"
	"pitcard/internal/biglog"
)

// BenchmarkDiffLogbook300000 is 'log diff' of a 300,000-pass logbook
// against a crewmate's copy with 10 passes changed: both read a block at a
// time. It reports the heap's peak over the comparison (sampled every 20
// ms; target: under 200 MB for the whole process).
func BenchmarkDiffLogbook300000(b *testing.B) {
	dir := b.TempDir()
	if _, err := event.Create(dir, true, time.Date(2026, 6, 13, 20, 31, 0, 0, time.Local)); err != nil {
		b.Fatal(err)
	}
	path := filepath.Join(dir, event.LogbookFile)
	if err := biglog.Grow(path, 300000); err != nil {
		b.Fatal(err)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		b.Fatal(err)
	}
	// theirs: ten rows with another 60-ft time (the 8th column)
	lines := bytes.Split(data, []byte("\n"))
	for i := 1; i <= 10; i++ {
		f := bytes.Split(lines[i*1000], []byte(","))
		f[7] = []byte("1.999")
		lines[i*1000] = bytes.Join(f, []byte(","))
	}
	theirs := filepath.Join(b.TempDir(), "theirs.csv")
	if err := os.WriteFile(theirs, bytes.Join(lines, []byte("\n")), 0o644); err != nil {
		b.Fatal(err)
	}
	e, err := event.Open(event.OpenOptions{Dir: dir})
	if err != nil {
		b.Fatal(err)
	}
	data, lines = nil, nil
	var peak uint64
	for b.Loop() {
		stop := biglog.WatchHeap()
		d, err := DiffLogbook(e, Source{Path: theirs})
		peak = max(peak, stop())
		if err != nil || len(d.Conflicts) != 10 || d.Same != 300000-10 {
			b.Fatalf("%v: %d conflicts, %d alike", err, len(d.Conflicts), d.Same)
		}
	}
	b.ReportMetric(float64(peak)/(1<<20), "peak-heap-MB")
}
