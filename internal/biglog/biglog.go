// Package biglog makes long logbooks for pitcard's benchmarks: a logbook's
// own rows, and copies of them shifted back in time until it holds n
// passes, as a team's archive of many seasons would. Only benchmarks use
// it; the passes are the demo's invented car's.
//
// It does not check the rows it copies: the readers under benchmark do.
package biglog

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"os"
	"runtime"
	"sort"
	"time"
)

// Step is how far back each copy of the rows is shifted: 80 h 37 min, so
// that no copy lands on another's minute for long.
const Step = 80*time.Hour + 37*time.Minute

// Grow rewrites the logbook at path to hold n passes: its own, and copies
// of them shifted back by one Step more for each copy, every pass at a
// minute, track and lane of its own, in time order. A logbook holding n or
// more passes already is left as it is.
func Grow(path string, n int) error {
	data, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	out, err := Rows(data, n)
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	return os.WriteFile(path, out, 0o644)
}

// Rows is the CSV of Grow: the logbook data (header and rows, date and
// time its first two columns, track its third and lane its fifth) grown to
// n passes.
func Rows(data []byte, n int) ([]byte, error) {
	rows, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		return nil, err
	}
	if len(rows) < 2 {
		return nil, fmt.Errorf("no passes to copy")
	}
	head, own := rows[0], rows[1:]
	if len(head) < 5 || head[0] != "date" || head[1] != "time" {
		return nil, fmt.Errorf("header %q is not a logbook's (date, time, track, session, lane ...)", head)
	}
	if len(own) >= n {
		return data, nil
	}
	seen := map[string]bool{}
	extra := make([][]string, 0, n-len(own))
	for c := 1; len(extra) < n-len(own); c++ {
		for _, r := range own {
			t, err := time.Parse("2006-01-02 15:04", r[0]+" "+r[1])
			if err != nil {
				return nil, fmt.Errorf("date %q time %q: %v", r[0], r[1], err)
			}
			t = t.Add(-time.Duration(c) * Step)
			key := t.Format("2006-01-02 15:04") + "|" + r[2] + "|" + r[4]
			if seen[key] || len(extra) >= n-len(own) {
				continue
			}
			seen[key] = true
			x := append([]string(nil), r...)
			x[0], x[1] = t.Format("2006-01-02"), t.Format("15:04")
			extra = append(extra, x)
		}
	}
	// One time order over the copies and the logbook's own rows, as
	// pitcard keeps a logbook (a copy of a late pass lands among the
	// logbook's own earlier rows).
	all := append(extra, own...)
	sort.SliceStable(all, func(i, j int) bool { return all[i][0]+all[i][1] < all[j][0]+all[j][1] })
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	_ = w.Write(head)
	_ = w.WriteAll(all)
	return buf.Bytes(), w.Error()
}

// WatchHeap samples the Go heap in use every 20 ms until the returned stop
// is called, which gives the most seen (bytes): a benchmark's peak memory.
// Sampling stops the world briefly, so it is coarse on purpose.
func WatchHeap() (stop func() uint64) {
	runtime.GC()
	done, finished := make(chan struct{}), make(chan struct{})
	var peak uint64
	go func() {
		defer close(finished)
		t := time.NewTicker(20 * time.Millisecond)
		defer t.Stop()
		var m runtime.MemStats
		for {
			runtime.ReadMemStats(&m)
			peak = max(peak, m.HeapInuse)
			select {
			case <-done:
				return
			case <-t.C:
			}
		}
	}()
	return func() uint64 {
		close(done)
		<-finished
		return peak
	}
}
