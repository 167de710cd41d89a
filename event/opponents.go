package event

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"slices"
	"strings"
	"time"
	"unicode"

	"github.com/shopspring/decimal"

	"pitcard/internal/csvtext"
	"pitcard/internal/safefile"
	"pitcard/internal/text"
	"pitcard/logbook"
	"pitcard/weather"
)

// OpponentsFile is the opponent book: one row per slip of the other lane
// the crew entered (log add, round, the pit page's slip form), so the next
// time a crew races that car its history sets the chance to win.
const OpponentsFile = "opponents.csv"

// OpponentColumns are the opponent book's header, in order.
var OpponentColumns = []string{"car", "date", "round", "dial", "rt", "et", "breakout", "notes"}

// MaxCarLen is the longest other car's number or name, in bytes: a door
// number or a short name, never a paragraph.
const MaxCarLen = 40

// OpponentPass is one slip of the other lane: its car (number or name),
// the date and round, its dial, reaction time and ET (s, as the slip
// prints them; dial and ET within logbook.DialRange, RT within
// logbook.RTRange), whether it broke out (ET under its dial) and notes.
type OpponentPass struct {
	Car          string
	Date         string // YYYY-MM-DD
	Round        logbook.Session
	Dial, RT, ET decimal.Decimal
	Breakout     bool
	Notes        string
	Line         int // its line in the file read; 0 for a new one
}

// Margin is its ET over its dial, s (negative: a breakout).
func (p OpponentPass) Margin() float64 { return p.ET.Sub(p.Dial).InexactFloat64() }

// Record is the row as pitcard writes it.
func (p OpponentPass) Record() []string {
	bo := "no"
	if p.Breakout {
		bo = "yes"
	}
	return []string{csvtext.Cell(p.Car), p.Date, p.Round.String(), logbook.FormatSeconds(p.Dial, 2), logbook.FormatSeconds(p.RT, 3), logbook.FormatSeconds(p.ET, 3), bo, csvtext.Cell(p.Notes)}
}

// key is what makes two rows the same slip: the car, the day and the
// round; a test session may run many times a day, so its figures too.
func (p OpponentPass) key() string {
	k := strings.ToLower(p.Car) + "\x00" + p.Date + "\x00" + p.Round.String()
	if p.Round.Kind == logbook.Test {
		k += "\x00" + p.Dial.String() + "\x00" + p.RT.String() + "\x00" + p.ET.String()
	}
	return k
}

// SameCar reports whether two names are the same car: spaces at the ends
// and letter case do not count ("4471", "Car 9" and "car 9").
func SameCar(a, b string) bool { return strings.EqualFold(strings.TrimSpace(a), strings.TrimSpace(b)) }

// ParseCar reads the other car's number or name as typed: 1..MaxCarLen
// bytes of printable text, spaces at the ends and a leading # dropped.
func ParseCar(field, s string) (string, error) {
	// "#4471" is how a door number is often written: the # is not part of it.
	c := strings.TrimSpace(strings.TrimPrefix(strings.TrimSpace(s), "#"))
	switch {
	case c == "":
		return "", &weather.InputError{Field: field, Value: s, Reason: "is blank: give the other car's number or name (4471, Copper Wren)"}
	case len(c) > MaxCarLen:
		return "", &weather.InputError{Field: field, Value: s, Reason: fmt.Sprintf("is longer than %d characters: give the car's number or a short name", MaxCarLen)}
	case strings.ContainsFunc(c, func(r rune) bool { return !unicode.IsPrint(r) }) || c == "\uFFFD":
		return "", &weather.InputError{Field: field, Value: s, Reason: "has a character that cannot be printed"}
	}
	return c, nil
}

// NewOpponentPass checks the other lane's slip as typed (the flags' names
// in messages: --opponent, --opponent-dial ...); the breakout follows from
// the ET and the dial.
func NewOpponentPass(car, date string, round logbook.Session, dial, rt, et, notes string) (OpponentPass, error) {
	p := OpponentPass{Date: date, Round: round, Notes: notes}
	var err error
	if p.Car, err = ParseCar("--opponent", car); err != nil {
		return p, err
	}
	for _, f := range []struct {
		flag, v string
		dst     *decimal.Decimal
		valid   [2]float64
	}{{"--opponent-dial", dial, &p.Dial, logbook.DialRange}, {"--opponent-rt", rt, &p.RT, logbook.RTRange}, {"--opponent-et", et, &p.ET, logbook.DialRange}} {
		if *f.dst, err = logbook.ParseSlipTime(f.flag, f.v, f.valid); err != nil {
			return p, err
		}
	}
	p.Breakout = p.ET.LessThan(p.Dial)
	return p, nil
}

// OpponentBook is the opponent book as read: the good rows, and the rows
// that could not be read, each named (Bad) and kept as they were (raw) so a
// rewrite loses nothing.
type OpponentBook struct {
	Passes []OpponentPass
	Bad    []error
	raw    [][]string
	// broken: a row that is not even valid CSV; the rest of the file was
	// not read, and a rewrite would lose it.
	broken bool
}

// ReadOpponents reads an opponent book named name. A wrong header is an
// error; a bad row is set aside in Bad (file, line, column, value and the
// valid range) and the rest is read.
func ReadOpponents(r io.Reader, name string) (*OpponentBook, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	cr, head, err := weather.OpenCSV(bytes.NewReader(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))), name)
	book := &OpponentBook{}
	if err != nil || head == nil {
		return book, err
	}
	if !slices.Equal(head, OpponentColumns) {
		return nil, &weather.InputError{File: name, Line: 1, Field: "header", Value: strings.Join(head, ","),
			Reason: "is not " + strings.Join(OpponentColumns, ",")}
	}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			return book, nil
		}
		if err != nil {
			book.Bad, book.broken = append(book.Bad, weather.CSVError(name, err)), true
			return book, nil
		}
		line, _ := cr.FieldPos(0)
		p, err := opponentRow(rec, name, line)
		if err != nil {
			book.Bad, book.raw = append(book.Bad, err), append(book.raw, slices.Clone(rec))
			continue
		}
		book.Passes = append(book.Passes, p)
	}
}

// opponentRow checks one row of the book.
func opponentRow(rec []string, name string, line int) (OpponentPass, error) {
	bad := func(field, value, reason string) error {
		return &weather.InputError{File: name, Line: line, Field: field, Value: value, Reason: reason}
	}
	if len(rec) != len(OpponentColumns) {
		return OpponentPass{}, bad("row", "", fmt.Sprintf("has %d fields, the header has %d", len(rec), len(OpponentColumns)))
	}
	inFile := func(err error) error {
		var ie *weather.InputError
		if errors.As(err, &ie) {
			c := *ie
			c.File, c.Line = name, line
			return &c
		}
		return err
	}
	p := OpponentPass{Line: line, Notes: csvtext.Text(rec[7])}
	var err error
	if p.Car, err = ParseCar("car", csvtext.Text(rec[0])); err != nil {
		return p, inFile(err)
	}
	if _, err := time.Parse(weather.DateLayout, rec[1]); err != nil {
		return p, bad("date", rec[1], "is not a date as YYYY-MM-DD")
	}
	p.Date = rec[1]
	if p.Round, err = logbook.ParseSession(rec[2]); err != nil {
		return p, inFile(FlagErr(err, "round"))
	}
	for _, f := range []struct {
		col   string
		v     string
		dst   *decimal.Decimal
		valid [2]float64
	}{{"dial", rec[3], &p.Dial, logbook.DialRange}, {"rt", rec[4], &p.RT, logbook.RTRange}, {"et", rec[5], &p.ET, logbook.DialRange}} {
		if *f.dst, err = logbook.ParseSlipTime(f.col, f.v, f.valid); err != nil {
			return p, inFile(err)
		}
	}
	p.Breakout = p.ET.LessThan(p.Dial)
	switch strings.ToLower(strings.TrimSpace(rec[6])) {
	case "": // the ET and the dial say
	case "yes", "no":
		if said := strings.EqualFold(strings.TrimSpace(rec[6]), "yes"); said != p.Breakout {
			return p, bad("breakout", rec[6], fmt.Sprintf("disagrees with the ET %s and the dial %s (a breakout is an ET under the dial)", p.ET, p.Dial))
		}
	default:
		return p, bad("breakout", rec[6], "is not yes, no or blank")
	}
	if len(p.Notes) > 500 {
		return p, bad("notes", p.Notes, "is longer than 500 characters")
	}
	return p, nil
}

// Write writes the book: the header, the good rows, then the rows that
// could not be read as they were.
func (b *OpponentBook) Write(w io.Writer) error {
	cw := csv.NewWriter(w)
	_ = cw.Write(OpponentColumns)
	for _, p := range b.Passes {
		_ = cw.Write(p.Record())
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	for _, r := range b.raw {
		if err := writeRaw(w, r); err != nil {
			return err
		}
	}
	return nil
}

// writeRaw writes a row kept as it was read. A first field beginning with
// # was quoted in the file (a bare one is a comment line), and must stay
// quoted, which csv.Writer does not do by itself.
func writeRaw(w io.Writer, rec []string) error {
	var b bytes.Buffer
	cw := csv.NewWriter(&b)
	_ = cw.Write(rec)
	cw.Flush()
	line := b.String()
	if strings.HasPrefix(line, "#") { // written bare: rec[0] is its first len(rec[0]) bytes
		line = `"` + rec[0] + `"` + line[len(rec[0]):]
	}
	_, err := io.WriteString(w, line)
	return err
}

// BadRows is the rows of the book that could not be read, in one error
// (nil when none): the card and the lists say it and still use the rest.
func (b *OpponentBook) BadRows() error {
	if len(b.Bad) == 0 {
		return nil
	}
	fix := "them"
	if len(b.Bad) == 1 {
		fix = "it"
	}
	return BrokenInput{append([]error{fmt.Errorf("%s of the opponent book left out (fix %s; the rest is used)", text.Plural(len(b.Bad), "row"), fix)}, b.Bad...)}
}

// OpponentBook reads the folder's opponent book (none yet: an empty one).
func (e *Folder) OpponentBook() (*OpponentBook, error) {
	f, err := e.FS.Open(OpponentsFile)
	if errors.Is(err, fs.ErrNotExist) {
		return &OpponentBook{}, nil
	}
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadOpponents(f, e.Name(OpponentsFile))
}

// AddOpponentPasses adds slips of the other lane to the opponent book under
// its lock, atomically, all or nothing: a slip already there with the same
// figures is skipped; the same car, day and round with other figures is a
// conflict and nothing is written. Rows of the book that could not be read
// are written back as they were. It returns how many were added and skipped.
func (e *Folder) AddOpponentPasses(add []OpponentPass, from string) (added, skipped int, err error) {
	return e.addOpponents(add, from, true)
}

// addOpponents is AddOpponentPasses; without skipSame a slip already in
// the book stops the write too.
func (e *Folder) addOpponents(add []OpponentPass, from string, skipSame bool) (added, skipped int, err error) {
	if err := e.Writable(); err != nil {
		return 0, 0, err
	}
	path := e.Path(OpponentsFile)
	unlock, err := safefile.Lock(path)
	if err != nil {
		return 0, 0, err
	}
	defer unlock()
	book, err := e.OpponentBook()
	if err != nil {
		return 0, 0, err
	}
	if book.broken {
		return 0, 0, userErrf("%v\nNothing was written to %s: a row that is not even valid CSV could not be kept through a rewrite; fix it first", book.BadRows(), e.Name(OpponentsFile))
	}
	m := MergeOpponents(book.Passes, add)
	if len(m.Conflicts) > 0 {
		return 0, 0, &Conflicts{List: m.Conflicts, Ours: e.Name(OpponentsFile), TheirsIn: from}
	}
	if m.Same > 0 && !skipSame {
		return 0, 0, userErrf("%s has %s already in %s: give --skip-existing to leave them out; nothing was written",
			from, text.Plural(m.Same, "slip"), e.Name(OpponentsFile))
	}
	if len(m.New) == 0 {
		return 0, m.Same, nil
	}
	book.Passes = append(book.Passes, m.New...)
	slices.SortStableFunc(book.Passes, func(a, b OpponentPass) int { return strings.Compare(a.Date, b.Date) })
	if err := safefile.Write(path, book.Write); err != nil {
		return 0, 0, err
	}
	return len(m.New), m.Same, nil
}

// OpponentMerge is what another copy's opponent book holds against ours.
type OpponentMerge struct {
	New       []OpponentPass
	Same      int
	Conflicts []Conflict
}

// MergeOpponents compares other's slips with ours: by car, day and round,
// then by every field.
func MergeOpponents(ours, other []OpponentPass) OpponentMerge {
	var m OpponentMerge
	byKey := make(map[string]OpponentPass, len(ours))
	for _, p := range ours {
		byKey[p.key()] = p
	}
	for _, p := range other {
		o, ok := byKey[p.key()]
		switch {
		case !ok:
			m.New = append(m.New, p)
			byKey[p.key()] = p
		case slices.Equal(o.Record(), p.Record()):
			m.Same++
		default:
			m.Conflicts = append(m.Conflicts, Conflict{
				What:    fmt.Sprintf("car %s %s %s", p.Car, p.Date, p.Round),
				Differs: Differs(OpponentColumns, o.Record(), p.Record()),
				Ours:    strings.Join(o.Record(), ","), Theirs: strings.Join(p.Record(), ","),
				OursLine: o.Line, TheirsLine: p.Line})
		}
	}
	return m
}

// OpponentHistory is what the opponent book holds of one car: its slips,
// the days it raced (events), its margins over its dial (s) on the slips
// whose notes do not say the run was aborted, and its reaction times (s).
type OpponentHistory struct {
	Car          string
	Passes       int
	Events       int
	Margins, RTs []float64
}

// History is car's history in the book (SameCar names match); aborts are
// the notes' words that mark a slip's ET as not the car's (a lift after
// the other lane red-lit): its reaction time still counts.
func (b *OpponentBook) History(car string, aborts logbook.AbortWords) OpponentHistory {
	h := OpponentHistory{Car: car}
	days := map[string]bool{}
	for _, p := range b.Passes {
		if !SameCar(p.Car, car) {
			continue
		}
		h.Passes++
		days[p.Date] = true
		h.RTs = append(h.RTs, p.RT.InexactFloat64())
		if !aborts.Aborted(p.Notes) {
			h.Margins = append(h.Margins, p.Margin())
		}
	}
	h.Events = len(days)
	return h
}

// Words say where a named car's figures came from, for the card.
func (h OpponentHistory) Words() string {
	if h.Passes == 0 {
		return fmt.Sprintf("no passes of car %s are on record in %s: the settings' figures", h.Car, OpponentsFile)
	}
	return fmt.Sprintf("from %s of car %s (%s)", text.Plural(h.Passes, "pass"), h.Car, text.Plural(h.Events, "event"))
}

// Cars are the histories of every car in the book, in the order first seen.
func (b *OpponentBook) Cars(aborts logbook.AbortWords) []OpponentHistory {
	var out []OpponentHistory
	seen := map[string]bool{}
	for _, p := range b.Passes {
		k := strings.ToLower(p.Car)
		if seen[k] {
			continue
		}
		seen[k] = true
		out = append(out, b.History(p.Car, aborts))
	}
	return out
}

// OpponentBookWritable checks, before a pass is logged, that the book can
// take its slip: readable, without a row a rewrite would lose, and
// without another slip of the same car, day and round.
func (e *Folder) OpponentBookWritable(p OpponentPass) error {
	book, err := e.OpponentBook()
	if err != nil {
		return err
	}
	if book.broken {
		return userErrf("%v\nNothing was written: a row of %s that is not even valid CSV could not be kept through a rewrite; fix it first", book.BadRows(), e.Name(OpponentsFile))
	}
	if m := MergeOpponents(book.Passes, []OpponentPass{p}); len(m.Conflicts) > 0 {
		return &Conflicts{List: m.Conflicts, Ours: e.Name(OpponentsFile), TheirsIn: "this slip"}
	}
	return nil
}

// IsOpponentBook reports whether data (a file to import) is an opponent
// book: its first line is the book's header.
func IsOpponentBook(data []byte) bool {
	first, _, _ := bytes.Cut(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf")), []byte("\n"))
	return strings.TrimRight(string(first), "\r") == strings.Join(OpponentColumns, ",")
}

// ImportOpponents adds another copy's opponent book (data, read from the
// file from) to the folder's, all or nothing: a row that cannot be read,
// a conflict, or (without skipExisting) a slip already in the book stops
// it and nothing is written. It returns how many slips were added and
// skipped.
func (e *Folder) ImportOpponents(data []byte, from string, skipExisting bool) (added, skipped int, err error) {
	theirs, err := ReadOpponents(bytes.NewReader(data), from)
	if err != nil {
		return 0, 0, err
	}
	if len(theirs.Bad) > 0 {
		return 0, 0, fmt.Errorf("%w\nNothing was imported", theirs.BadRows())
	}
	if len(theirs.Passes) == 0 {
		return 0, 0, userErrf("%s has no slips to import", from)
	}
	return e.addOpponents(theirs.Passes, from, skipExisting)
}
