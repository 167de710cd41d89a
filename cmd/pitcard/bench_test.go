package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"pitcard/internal/biglog"
	"strings"
	"testing"
	"time"
)

// bigFolder is a copy of the demo whose logbook holds n passes: the demo's
// own, and copies of them shifted back in time (each to a minute of its own).
func bigFolder(b *testing.B, n int) string {
	b.Helper()
	dir := filepath.Join(b.TempDir(), "big")
	var out, errb bytes.Buffer
	if code := run([]string{"init", "--demo", dir}, &IOStreams{In: strings.NewReader(""), Out: &out, Err: &errb, Now: time.Now}); code != 0 {
		b.Fatal(errb.String())
	}
	if err := biglog.Grow(filepath.Join(dir, "logbook.csv"), n); err != nil {
		b.Fatal(err)
	}
	return dir
}

// The whole card from a 100,000-pass logbook: reading and checking every
// row, the fit, the prediction, the rules, the render. Target: 0.5 s, and
// a peak heap (reported) under 80 MB.
func BenchmarkCard100000Passes(b *testing.B) {
	dir := bigFolder(b, 100000)
	benchLoop(b, "card", "--dir", dir, "--round", "3", "--lane", "left")
}

// BenchmarkLogStatsLast100At100000 is 'pitcard log stats --last 100' of a
// 100,000-pass logbook: the fit on the latest passes, the air taken out of
// the last 100 only.
func BenchmarkLogStatsLast100At100000(b *testing.B) {
	dir := bigFolder(b, 100000)
	benchLoop(b, "log", "stats", "--last", "100", "--dir", dir)
}

// BenchmarkLogDiff300000 is 'pitcard log diff' of a 300,000-pass logbook
// against a copy with 10 passes changed; its peak heap is reported
// (target: the process under 200 MB).
func BenchmarkLogDiff300000(b *testing.B) {
	dir := bigFolder(b, 300000)
	data, err := os.ReadFile(filepath.Join(dir, "logbook.csv"))
	if err != nil {
		b.Fatal(err)
	}
	lines := bytes.Split(data, []byte("\n"))
	for i := 1; i <= 10; i++ { // another 60-ft time (the 8th column)
		f := bytes.Split(lines[i*1000], []byte(","))
		f[7] = []byte("1.999")
		lines[i*1000] = bytes.Join(f, []byte(","))
	}
	theirs := filepath.Join(b.TempDir(), "theirs.csv")
	writeBench(b, theirs, bytes.Join(lines, []byte("\n")))
	data, lines = nil, nil
	out := benchLoop(b, "log", "diff", theirs, "--dir", dir)
	if !strings.Contains(out, "299990 passes alike in both, 10 conflicts") {
		b.Fatalf("diff said:\n%.500s", out)
	}
}

// benchLoop runs the command args in a loop and reports the peak heap of
// the runs (MB); it returns the last run's output.
func benchLoop(b *testing.B, args ...string) string {
	b.Helper()
	var peak uint64
	var out bytes.Buffer
	for b.Loop() {
		var errb bytes.Buffer
		out.Reset()
		s := &IOStreams{In: strings.NewReader(""), Out: &out, Err: &errb, Now: func() time.Time { return fixedNow }}
		stop := biglog.WatchHeap()
		code := run(args, s)
		peak = max(peak, stop())
		if code != 0 {
			b.Fatal(fmt.Sprint(code, errb.String()))
		}
	}
	b.ReportMetric(float64(peak)/(1<<20), "peak-heap-MB")
	return out.String()
}

// BenchmarkLogImport100000Mapped is the whole 'pitcard log import FILE --map
// MAP' of a 100,000-row season spreadsheet (the example map's layout) into
// an empty logbook: translated, every row checked, merged, written.
func BenchmarkLogImport100000Mapped(b *testing.B) {
	src := bigFolder(b, 100000)
	sheet := filepath.Join(b.TempDir(), "season.csv")
	var out, errb bytes.Buffer
	s := &IOStreams{In: strings.NewReader(""), Out: &out, Err: &errb, Now: time.Now}
	if code := run([]string{"log", "export", "--map", "../../colmap/testdata/spreadsheet-map.yaml", "--out", sheet, "--dir", src}, s); code != 0 {
		b.Fatal(errb.String())
	}
	b.ResetTimer()
	for i := range b.N {
		b.StopTimer()
		dir := filepath.Join(b.TempDir(), fmt.Sprint("empty", i))
		if code := run([]string{"init", dir}, s); code != 0 {
			b.Fatal(errb.String())
		}
		b.StartTimer()
		if code := run([]string{"log", "import", sheet, "--map", "../../colmap/testdata/spreadsheet-map.yaml", "--dir", dir}, s); code != 0 {
			b.Fatal(errb.String())
		}
	}
}
