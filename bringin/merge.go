package bringin

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"slices"
	"strings"
	"time"

	"pitcard/colmap"
	"pitcard/event"
	"pitcard/internal/safefile"
	"pitcard/internal/text"
	"pitcard/logbook"
	"pitcard/weather"
)

// Bringing files in: pitcard's own CSV, another layout through a column map
// (colmap), or a crewmate's copy of the folder's files; and what such a
// file has that the folder lacks.

// Source is a file to bring in and how to read it.
type Source struct {
	Path string
	Data []byte      // the file's bytes when already read (nil: read Path)
	Map  *colmap.Map // nil: pitcard's own columns
	// Setup types the file's columns of car.yaml's setup items, as the
	// folder's logbook is typed (nil: none).
	Setup logbook.Setup
}

// read reads a source file: its bytes, translated through its map
// when it has one (Translation is then set, to point errors at the file's
// own lines).
func (s Source) read() ([]byte, *colmap.Translation, error) {
	data := s.Data
	if data == nil {
		var err error
		if data, err = ReadSourceFile(s.Path); err != nil {
			return nil, nil, err
		}
	}
	if s.Map == nil {
		return data, nil, nil
	}
	tr, err := s.Map.Translate(data, s.Path)
	if err != nil {
		return nil, nil, err
	}
	return tr.CSV, tr, nil
}

// ReadSourceFile reads a file to bring in: a binary file (a spreadsheet's
// own format, a photo) is refused without its bytes being printed, and its
// line ends are made LF (an old spreadsheet ends lines with a bare CR).
func ReadSourceFile(path string) ([]byte, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, event.BadInputf("cannot read %s: %v", path, errors.Unwrap(err))
	}
	if at := binaryAt(data); at >= 0 {
		return nil, event.BadInputf("%s is not a text (CSV) file: byte %d is binary data; save it from the spreadsheet as CSV", path, at+1)
	}
	return weather.LineEnds(data), nil
}

// binaryAt is the offset of the first byte no text file holds (NUL, or a
// control character other than tab, CR, LF and form feed) in data's first
// 64 KB, or -1. Text in any 8-bit encoding passes.
func binaryAt(data []byte) int {
	for i, b := range data[:min(len(data), 64<<10)] {
		if b < 0x20 && b != '\t' && b != '\n' && b != '\r' && b != '\f' {
			return i
		}
	}
	return -1
}

// OwnLayout reports whether data's header is pitcard's own for kind (so it
// needs no map): the file's own reader takes its header line.
func OwnLayout(data []byte, kind colmap.Kind) bool {
	var head []byte
	for rest := data; len(rest) > 0 && head == nil; {
		var line []byte
		line, rest, _ = bytes.Cut(rest, []byte("\n"))
		if t := bytes.TrimSpace(line); len(t) > 0 && t[0] != '#' {
			head = append(append([]byte(nil), line...), '\n') // the header: comments and blank lines before it pass
		}
	}
	if kind == colmap.Weather {
		_, err := weather.ReadLog(bytes.NewReader(head), "", 0, time.Local)
		return err == nil
	}
	_, err := logbook.ReadFile(bytes.NewReader(head), "", time.Local)
	return err == nil
}

// Passes reads a source file's passes: every row checked; bad rows
// come back in the logbook's Bad, at the file's own lines.
func (s Source) Passes() (*logbook.Logbook, error) {
	data, tr, err := s.read()
	if err != nil {
		return nil, err
	}
	lb, err := logbook.ReadSetup(bytes.NewReader(data), s.Path, time.Local, 0, s.Setup)
	if err != nil {
		if tr != nil {
			return nil, tr.Remap(err)
		}
		return nil, err
	}
	if tr != nil {
		for _, b := range lb.Bad {
			tr.Fix(b)
		}
		for i := range lb.Passes {
			lb.Passes[i].Line = tr.SourceLine(lb.Passes[i].Line)
		}
	}
	return lb, nil
}

// Readings reads a source file's weather readings at elevation elev.
func (s Source) Readings(elev weather.Length) ([]weather.Reading, error) {
	data, tr, err := s.read()
	if err != nil {
		return nil, err
	}
	log, err := weather.ReadLog(bytes.NewReader(data), s.Path, elev, time.Local)
	if err != nil && tr != nil {
		return nil, tr.Remap(err)
	}
	return log, err
}

// PassMerge is what another copy's passes hold against ours.
type PassMerge struct {
	New       []logbook.Pass   // theirs, not in ours
	Same      int              // theirs, already in ours exactly
	Conflicts []event.Conflict // theirs, in ours with another value in some field
	// Logged are theirs that ours has (alike or not): where each is in
	// both, not the passes (a crewmate's copy of ten seasons shares them
	// all).
	Logged []Logged
}

// Logged is one of another copy's passes that ours has: its index in the
// passes compared, and the line of ours (of theirs, when the copy holds
// the pass twice and ours not at all).
type Logged struct {
	Index    int
	OursLine int
}

// passKey is a pass's identity: its minute, track (lower case) and lane.
type passKey struct {
	minute      int64
	track, lane string
}

// MergePasses compares other's passes with ours, by pass (date, time, track,
// lane) and then by every field. It keeps the new passes, the conflicts and
// where the shared ones are; not a copy of either logbook.
func MergePasses(ours, other []logbook.Pass) PassMerge {
	var m PassMerge
	if len(ours) == 0 { // a first import: the file's own duplicates are its reader's to find
		m.New = other
		return m
	}
	lower := map[string]string{} // each track's name in lower case, made once
	key := func(p logbook.Pass) passKey {
		t, ok := lower[p.Track]
		if !ok {
			t = strings.ToLower(p.Track)
			lower[p.Track] = t
		}
		return passKey{p.Time.Unix() / 60, t, string(p.Lane)}
	}
	// byKey is where each pass is: i ≥ 0 ours[i], i < 0 other[-i-1] (a new
	// pass, so another in other with its key is compared with it).
	byKey := make(map[passKey]int, len(ours))
	for i, p := range ours {
		byKey[key(p)] = i
	}
	for i, p := range other {
		k := key(p)
		j, ok := byKey[k]
		if !ok {
			m.New = append(m.New, p)
			byKey[k] = -i - 1
			continue
		}
		o := &ours[max(j, 0)]
		if j < 0 {
			o = &other[-j-1]
		}
		m.Logged = append(m.Logged, Logged{Index: i, OursLine: o.Line})
		if slices.Equal(logbook.PassRecord(*o), logbook.PassRecord(p)) {
			m.Same++
			continue
		}
		m.Conflicts = append(m.Conflicts, event.Conflict{
			What:    fmt.Sprintf("pass %s %s lane", p.Time.Format("2006-01-02 15:04"), p.Lane),
			Differs: event.Differs(logbook.Columns, logbook.PassRecord(*o), logbook.PassRecord(p)),
			Ours:    strings.Join(logbook.PassRecord(*o), ","), Theirs: strings.Join(logbook.PassRecord(p), ","),
			OursLine: o.Line, TheirsLine: p.Line})
	}
	return m
}

// ReadingMerge is what another copy's readings hold against ours.
type ReadingMerge struct {
	New       []weather.Reading
	Same      int
	Conflicts []event.Conflict
}

// MergeReadings compares other's readings with ours, by minute and then by
// every field.
func MergeReadings(ours, other []weather.Reading) ReadingMerge {
	var m ReadingMerge
	key := func(r weather.Reading) string { return r.Time.Format("2006-01-02 15:04") }
	byKey := make(map[string]int, len(ours))
	for i, r := range ours {
		byKey[key(r)] = i
	}
	for i, r := range other {
		j, ok := byKey[key(r)]
		switch {
		case !ok:
			m.New = append(m.New, r)
			byKey[key(r)] = -1
		case j < 0: // twice in theirs
			m.Same++
		case slices.Equal(weather.Record(ours[j]), weather.Record(r)):
			m.Same++
		default:
			m.Conflicts = append(m.Conflicts, event.Conflict{What: "reading " + key(r),
				Differs: event.Differs(weather.LogColumns, weather.Record(ours[j]), weather.Record(r)),
				Ours:    strings.Join(weather.Record(ours[j]), ","), Theirs: strings.Join(weather.Record(r), ","),
				OursLine: j + 2, TheirsLine: i + 2})
		}
	}
	return m
}

// Imported is what ImportReadings did.
type Imported struct {
	Added   int // readings added to the weather log
	Skipped int // readings the log had already, left out (--skip-existing)
	Total   int // readings the log holds after the import
}

// ImportReadings adds readings to the weather log under its lock, all or
// nothing: a reading in a minute the log has is refused (with skipExisting,
// skipped when equal and a conflict when not). It returns how many were
// added and skipped, and how many the log holds.
func ImportReadings(e *event.Folder, add []weather.Reading, from string, elev weather.Length, skipExisting bool) (Imported, error) {
	if err := e.Writable(); err != nil {
		return Imported{}, err
	}
	path := e.Path(event.WeatherFile)
	unlock, err := safefile.Lock(path)
	if err != nil {
		return Imported{}, err
	}
	defer unlock()
	log, err := e.WeatherLog(elev)
	if err != nil {
		return Imported{}, err
	}
	m := MergeReadings(log, add)
	if len(m.Conflicts) > 0 {
		return Imported{}, &event.Conflicts{List: m.Conflicts, Ours: e.Name(event.WeatherFile), TheirsIn: from}
	}
	if m.Same > 0 && !skipExisting {
		return Imported{}, event.BadInputf("%s has %s already in %s (the same minute): give --skip-existing to leave them out; nothing was written",
			from, text.Plural(m.Same, "reading"), e.Name(event.WeatherFile))
	}
	log = append(log, m.New...)
	weather.SortLog(log)
	if err := safefile.Write(path, func(w io.Writer) error { return weather.WriteLog(w, log) }); err != nil {
		return Imported{}, err
	}
	return Imported{Added: len(m.New), Skipped: m.Same, Total: len(log)}, nil
}
