package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"sort"
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
	path := filepath.Join(dir, "logbook.csv")
	f, _ := os.Open(path)
	rows, err := csv.NewReader(f).ReadAll()
	f.Close()
	if err != nil {
		b.Fatal(err)
	}
	head, demo := rows[0], rows[1:]
	seen := map[string]bool{}
	var extra [][]string
	for c := 1; len(extra) < n-len(demo); c++ {
		for _, r := range demo {
			t, _ := time.Parse("2006-01-02 15:04", r[0]+" "+r[1])
			t = t.Add(-time.Duration(c) * (80*time.Hour + 37*time.Minute))
			key := t.Format("2006-01-02 15:04") + r[2] + r[4]
			if seen[key] || len(extra) >= n-len(demo) {
				continue
			}
			seen[key] = true
			x := append([]string(nil), r...)
			x[0], x[1] = t.Format("2006-01-02"), t.Format("15:04")
			extra = append(extra, x)
		}
	}
	sort.Slice(extra, func(i, j int) bool { return extra[i][0]+extra[i][1] < extra[j][0]+extra[j][1] })
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	_ = w.Write(head)
	_ = w.WriteAll(append(extra, demo...))
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		b.Fatal(err)
	}
	return dir
}

// The whole card from a 100,000-pass logbook: reading and checking every
// row, the fit, the prediction, the rules, the render. Target: 1 s.
func BenchmarkCard100000Passes(b *testing.B) {
	dir := bigFolder(b, 100000)
	for b.Loop() {
		var out, errb bytes.Buffer
		s := &IOStreams{In: strings.NewReader(""), Out: &out, Err: &errb, Now: func() time.Time { return fixedNow }}
		if code := run([]string{"card", "--dir", dir, "--round", "3", "--lane", "left"}, s); code != 0 {
			b.Fatal(fmt.Sprint(code, errb.String()))
		}
	}
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
