package event

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"pitcard/internal/safefile"
	"pitcard/logbook"
	"pitcard/weather"
)

// The append path of SaveLogbook: one new pass later than every logged
// pass, whose columns the file already has, is added at the end of the file
// (locked; written; flushed) instead of the whole logbook being read and
// rewritten, so a slip costs the same in a 1,000-pass logbook as in a
// 100,000-pass one. What it needs to know of the whole file without reading
// it (how many passes, that no row is bad) is kept in a count file beside the
// logbook, .NAME.count, valid only for the file's exact size and time of
// change: a file changed by hand, or by a writer that died before updating
// the count, takes the full rewrite (with its .bak) and the count is set
// again.

// The weather log is appended to the same way (appendReading): a reading
// in a later minute than its last, into a log with a valid count file.

// countFile is the count file of the logbook or weather log at path (its
// link's target).
func countFile(path string) string {
	return filepath.Join(filepath.Dir(path), "."+filepath.Base(path)+".count")
}

// logCount is what the count file knows of a logbook or weather log: its
// good rows (passes, readings) and its bad ones.
type logCount struct {
	size, modNano int64
	passes, bad   int
}

// readCount is the count file's word on the logbook at path, if it still
// holds for the file as it is.
func readCount(path string) (logCount, bool) {
	data, err := os.ReadFile(countFile(path))
	if err != nil {
		return logCount{}, false
	}
	var c logCount
	if n, err := fmt.Sscanf(string(data), "pitcard count 1: size %d changed %d rows %d bad %d\n", &c.size, &c.modNano, &c.passes, &c.bad); err != nil || n != 4 {
		return logCount{}, false
	}
	st, err := os.Stat(path)
	if err != nil || st.Size() != c.size || st.ModTime().UnixNano() != c.modNano {
		return logCount{}, false
	}
	return c, true
}

// writeCount sets the count file for the logbook at path as it now is. It
// is only a shortcut: not written (a full disk) it is found stale, and the
// next write takes the full rewrite.
func writeCount(path string, passes, bad int) {
	st, err := os.Stat(path)
	if err != nil {
		return
	}
	_ = os.WriteFile(countFile(path), fmt.Appendf(nil, "pitcard count 1: size %d changed %d rows %d bad %d\n",
		st.Size(), st.ModTime().UnixNano(), passes, bad), 0o644)
}

// appendPause, set by the crash test, stops an append at its stages.
var appendPause func(stage string)

// appendPass adds p at the end of the logbook at path (resolved, locked by
// the caller) when it can: done is false when the full rewrite must do it
// (no valid count file, rows the last write kept aside, a torn or unread
// last line, p earlier than the last pass, a column the file lacks).
func (e *Folder) appendPass(path, name string, p logbook.Pass, extra []string) (n int, done bool, err error) {
	c, ok := readCount(path)
	if !ok || c.bad > 0 {
		return 0, false, nil
	}
	f, err := os.Open(path)
	if err != nil {
		return 0, false, nil
	}
	defer f.Close()
	var end [1]byte
	if _, err := f.ReadAt(end[:], c.size-1); err != nil || end[0] != '\n' {
		return 0, false, nil // torn or empty: the rewrite
	}
	tail, err := logbook.ReadTail(f, c.size, name, e.Zone(), e.Setup(), p.Time)
	if err != nil || tail == nil || !tail.EndsLine || len(tail.Bad) > 0 || !tail.InOrder {
		return 0, false, nil
	}
	if k := len(tail.Passes); k > 0 && p.Time.Before(tail.Passes[k-1].Time) {
		return 0, false, nil // out of order: the rewrite sorts it in
	}
	lb := logbook.Logbook{Header: tail.Header, Extra: tail.Extra, Passes: []logbook.Pass{p}}
	for _, x := range extra {
		if !slices.Contains(lb.Extra, x) {
			lb.Extra = append(lb.Extra, x)
		}
	}
	header := lb.WriteHeader()
	if !slices.Equal(header, tail.Header) {
		return 0, false, nil // a column to add: the rewrite adds it
	}
	for k := range p.Extra {
		if !slices.Contains(header, k) {
			return 0, false, nil
		}
	}
	for _, o := range tail.Passes {
		if o.Key() == p.Key() {
			if o.Line, err = tail.FileLine(o.Line); err != nil {
				return 0, false, err
			}
			return 0, true, logbook.RowErrors{DuplicateOf(p, o, name)}
		}
	}
	row, err := logbook.AppendRow(p, header)
	if err != nil {
		return 0, false, err
	}
	var opts []safefile.Option
	if appendPause != nil {
		opts = append(opts, safefile.PauseAt(appendPause))
	}
	if err := safefile.Append(path, row, opts...); err != nil {
		return 0, true, err
	}
	writeCount(path, c.passes+1, 0)
	return c.passes + 1, true, nil
}

// appendReading adds r at the end of the weather log at path (resolved,
// locked by the caller) when it can: done is false when the full rewrite
// must do it (no valid count file, a header pitcard does not write, a torn
// or unreadable last line, r not in a later minute than the last reading).
// A later minute than the last reading's is no minute the log has, the log
// being in time order as pitcard writes it; what it does not check is a
// row before the last (the next full read names a bad one).
func (e *Folder) appendReading(path string, r weather.Reading, elev weather.Length) (n int, done bool) {
	c, ok := readCount(path)
	if !ok || c.bad > 0 {
		return 0, false
	}
	f, err := os.Open(path)
	if err != nil {
		return 0, false
	}
	defer f.Close()
	var hb strings.Builder
	cw := csv.NewWriter(&hb)
	cw.Write(weather.LogColumns)
	cw.Flush()
	header := hb.String()
	head := make([]byte, len(header))
	if _, err := f.ReadAt(head, 0); err != nil || string(head) != header || c.size <= int64(len(header)) {
		return 0, false
	}
	start := max(int64(len(header)), c.size-4096)
	buf := make([]byte, c.size-start)
	if _, err := f.ReadAt(buf, start); err != nil || buf[len(buf)-1] != '\n' {
		return 0, false
	}
	rows := buf
	if start > int64(len(header)) {
		i := bytes.IndexByte(buf, '\n')
		rows = buf[i+1:]
	}
	tail, err := weather.ReadLog(io.MultiReader(strings.NewReader(header), bytes.NewReader(rows)), e.Name(WeatherFile), elev, e.Zone())
	if err != nil || len(tail) == 0 {
		return 0, false
	}
	for i := 1; i < len(tail); i++ {
		if tail[i].Time.Before(tail[i-1].Time) {
			return 0, false
		}
	}
	if !tail[len(tail)-1].Time.Truncate(time.Minute).Before(r.Time.Truncate(time.Minute)) {
		return 0, false // the same minute or earlier: the full path refuses, replaces or sorts it in
	}
	var row bytes.Buffer
	if err := weather.WriteLog(&row, []weather.Reading{r}); err != nil {
		return 0, false
	}
	line := row.Bytes()[len(header):]
	if err := safefile.Append(path, line); err != nil {
		return 0, false
	}
	writeCount(path, c.passes+1, 0)
	return c.passes + 1, true
}
