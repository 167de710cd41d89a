package logbook

import (
	"bytes"
	"io"
	"slices"
	"time"
)

// Tail is the end of a logbook file, read from the end: its header and its
// last rows, enough of them to hold every pass from a given minute on. It is
// what an append needs to refuse a duplicate, without reading the file.
type Tail struct {
	Logbook       // Header, Extra and the tail's rows (Passes, Bad)
	EndsLine bool // the file ends with a line end (a row may follow)
	// Whole is true when the tail reaches back to the header: every row of
	// the file was read.
	Whole bool
	// InOrder is true when the tail's passes are in time order in the file,
	// as pitcard writes them (inFileOrder).
	InOrder bool

	r           io.ReaderAt
	rowStart    int64 // the byte where the tail's first row begins
	headerLines int
}

// maxTail is the most ReadTail reads back before it gives up (the caller
// then reads the whole file): far more than a race day's passes.
const maxTail = 1 << 20

// ReadTail reads the end of the logbook file r (size bytes) back to the
// last pass before from's minute, or to the header, or only until a pass
// later than from is read (from is then not the last): Passes are the rows
// from there on. It returns nil (and no error) when the file is not one a
// tail can be read from: empty, no header line, rows longer than maxTail.
// What it does not check: the rows before the tail (a bad row, a pass out
// of time order or a duplicate there is the next full read's to say).
func ReadTail(r io.ReaderAt, size int64, name string, loc *time.Location, setup Setup, from time.Time) (*Tail, error) {
	minute := from.Truncate(time.Minute)
	return readBack(r, size, name, loc, setup, maxTail, func(lb *Logbook) bool {
		n := len(lb.Passes)
		// back to a pass before from's minute, or no further once a pass
		// is later than from (an append is out of the question)
		return n > 0 && (lb.Passes[0].Time.Before(minute) || from.Before(lb.Passes[n-1].Time))
	})
}

// readBack reads the end of the logbook file r (size bytes) in growing
// chunks, up to most bytes, until enough says the rows read suffice or the
// chunk reaches the header; nil when it cannot (see ReadTail).
func readBack(r io.ReaderAt, size int64, name string, loc *time.Location, setup Setup, most int64, enough func(*Logbook) bool) (*Tail, error) {
	if size <= 0 {
		return nil, nil
	}
	head := make([]byte, min(size, 64<<10))
	if _, err := r.ReadAt(head, 0); err != nil && err != io.EOF {
		return nil, err
	}
	nl := bytes.IndexByte(head, '\n')
	if nl < 0 {
		return nil, nil
	}
	header := head[:nl+1]
	hdrEnd := int64(nl + 1)
	var last [1]byte
	if _, err := r.ReadAt(last[:], size-1); err != nil && err != io.EOF {
		return nil, err
	}
	for chunk := int64(16 << 10); ; chunk *= 4 {
		start := max(hdrEnd, size-chunk)
		buf := make([]byte, size-start)
		if _, err := r.ReadAt(buf, start); err != nil && err != io.EOF {
			return nil, err
		}
		rows := buf
		if start > hdrEnd { // begin at a line's start: drop the part line
			i := bytes.IndexByte(buf, '\n')
			if i < 0 {
				return nil, nil
			}
			rows, start = buf[i+1:], start+int64(i+1)
		}
		lb, err := ReadSetup(io.MultiReader(bytes.NewReader(header), bytes.NewReader(rows)), name, loc, 0, setup)
		if err != nil {
			return nil, err
		}
		t := &Tail{Logbook: *lb, EndsLine: last[0] == '\n', Whole: start == hdrEnd, r: r, rowStart: start, headerLines: bytes.Count(header, []byte{'\n'})}
		t.InOrder = inFileOrder(t.Passes)
		if t.Whole || enough(&t.Logbook) {
			return t, nil
		}
		if chunk >= most || start == hdrEnd {
			return nil, nil
		}
	}
}

// ReadLast reads the last keep passes of the logbook file r (size bytes)
// from its end, not the whole file: what a card, a prediction or a dial
// needs from ten seasons. Lines are the file's. It returns nil (read the
// whole file instead) when the end cannot stand for the file: its rows out
// of time order, a row not even CSV, too few rows.
//
// What it no longer checks, unlike ReadRecent: the rows before the window.
// A bad row there is not named, a pass there entered twice is not found,
// and a pass there later than the window's (a file out of time order before
// its last keep rows) is not seen. 'log list', 'log stats' and every
// command that writes the logbook read the whole file and name them.
func ReadLast(r io.ReaderAt, size int64, name string, loc *time.Location, setup Setup, keep int) (*Logbook, error) {
	t, err := readBack(r, size, name, loc, setup, size, func(lb *Logbook) bool {
		return len(lb.Passes) > keep // one row more: the first may be a cut quoted cell
	})
	if err != nil || t == nil || !t.InOrder || !t.Kept() {
		return nil, err
	}
	lb := t.Logbook
	off, err := t.FileLine(0)
	if err != nil {
		return nil, err
	}
	if !t.Whole {
		// the window's first row may be a cell's second line (a quoted cell
		// across lines began before it): it is left out, and said nowhere
		first := t.headerLines + 1
		lb.Passes = slices.DeleteFunc(lb.Passes, func(p Pass) bool { return p.Line == first })
		for i := 0; i < len(lb.Bad); i++ {
			if lb.Bad[i].Line == first {
				lb.Bad = slices.Delete(lb.Bad, i, i+1)
				lb.BadRows = slices.Delete(lb.BadRows, i, i+1)
				i--
			}
		}
	}
	for i := range lb.Passes {
		lb.Passes[i].Line += off
	}
	for _, b := range lb.Bad {
		b.Line += off
	}
	if len(lb.Passes) > keep {
		lb.Passes = slices.Clip(lb.Passes[len(lb.Passes)-keep:])
	}
	return &lb, nil
}

// FileLine is the line in the file of a line of the tail (a pass's Line,
// a bad row's): it counts the line ends before the tail, so it reads the
// file up to there (said only in a message, where that is no matter).
func (t *Tail) FileLine(line int) (int, error) {
	n := 0
	buf := make([]byte, 64<<10)
	for off := int64(0); off < t.rowStart; {
		b := buf[:min(int64(len(buf)), t.rowStart-off)]
		k, err := t.r.ReadAt(b, off)
		n += bytes.Count(b[:k], []byte{'\n'})
		off += int64(k)
		if err != nil && err != io.EOF {
			return 0, err
		}
		if k == 0 {
			break
		}
	}
	return n + line - t.headerLines, nil
}

// inFileOrder reports whether passes (in time order) stand in the file in
// that order, lines rising with time, give or take the hour a clock is set
// back at the end of summer time (01:30 before 01:10 local, an hour
// apart, are in order as the file's local times read).
func inFileOrder(passes []Pass) bool {
	byLine := slices.Clone(passes)
	slices.SortFunc(byLine, func(a, b Pass) int { return a.Line - b.Line })
	for i := 1; i < len(byLine); i++ {
		if byLine[i].Time.Before(byLine[i-1].Time.Add(-time.Hour)) {
			return false
		}
	}
	return true
}
