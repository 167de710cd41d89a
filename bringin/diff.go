package bringin

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"slices"
	"strconv"
	"strings"
	"time"

	"pitcard/colmap"
	"pitcard/event"
	"pitcard/logbook"
	"pitcard/weather"
)

// Comparing a crewmate's copy of the logbook with ours ('log diff') without
// holding either: both are read a block of rows at a time, and of each
// pass only where it is and a digest of its values are kept. Ten seasons
// of two copies fit in a few tens of MB.

// diffBlock is how many rows of a logbook are read at a time to be compared.
const diffBlock = 4096

// PassDiff is how another copy's passes compare with our logbook's, kept as
// counts and line numbers (and the passes only it has).
type PassDiff struct {
	New       []logbook.Pass   // theirs, not in ours, in time order
	Same      int              // theirs, in ours with the same values
	Conflicts []event.Conflict // theirs, in ours with another value in some field
	// TheirBad are the rows of the other copy pitcard cannot read (or that
	// repeat a pass of it), left out of the comparison.
	TheirBad logbook.RowErrors
}

// seenPass is what the comparison keeps of a pass: its line in ours and in
// theirs (0: not there) and the digest of its values in ours.
type seenPass struct {
	ours, theirs int32
	digest       [16]byte
}

// digest is a pass's values as logbook.csv writes them, hashed (SHA-256,
// its first 128 bits): two passes have the same digest when, and only
// when, their rows are alike.
func digest(p logbook.Pass) [16]byte {
	h := sha256.New()
	for _, v := range logbook.PassRecord(p) {
		h.Write([]byte(v))
		h.Write([]byte{0})
	}
	var d [16]byte
	copy(d[:], h.Sum(nil))
	return d
}

// DiffLogbook compares the passes of src (a crewmate's logbook, or a file
// through a map) with the folder's logbook, by pass (minute, track, lane)
// and then by every field, as MergePasses does, holding neither. The error
// beside the result is the folder's rows that could not be read
// (*event.LeftOutRows), as event.Folder.Logbook's is; any other error stops
// it.
func DiffLogbook(e *event.Folder, src Source) (*PassDiff, error) {
	return diffLogbook(e, src, diffBlock)
}

func diffLogbook(e *event.Folder, src Source, block int) (*PassDiff, error) {
	keys := newPassKeys()
	seen := map[diffKey]seenPass{}
	// Ours: where each pass is, and its digest.
	var oursBad logbook.RowErrors
	good := 0
	name, err := eachOurs(e, block, func(lb *logbook.Logbook) {
		oursBad = append(oursBad, lb.Bad...)
		for _, p := range lb.Passes {
			k := keys.of(p)
			if first, dup := seen[k]; dup { // the same pass in two blocks: the reader's words
				oursBad = append(oursBad, &weather.InputError{File: e.Name(event.LogbookFile), Line: p.Line, Field: "row",
					Reason: fmt.Sprintf(repeatedPass+"%d (%s, %s lane): entered twice", first.ours, p.Time.Format("2006-01-02 15:04"), p.Lane)})
				continue
			}
			seen[k] = seenPass{ours: int32(p.Line), digest: digest(p)}
			good++
		}
	})
	if err != nil {
		return nil, err
	}
	var leftOut error
	if len(oursBad) > 0 {
		slices.SortStableFunc(oursBad, func(a, b *weather.InputError) int { return a.Line - b.Line })
		leftOut = e.RowsLeftOut(name, oursBad, good)
	}
	// Theirs, against them.
	d := &PassDiff{}
	wanted := map[int32][]int{} // our lines the conflicts need, to the conflicts
	var theirRows [][]string    // each conflict's row in theirs
	err = src.eachBlock(block, func(lb *logbook.Logbook) {
		d.TheirBad = append(d.TheirBad, lb.Bad...)
		for _, p := range lb.Passes {
			k := keys.of(p)
			s, ok := seen[k]
			switch {
			case !ok:
				seen[k] = seenPass{theirs: int32(p.Line)}
				d.New = append(d.New, p)
			case s.theirs != 0: // twice in theirs: the reader's words
				d.TheirBad = append(d.TheirBad, &weather.InputError{File: src.Path, Line: p.Line, Field: "row",
					Reason: fmt.Sprintf(repeatedPass+"%d (%s, %s lane): entered twice", s.theirs, p.Time.Format("2006-01-02 15:04"), p.Lane)})
			default:
				s.theirs = int32(p.Line)
				seen[k] = s
				if digest(p) == s.digest {
					d.Same++
					continue
				}
				wanted[s.ours] = append(wanted[s.ours], len(d.Conflicts))
				row := logbook.PassRecord(p)
				theirRows = append(theirRows, row)
				d.Conflicts = append(d.Conflicts, event.Conflict{What: fmt.Sprintf("pass %s %s lane", p.Time.Format("2006-01-02 15:04"), p.Lane),
					Theirs: strings.Join(row, ","), OursLine: int(s.ours), TheirsLine: p.Line})
			}
		}
	})
	if err != nil {
		return nil, err
	}
	if len(wanted) > 0 { // the rows of ours the conflicts show
		passes, err := oursAt(e, func(line int) bool { return len(wanted[int32(line)]) > 0 })
		if err != nil {
			return nil, err
		}
		for _, p := range passes {
			for _, i := range wanted[int32(p.Line)] {
				c := &d.Conflicts[i]
				ours := logbook.PassRecord(p)
				c.Ours = strings.Join(ours, ",")
				c.Differs = event.Differs(logbook.Columns, ours, theirRows[i])
			}
		}
	}
	logbook.SortPasses(d.New)
	slices.SortStableFunc(d.Conflicts, func(a, b event.Conflict) int { return a.TheirsLine - b.TheirsLine })
	slices.SortStableFunc(d.TheirBad, func(a, b *weather.InputError) int { return a.Line - b.Line })
	return d, leftOut
}

// diffKey is a pass's identity in a comparison (as passKey), its track's
// name (lower case) and lane numbered: 16 bytes.
type diffKey struct {
	minute      int64
	track, lane uint32
}

// passKeys makes passes' keys, numbering tracks (by their names in lower
// case) and lanes as they come.
type passKeys struct{ tracks, lanes map[string]uint32 }

func newPassKeys() passKeys {
	return passKeys{map[string]uint32{}, map[string]uint32{}}
}

func (k passKeys) of(p logbook.Pass) diffKey {
	return diffKey{p.Time.Unix() / 60, number(k.tracks, p.Track, true), number(k.lanes, string(p.Lane), false)}
}

// number is name's number in names, a new one for a name not seen
// (as spelt, or with fold, in lower case).
func number(names map[string]uint32, name string, fold bool) uint32 {
	if n, ok := names[name]; ok {
		return n
	}
	n := uint32(len(names))
	if fold {
		lower := strings.ToLower(name)
		if m, ok := names[lower]; ok {
			n = m
		}
		names[lower] = n
	}
	names[name] = n
	return n
}

// eachOurs reads the folder's logbook a block of rows at a time (none yet:
// no block), and returns its name.
func eachOurs(e *event.Folder, block int, fn func(*logbook.Logbook)) (string, error) {
	f, name, err := e.OpenFile(event.LogbookFile, e.LogbookPath)
	if errors.Is(err, fs.ErrNotExist) {
		return name, nil
	}
	if err != nil {
		return name, err
	}
	defer f.Close()
	return name, eachBlock(f, block, func(data []byte, offset int) error {
		lb, err := logbook.ReadSetup(bytes.NewReader(data), name, e.Zone(), 0, e.Setup())
		if err != nil {
			return err
		}
		moveLines(lb, offset)
		fn(lb)
		return nil
	})
}

// oursAt is the passes of the folder's logbook starting at the lines wanted.
func oursAt(e *event.Folder, wanted func(line int) bool) ([]logbook.Pass, error) {
	f, name, err := e.OpenFile(event.LogbookFile, e.LogbookPath)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, at, err := pickRows(f, wanted)
	if err != nil {
		return nil, err
	}
	lb, err := logbook.ReadSetup(bytes.NewReader(data), name, e.Zone(), 0, e.Setup())
	if err != nil {
		return nil, err
	}
	for i, p := range lb.Passes {
		if p.Line >= 1 && p.Line <= len(at) {
			lb.Passes[i].Line = at[p.Line-1]
		}
	}
	return lb.Passes, nil
}

// eachBlock reads the source's passes a block of rows at a time, at the
// file's own lines.
func (s Source) eachBlock(block int, fn func(*logbook.Logbook)) error {
	data, tr, err := s.read()
	if err != nil {
		return err
	}
	return eachBlock(bytes.NewReader(data), block, func(data []byte, offset int) error {
		lb, err := logbook.ReadSetup(bytes.NewReader(data), s.Path, time.Local, 0, s.Setup)
		if err != nil { // the header's (every block's is the file's), or a failing reader
			if tr != nil {
				return tr.Remap(err)
			}
			return err
		}
		moveLines(lb, offset)
		if tr != nil {
			fixLines(lb, tr)
		}
		fn(lb)
		return nil
	})
}

// moveLines puts a block's passes and bad rows at their lines in the file.
func moveLines(lb *logbook.Logbook, offset int) {
	for i := range lb.Passes {
		lb.Passes[i].Line += offset
	}
	for _, b := range lb.Bad {
		if b.Line > 0 {
			b.Line += offset
		}
		// A pass entered twice in one block names the first's line in the block.
		if after, ok := strings.CutPrefix(b.Reason, repeatedPass); ok {
			num, rest, _ := strings.Cut(after, " ")
			if first, err := strconv.Atoi(num); err == nil {
				b.Reason = fmt.Sprintf("%s%d %s", repeatedPass, first+offset, rest)
			}
		}
	}
}

// repeatedPass begins the reader's words for a pass entered twice, before
// the first's line.
const repeatedPass = "is the same pass as line "

// fixLines puts a translated block's lines at the source file's own.
func fixLines(lb *logbook.Logbook, tr *colmap.Translation) {
	for _, b := range lb.Bad {
		tr.Fix(b)
	}
	for i := range lb.Passes {
		lb.Passes[i].Line = tr.SourceLine(lb.Passes[i].Line)
	}
}

// eachBlock splits the CSV in r into blocks of about block rows, each with
// the file's header (and what comes before it) in front, and gives fn each
// block's bytes and how many lines its rows are below where they are in
// the block. A row is never cut (see scanRows).
func eachBlock(r io.Reader, block int, fn func(data []byte, offset int) error) error {
	var buf bytes.Buffer
	head, headLines := 0, 0
	rows, before, lines := 0, 0, 0 // before: the lines above the block's first row
	flush := func() error {
		if rows == 0 {
			return nil
		}
		err := fn(buf.Bytes(), before-headLines)
		before += lines
		rows, lines = 0, 0
		buf.Truncate(head)
		return err
	}
	err := scanRows(r, func(h []byte, n int) error {
		buf.Write(h)
		head, headLines, before = len(h), n, n
		if !bytes.HasSuffix(h, []byte("\n")) { // the header alone, or nothing
			return fn(h, 0)
		}
		return nil
	}, func(row []byte, _, n int) error {
		buf.Write(row)
		rows, lines = rows+1, lines+n
		if rows >= block {
			return flush()
		}
		return nil
	})
	if err != nil {
		return err
	}
	return flush()
}

// pickRows is the CSV in r with only its header (and what comes before
// it) and the rows starting at the lines wanted, and for each of its lines
// the file's.
func pickRows(r io.Reader, wanted func(line int) bool) ([]byte, []int, error) {
	var buf bytes.Buffer
	var at []int
	err := scanRows(r, func(h []byte, n int) error {
		buf.Write(h)
		for i := range n {
			at = append(at, i+1)
		}
		return nil
	}, func(row []byte, line, n int) error {
		if wanted(line) {
			buf.Write(row)
			for i := range n {
				at = append(at, line+i)
			}
		}
		return nil
	})
	return buf.Bytes(), at, err
}

// scanRows reads the CSV in r a row at a time: head gets the header line
// and what comes before it (blank lines and # comments) with its count of
// whole lines, then row each row's bytes, the line it starts at and its
// count of lines. A row is never cut: a line end inside quotes (a note
// over two lines) is part of its row; a comment line is a row of its own.
func scanRows(r io.Reader, head func(h []byte, lines int) error, row func(b []byte, line, lines int) error) error {
	br := bufio.NewReaderSize(r, 64<<10)
	var h []byte
	n := 0
	for { // the header: the first line neither blank nor a comment
		line, err := br.ReadBytes('\n')
		if err != nil && !errors.Is(err, io.EOF) {
			return err
		}
		h = append(h, line...)
		if bytes.HasSuffix(line, []byte("\n")) {
			n++
		}
		if t := bytes.TrimSpace(line); len(t) > 0 && t[0] != '#' || err != nil {
			break
		}
	}
	if err := head(h, n); err != nil || !bytes.HasSuffix(h, []byte("\n")) {
		return err
	}
	var cur []byte
	start, lines := n+1, 0
	inQuotes := false
	for {
		line, err := br.ReadBytes('\n')
		if err != nil && !errors.Is(err, io.EOF) {
			return err
		}
		if len(line) > 0 {
			if inQuotes || line[0] != '#' { // a comment's quotes are no field's
				if bytes.Count(line, []byte(`"`))%2 == 1 {
					inQuotes = !inQuotes
				}
			}
			cur = append(cur, line...)
			lines++
			if !inQuotes || err != nil {
				if err := row(cur, start, lines); err != nil {
					return err
				}
				start += lines
				cur, lines = cur[:0], 0
			}
		}
		if err != nil {
			if len(cur) > 0 { // an unclosed quote runs to the end: the last row
				return row(cur, start, lines)
			}
			return nil
		}
	}
}
