package logbook

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/internal/csvtext"
	"pitcard/weather"
)

// Pass is one row of the logbook: a time slip and the conditions it ran in.
type Pass struct {
	Line    int       // line in the file it was read from (0 for a new pass)
	Time    time.Time // local date and time of the pass
	Track   string    // the track's name as in its track.yaml
	Session Session
	Lane    Lane
	Dial    decimal.NullDecimal // dial-in, s; not valid for time trials without one
	RT      decimal.NullDecimal // reaction time, s, from the green (negative = red light)
	// ET holds the elapsed time at each of Timers (60, 330, 660, 1000, 1320 ft);
	// not valid where not timed.
	ET      [5]decimal.NullDecimal
	MPH660  decimal.NullDecimal // trap speed over the 66 ft before 660 ft
	MPH1320 decimal.NullDecimal // trap speed over the 66 ft before 1320 ft
	// Air is the weather of the pass: station pressure (never sea-level
	// corrected), relative humidity, wind and track temperature. HasAir is
	// false for a slip logged without the weather.
	Air      weather.Reading
	HasAir   bool
	WeightLb float64 // car and driver as run; 0 = not recorded
	Notes    string
	// Change is the crew's words for what changed on the car before this
	// pass ("new converter", "+2 psi boost"); "" for nothing (ChangeNoted).
	Change string
	// Extra holds the crew's own columns (those pitcard does not read), by
	// their header name, so a rewrite keeps them.
	Extra map[string]string
}

// ETAt is the elapsed time at timer ft as a float, and whether it was timed.
func (p Pass) ETAt(ft float64) (float64, bool) {
	i := TimerIndex(ft)
	if i < 0 || !p.ET[i].Valid {
		return 0, false
	}
	return p.ET[i].Decimal.InexactFloat64(), true
}

// Finish is the elapsed time at the last timer recorded, its distance, and
// whether the pass has any.
func (p Pass) Finish() (decimal.Decimal, float64, bool) {
	for i := len(TimerDistancesFt) - 1; i >= 0; i-- {
		if p.ET[i].Valid {
			return p.ET[i].Decimal, TimerDistancesFt[i], true
		}
	}
	return decimal.Decimal{}, 0, false
}

// Key identifies a pass for finding the same pass entered twice: its date,
// time to the minute, track and lane.
func (p Pass) Key() string {
	return p.Time.Format("2006-01-02 15:04") + "|" + strings.ToLower(p.Track) + "|" + string(p.Lane)
}

// timerColumns are the logbook's elapsed-time columns, one per timer.
var timerColumns = [5]string{"et60", "et330", "et660", "et1000", "et1320"}

// Columns are logbook.csv's columns, in order. Units are in the names.
var Columns = []string{"date", "time", "track", "session", "lane", "dial", "rt",
	"et60", "et330", "et660", "et1000", "et1320", "mph660", "mph1320",
	"temp_f", "baro_inhg", "humidity_pct", "track_temp_f", "wind_mph", "wind_from_deg", "weight_lb", "notes", "change"}

var logbookAlternatives = map[string]string{
	"temp_c": "temp_f", "baro_hpa": "baro_inhg", "track_temp_c": "track_temp_f",
	"wind_kmh": "wind_mph", "weight_kg": "weight_lb",
}

// Ranges of a slip (pitcard's limits: anything from a street car to a fast
// doorslammer, with room to spare).
var (
	ETRanges  = [5][2]float64{{0.7, 5}, {1.5, 12}, {2, 20}, {3, 30}, {3.5, 40}} // s, per timer
	RTRange   = [2]float64{-1, 2}                                               // s
	DialRange = [2]float64{1.5, 40}                                             // s
	MPHRange  = [2]float64{5, 350}                                              // mph
	// TrapRatioRange bounds trap speed over the average speed to that timer. A
	// car accelerating from rest ends faster than its average: about 1.5× for
	// a power-limited car, 2× at constant acceleration; a lifted run can end
	// below it. Outside these bounds the speed or the time is a typo.
	TrapRatioRange = [2]float64{0.75, 2.6}
)

// RowErrors is every bad row of a file, so a crew can fix them all at once.
type RowErrors []*weather.InputError

// Error lists the bad rows, one a line.
func (e RowErrors) Error() string {
	var b strings.Builder
	for i, x := range e {
		if i > 0 {
			b.WriteString("\n")
		}
		b.WriteString(x.Error())
	}
	if len(e) >= maxRowErrors {
		b.WriteString("\n(stopped after the first errors; fix these and read again)")
	}
	return b.String()
}

// BadInput marks the error as the user's to fix.
func (e RowErrors) BadInput() bool { return true }

const maxRowErrors = 25

// Logbook is a logbook file as read: every row that reads as a pass, the
// crew's own columns (kept through every rewrite), and the rows that could
// not be read (kept as they are, so a rewrite loses nothing and the crew can
// still fix them).
type Logbook struct {
	Header []string // the file's header as written
	Extra  []string // columns pitcard does not read, in file order
	Passes []Pass   // the good rows, in time order
	Bad    RowErrors
	// BadRows are the raw fields of each bad row, in file order; nil for a
	// row the CSV reader could not split (an unmatched quote).
	BadRows [][]string
}

// Kept reports whether a rewrite can carry every bad row as it is.
func (lb *Logbook) Kept() bool {
	for _, r := range lb.BadRows {
		if r == nil {
			return false
		}
	}
	return true
}

// ReadFile reads a logbook from r; name is the file's name for
// messages and loc the zone of its times. A row that fails its checks (or
// repeats a pass) is set aside in Bad with its file, line, column, value and
// rule, and the rest are read; only a header pitcard cannot read, or a
// failing reader, is an error. Passes come back in time order.
func ReadFile(r io.Reader, name string, loc *time.Location) (*Logbook, error) {
	return ReadRecent(r, name, loc, 0)
}

// ReadRecent is ReadFile that keeps only the last keep passes
// (0: all), every row still checked: what a card needs from a long logbook
// (a fit uses its recent passes) without holding ten seasons in memory. A
// logbook read so must not be written back.
func ReadRecent(r io.Reader, name string, loc *time.Location, keep int) (*Logbook, error) {
	return ReadSetup(r, name, loc, keep, nil)
}

// ReadSetup is ReadRecent with car.yaml's setup items: a column headed by an
// item's name is typed, each cell a number in the item's range or one of its
// choices (kept as the logbook writes it: "15.5 psi" as 15.5, a choice as
// car.yaml spells it); a bad cell sets its row aside as any bad row is.
func ReadSetup(r io.Reader, name string, loc *time.Location, keep int, setup Setup) (*Logbook, error) {
	r, lines, err := sizeInput(r, name)
	if err != nil {
		return nil, err
	}
	end := &endReader{r: r}
	cr, header, err := weather.OpenCSV(end, name)
	if err != nil {
		return nil, err
	}
	lb := &Logbook{}
	if header == nil {
		return lb, nil
	}
	col, extra, err := logbookHeader(header, name)
	if err != nil {
		return nil, err
	}
	rd := newSetupRead(lb, name, header, extra, setup, keep)
	rd.rows = newRowReader(col)
	rd.reserve(lines)
	cr.ReuseRecord = true
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		rd.last, rd.lastBad = nil, -1
		if err != nil {
			var ie *weather.InputError
			if err = weather.CSVError(name, err); !errors.As(err, &ie) {
				return nil, err
			}
			rd.bad(ie, nil)
			continue
		}
		line, _ := cr.FieldPos(0)
		if err := rd.row(rec, line, loc); err != nil {
			return nil, err
		}
	}
	rd.setTornAside(end.n > 0 && end.last != '\n' && end.last != '\r')
	SortPasses(lb.Passes)
	rd.trim(keep)
	return lb, nil
}

// sizeInput counts the lines of r when it can be told cheaply, so the
// passes' slice is made once: a file on disk is read whole, in one buffer of
// its size (a passing cost: ~140 bytes a pass), and counted, and a reader
// with a length gives an upper bound. It returns the reader to read from
// (the buffer, for a file) and the lines, -1 when unknown. It does not parse
// anything.
func sizeInput(r io.Reader, name string) (io.Reader, int, error) {
	lines := -1 // the file's lines when known: room for its passes at once
	if st, ok := r.(interface{ Stat() (fs.FileInfo, error) }); ok {
		if fi, err := st.Stat(); err == nil && fi.Mode().IsRegular() && fi.Size() < 1<<31 {
			buf := make([]byte, fi.Size())
			n, err := io.ReadFull(r, buf)
			if err != nil && !errors.Is(err, io.ErrUnexpectedEOF) {
				return nil, 0, fmt.Errorf("%s: %w", name, err)
			}
			lines = bytes.Count(buf[:n], []byte{'\n'}) + 1
			r = bytes.NewReader(buf[:n])
		}
	} else if lr, ok := r.(interface{ Len() int }); ok {
		lines = lr.Len()/minRowBytes + 1
	}
	return r, lines, nil
}

// passKey is the same pass entered twice: its minute, track and lane.
type passKey struct {
	minute      int64
	track, lane string
}

// setupRead is the state of one ReadSetup: the logbook being filled, the
// passes seen (to catch a pass entered twice) and the last row read (to set
// a torn last line aside).
type setupRead struct {
	lb       *Logbook
	name     string
	header   []string
	extra    []weather.Column
	typed    []setupColumn
	rows     *rowReader
	keep     int
	seen     map[passKey]int
	lower    map[string]string // a track's name in lower case
	lastBad  int               // the last row read, when it was bad: its place in Bad
	last     []string          // the last row read (for a torn last line), nil if not a pass
	lastLine int
}

// newSetupRead fills lb's Header and Extra from the file's header and types
// the extra columns that name one of setup's items. It reads no rows.
func newSetupRead(lb *Logbook, name string, header []string, extra []weather.Column, setup Setup, keep int) *setupRead {
	lb.Header = make([]string, len(header))
	for i, h := range header {
		lb.Header[i] = strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))
	}
	rd := &setupRead{lb: lb, name: name, header: header, extra: extra, keep: keep,
		seen: map[passKey]int{}, lower: map[string]string{}, lastBad: -1}
	for _, x := range extra {
		lb.Extra = append(lb.Extra, x.Name)
		if it, ok := setup.Item(x.Name); ok {
			rd.typed = append(rd.typed, setupColumn{it, x.Index})
		}
	}
	return rd
}

// reserve makes room for the passes: for the file's rows at once when all
// are kept (not a copy of every pass on each doubling), or for the window and
// as many again before it is trimmed, but never more than the file has rows
// (a 65-pass logbook takes 65, not 2×keep: the card used to zero 4.6 MB for
// nothing). lines is -1 when unknown.
func (rd *setupRead) reserve(lines int) {
	if lines >= 0 && rd.keep == 0 {
		rd.lb.Passes = make([]Pass, 0, lines)
	}
	if rd.keep > 0 {
		n := 2 * rd.keep
		if lines >= 0 && lines < n {
			n = lines
		}
		rd.lb.Passes = make([]Pass, 0, n)
	}
}

// bad sets a row aside with why; raw is the row, nil when it could not be
// split into fields.
func (rd *setupRead) bad(ie *weather.InputError, raw []string) {
	rd.lastBad = len(rd.lb.Bad)
	rd.lb.Bad = append(rd.lb.Bad, ie)
	rd.lb.BadRows = append(rd.lb.BadRows, raw)
}

// trim keeps the latest keep passes, in place (0: all).
func (rd *setupRead) trim(keep int) {
	lb := rd.lb
	if keep > 0 && len(lb.Passes) > keep {
		SortPasses(lb.Passes)
		n := copy(lb.Passes, lb.Passes[len(lb.Passes)-keep:])
		clear(lb.Passes[n:])
		lb.Passes = lb.Passes[:n]
	}
}

// row checks one record at line and adds it as a pass, or sets it aside
// in Bad: a repeated header, a wrong field count, a bad cell, a pass entered
// twice or a bad setup cell. Only an error that is not about the row (a
// failing reader) is returned.
func (rd *setupRead) row(rec []string, line int, loc *time.Location) error {
	name, lb := rd.name, rd.lb
	if ie := weather.RepeatedHeader(rec, rd.header, name, line); ie != nil {
		rd.bad(ie, append([]string(nil), rec...))
		return nil
	}
	if len(rec) != len(rd.header) {
		rd.bad(&weather.InputError{File: name, Line: line, Field: "row",
			Reason: fmt.Sprintf("has %d fields, the header has %d (a row cut short, or a comma too many)", len(rec), len(rd.header))}, append([]string(nil), rec...))
		return nil
	}
	p, err := rd.rows.pass(rec, loc)
	if err != nil {
		var ie *weather.InputError
		if !errors.As(err, &ie) {
			return err
		}
		rd.bad(ie.At(name, line), append([]string(nil), rec...))
		return nil
	}
	p.Line = line
	trk, ok := rd.lower[p.Track]
	if !ok {
		trk = strings.ToLower(p.Track)
		rd.lower[p.Track] = trk
	}
	key := passKey{p.Time.Unix() / 60, trk, string(p.Lane)}
	if first, dup := rd.seen[key]; dup {
		rd.bad(&weather.InputError{File: name, Line: line, Field: "row",
			Reason: fmt.Sprintf("is the same pass as line %d (%s, %s lane): entered twice", first, p.Time.Format("2006-01-02 15:04"), p.Lane)}, append([]string(nil), rec...))
		return nil
	}
	if len(rd.typed) > 0 {
		raw := append([]string(nil), rec...)
		if ie := checkSetup(rd.typed, rec); ie != nil {
			rd.bad(ie.At(name, line), raw)
			return nil
		}
	}
	rd.seen[key] = line
	if len(rd.extra) > 0 {
		p.Extra = map[string]string{}
		for _, x := range rd.extra {
			p.Extra[x.Name] = csvtext.Text(rec[x.Index])
		}
	}
	lb.Passes = append(lb.Passes, p)
	rd.last, rd.lastLine = rec, line
	if rd.keep > 0 && len(lb.Passes) >= 2*rd.keep {
		rd.trim(rd.keep + 1) // one more: the last row may yet be found torn
	}
	return nil
}

// setTornAside handles a file whose last line has no line end (torn): a
// last row set aside already gets TornReason as its reason, and a last row
// read as a pass is taken out of Passes and set aside. A last line without
// its line end is a row a crash cut short (an append torn by kill -9 or a
// power cut): its last field may be cut too, so it is not read as a pass.
// The rows an append adds always end with one. It does nothing when not
// torn.
func (rd *setupRead) setTornAside(torn bool) {
	lb := rd.lb
	if torn && rd.lastBad >= 0 { // cut short: say why
		lb.Bad[rd.lastBad].Reason = TornReason
	}
	if torn && rd.last != nil {
		for i := len(lb.Passes) - 1; i >= 0; i-- {
			if lb.Passes[i].Line == rd.lastLine {
				lb.Passes = slices.Delete(lb.Passes, i, i+1)
				break
			}
		}
		rd.bad(&weather.InputError{File: rd.name, Line: rd.lastLine, Field: "row",
			Reason: TornReason}, append([]string(nil), rd.last...))
	}
}

// TornReason is why a last line without its line end is set aside.
const TornReason = "is the last line and has no line end: a write cut short (pitcard stopped by a crash or a power cut?); it is left out. If the row is whole, end it with a line end (Enter) in a text editor"

// minRowBytes is the fewest bytes a logbook row of a pass takes in practice
// (date, time, track, session, lane and a timer: ~60; the demo's ~140):
// a file's size over it bounds its rows, to size the passes' slice once.
const minRowBytes = 100

// endReader remembers the last byte read and how many.
type endReader struct {
	r    io.Reader
	n    int64
	last byte
}

func (e *endReader) Read(p []byte) (int, error) {
	n, err := e.r.Read(p)
	if n > 0 {
		e.n += int64(n)
		e.last = p[n-1]
	}
	return n, err
}

// Read reads a logbook strictly, as an import does: when any row
// fails, the result is RowErrors naming each bad row (the first
// maxRowErrors of them) and no passes.
func Read(r io.Reader, name string, loc *time.Location) ([]Pass, error) {
	lb, err := ReadFile(r, name, loc)
	if err != nil {
		return nil, err
	}
	if len(lb.Bad) > 0 {
		return nil, lb.Bad[:min(len(lb.Bad), maxRowErrors)]
	}
	return lb.Passes, nil
}

// Write writes the logbook back: its header (the file's own order, with any
// column pitcard writes that it lacked added at the end), the passes in time
// order, then every bad row as it was read. A crew's own columns keep their
// values.
func (lb *Logbook) Write(w io.Writer) error {
	header := lb.WriteHeader()
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	rw := newRowWriter(header)
	for _, p := range lb.Passes {
		cw.Write(rw.record(p))
	}
	for _, raw := range lb.BadRows {
		if raw == nil {
			continue
		}
		rec := raw
		if len(raw) == len(lb.Header) && len(header) > len(raw) { // same layout: pad the added columns
			rec = append(append([]string(nil), raw...), make([]string, len(header)-len(raw))...)
		}
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// WriteHeader is the header Write writes: the file's own, with any column
// pitcard writes that it lacked added at the end (the change column only
// when a pass has a change), then the crew's columns it lacks.
func (lb *Logbook) WriteHeader() []string {
	header := append([]string(nil), lb.Header...)
	if len(header) == 0 {
		header = append(append(header, Columns...), lb.Extra...)
	}
	has := map[string]bool{}
	for _, h := range header {
		has[strings.ToLower(h)] = true
		if c, ok := logbookAlternatives[strings.ToLower(h)]; ok {
			has[c] = true
		}
	}
	for _, c := range Columns {
		if !has[c] && (c != ChangeColumn || AnyChange(lb.Passes)) {
			header = append(header, c)
		}
	}
	for _, x := range lb.Extra {
		if !has[strings.ToLower(x)] {
			header = append(header, x)
			has[strings.ToLower(x)] = true
		}
	}
	return header
}

// AppendRow is p as one line of a logbook file whose header is header (as
// WriteHeader gives it), line end included: what an append adds.
func AppendRow(p Pass, header []string) ([]byte, error) {
	var b strings.Builder
	cw := csv.NewWriter(&b)
	cw.Write(newRowWriter(header).record(p))
	cw.Flush()
	return []byte(b.String()), cw.Error()
}

// rowWriter lays passes out in a header's columns.
type rowWriter struct {
	header []string
	at     []int // each header column's place in passValues, or -1 for a crew column
	rec    []string
}

func newRowWriter(header []string) *rowWriter {
	w := &rowWriter{header: header, at: make([]int, len(header)), rec: make([]string, len(header))}
	for i, h := range header {
		if j, ok := fieldIndex[strings.ToLower(h)]; ok {
			w.at[i] = j
		} else {
			w.at[i] = -1
		}
	}
	return w
}

func (w *rowWriter) record(p Pass) []string {
	v := passValues(p)
	for i, h := range w.header {
		switch {
		case w.at[i] < 0: // a crew's column: text
			w.rec[i] = csvtext.Cell(p.Extra[h])
		case textColumns[fieldColumns[w.at[i]]]:
			w.rec[i] = csvtext.Cell(v[w.at[i]])
		default:
			w.rec[i] = v[w.at[i]]
		}
	}
	return w.rec
}

// SortPasses sorts passes in time order, stably.
func SortPasses(p []Pass) {
	sort.SliceStable(p, func(i, j int) bool { return p[i].Time.Before(p[j].Time) })
}

func logbookHeader(header []string, name string) (map[string]weather.Column, []weather.Column, error) {
	col, extra, err := weather.ReadHeaderExtra(header, name, "logbook", Columns, logbookAlternatives, []string{"date", "time", "track", "session", "lane"})
	if err != nil {
		return nil, nil, err
	}
	for _, t := range TimerDistancesFt {
		if _, ok := col[fmt.Sprintf("et%.0f", t)]; ok {
			return col, extra, nil
		}
	}
	return nil, nil, &weather.InputError{File: name, Line: 1, Field: "column", Value: "et1320", Reason: "is missing: the header has no elapsed-time column (et60 ... et1320)"}
}

// SlipFields are the raw text of one pass, as typed in a row or in flags,
// keyed by canonical column name; metric names the columns given in metric.
type SlipFields struct {
	Values map[string]string
	Metric map[string]bool
	Names  map[string]string // how each column is called in messages
}

// rowReader turns a file's rows into slip fields, reusing one set of maps
// for every row (a 100,000-row logbook would otherwise build 300,000 maps).
type rowReader struct {
	f     SlipFields
	canon []string
	index []int
	// The values read so far, shared by every pass that has them: a
	// decimal's digits (a *big.Int, never changed once made), a track's
	// name. A season repeats its times and tracks, so a pass holds no
	// digits or text of its own, and no row's text stays alive through
	// one of its fields.
	decimals [len(decimalColumns)]map[string]decimal.Decimal
	tracks   map[string]string
}

// decimalColumns are the columns read as decimals, as decimalFields lists
// them.
var decimalColumns = [...]string{"dial", "rt", "et60", "et330", "et660", "et1000", "et1320", "mph660", "mph1320"}

func decimalFields(p *Pass) [len(decimalColumns)]*decimal.NullDecimal {
	return [...]*decimal.NullDecimal{&p.Dial, &p.RT, &p.ET[0], &p.ET[1], &p.ET[2], &p.ET[3], &p.ET[4], &p.MPH660, &p.MPH1320}
}

// maxShared bounds each table of shared values (a logbook of all-different
// values keeps its own beyond it).
const maxShared = 1 << 14

// share makes p's values the shared ones (see rowReader).
func (r *rowReader) share(p *Pass) {
	for i, d := range decimalFields(p) {
		if !d.Valid {
			continue
		}
		v := r.f.Values[decimalColumns[i]]
		m := r.decimals[i]
		if m == nil {
			m = map[string]decimal.Decimal{}
			r.decimals[i] = m
		}
		if s, ok := m[v]; ok {
			d.Decimal = s
		} else if len(m) < maxShared {
			m[strings.Clone(v)] = d.Decimal
		}
	}
	if t, ok := r.tracks[p.Track]; ok {
		p.Track = t
	} else {
		p.Track = strings.Clone(p.Track)
		if len(r.tracks) < maxShared {
			r.tracks[p.Track] = p.Track
		}
	}
	p.Notes, p.Change = strings.Clone(p.Notes), strings.Clone(p.Change)
}

func newRowReader(col map[string]weather.Column) *rowReader {
	r := &rowReader{f: SlipFields{Values: map[string]string{}, Metric: map[string]bool{}, Names: map[string]string{}}, tracks: map[string]string{}}
	for canon, c := range col {
		r.f.Metric[canon], r.f.Names[canon] = c.Metric, c.Name
		r.canon, r.index = append(r.canon, canon), append(r.index, c.Index)
	}
	return r
}

func (r *rowReader) pass(rec []string, loc *time.Location) (Pass, error) {
	for i, c := range r.canon {
		v := strings.TrimSpace(rec[r.index[i]])
		if textColumns[c] {
			v = csvtext.Text(v)
		}
		r.f.Values[c] = v
	}
	p, err := ParsePass(r.f, loc)
	if err == nil {
		r.share(&p)
	}
	return p, err
}

// ParsePass builds a pass from its fields and validates it.
func ParsePass(f SlipFields, loc *time.Location) (Pass, error) {
	var p Pass
	if err := f.parseWhen(&p, loc); err != nil {
		return p, err
	}
	if err := f.parseTimes(&p); err != nil {
		return p, err
	}
	if err := f.parseTraps(&p); err != nil {
		return p, err
	}
	if err := parseConditions(&p, f, f.named); err != nil {
		return p, err
	}
	if v := f.value("weight_lb"); v != "" {
		bare := weather.UnitLb
		if f.Metric["weight_lb"] {
			bare = weather.UnitKg
		}
		w, err := ParseWeightLb(f.name("weight_lb"), v, bare)
		if err != nil {
			return p, err
		}
		p.WeightLb = w
	}
	p.Notes = f.value("notes")
	var err error
	if p.Change, err = ParseChange(f.name("change"), f.value("change")); err != nil {
		return p, err
	}
	return p, nil
}

// value is column c's text, "" when absent.
func (f SlipFields) value(c string) string { return f.Values[c] }

// name is how column c is called in messages: its name in the file, or c.
func (f SlipFields) name(c string) string {
	if n := f.Names[c]; n != "" {
		return n
	}
	return c
}

// named gives an input error about column c the column's name in messages;
// any other error is returned as it is.
func (f SlipFields) named(err error, c string) error {
	var ie *weather.InputError
	if errors.As(err, &ie) {
		return ie.Named(f.name(c))
	}
	return err
}

// optSeconds reads column c as a time in seconds within lo..hi; a blank
// cell is no value, not an error.
func (f SlipFields) optSeconds(c string, lo, hi float64) (decimal.NullDecimal, error) {
	v := f.value(c)
	if v == "" {
		return decimal.NullDecimal{}, nil
	}
	d, err := ParseSlipTime(f.name(c), v, [2]float64{lo, hi})
	if err != nil {
		return decimal.NullDecimal{}, err
	}
	return decimal.NewNullDecimal(d), nil
}

// parseWhen reads where and when the pass was run: its date and time,
// track, session and lane. It checks no time slip figure.
func (f SlipFields) parseWhen(p *Pass, loc *time.Location) error {
	var err error
	if p.Time, err = weather.ParseDateTime(f.value("date"), f.value("time"), loc); err != nil {
		var ie *weather.InputError
		if errors.As(err, &ie) {
			return ie.Named(f.name(ie.Field))
		}
		return err
	}
	if p.Track = TrackName(f.value("track")); p.Track == "" {
		return &weather.InputError{Field: "track", Reason: "is blank (the track's name as in its track.yaml)"}
	}
	if p.Session, err = ParseSession(f.value("session")); err != nil {
		return f.named(err, "session")
	}
	if p.Lane, err = ParseLane(f.value("lane")); err != nil {
		return f.named(err, "lane")
	}
	return nil
}

// parseTimes reads the slip's times: dial, reaction time and the elapsed
// time at each timer, which must increase with distance, at least one
// given. It does not read the trap speeds.
func (f SlipFields) parseTimes(p *Pass) error {
	var err error
	if p.Dial, err = f.optSeconds("dial", DialRange[0], DialRange[1]); err != nil {
		return err
	}
	if p.RT, err = f.optSeconds("rt", RTRange[0], RTRange[1]); err != nil {
		return err
	}
	var last decimal.NullDecimal
	lastName, timed := "", false
	for i := range TimerDistancesFt {
		c := timerColumns[i]
		if p.ET[i], err = f.optSeconds(c, ETRanges[i][0], ETRanges[i][1]); err != nil {
			return err
		}
		if p.ET[i].Valid {
			timed = true
			if last.Valid && !p.ET[i].Decimal.GreaterThan(last.Decimal) {
				return &weather.InputError{Field: f.name(c), Value: f.value(c),
					Reason: fmt.Sprintf("is not after %s %s: elapsed times must increase with distance", lastName, last.Decimal)}
			}
			last, lastName = p.ET[i], f.name(c)
		}
	}
	if !timed {
		return &weather.InputError{Field: "et1320", Reason: "is blank, and so is every other timer (a pass needs at least one elapsed time)"}
	}
	return nil
}

// parseTraps reads the trap speeds at 660 and 1320 ft, each in its range
// and plausible with the elapsed time to its trap (p's times read first).
func (f SlipFields) parseTraps(p *Pass) error {
	for _, trap := range []struct {
		c   string
		ft  float64
		dst *decimal.NullDecimal
	}{{"mph660", 660, &p.MPH660}, {"mph1320", 1320, &p.MPH1320}} {
		v := f.value(trap.c)
		if v == "" {
			continue
		}
		d, err := ParseSeconds(f.name(trap.c), v) // a plain decimal, like a time
		if err != nil {
			return &weather.InputError{Field: f.name(trap.c), Value: v, Reason: "is not a speed in mph (e.g. 123.45)"}
		}
		if err := rangeCheck(f.name(trap.c), d, MPHRange[0], MPHRange[1], "mph"); err != nil {
			return err
		}
		if et, ok := p.ETAt(trap.ft); ok {
			avg := trap.ft / et / weather.MpsPerMph * weather.MetrePerFt // mph
			if ratio := d.InexactFloat64() / avg; ratio < TrapRatioRange[0] || ratio > TrapRatioRange[1] {
				return &weather.InputError{Field: f.name(trap.c), Value: v,
					Reason: fmt.Sprintf("is not plausible with et%.0f %s: the average speed to %.0f ft is %.1f mph, and a trap speed is %.2f..%.1f times that",
						trap.ft, FormatSeconds(p.ET[TimerIndex(trap.ft)].Decimal, 3), trap.ft, avg, TrapRatioRange[0], TrapRatioRange[1])}
			}
		}
		*trap.dst = decimal.NewNullDecimal(d)
	}
	return nil
}

// parseConditions reads the weather columns: all of temp, baro and humidity,
// or none of them.
func parseConditions(p *Pass, f SlipFields, named func(error, string) error) error {
	get := func(c string) string { return f.Values[c] }
	unit := func(c string, m, imp weather.TempUnit) weather.TempUnit {
		if f.Metric[c] {
			return m
		}
		return imp
	}
	given := 0
	for _, c := range []string{"temp_f", "baro_inhg", "humidity_pct"} {
		if get(c) != "" {
			given++
		}
	}
	if given > 0 && given < 3 {
		for _, c := range []string{"temp_f", "baro_inhg", "humidity_pct"} {
			if get(c) == "" {
				return &weather.InputError{Field: c, Reason: "is blank while other weather columns are given (give temp, baro and humidity together, or none)"}
			}
		}
	}
	r := weather.Reading{Time: p.Time}
	var err error
	if given == 3 {
		if r.Temp, err = weather.ParseTemperature(get("temp_f"), unit("temp_f", weather.DegC, weather.DegF)); err != nil {
			return named(err, "temp_f")
		}
		pu := weather.UnitInHg
		if f.Metric["baro_inhg"] {
			pu = weather.UnitHPa
		}
		if r.Baro, err = weather.ParsePressure(get("baro_inhg"), pu); err != nil {
			return named(err, "baro_inhg")
		}
		if r.RH, err = weather.ParsePercent(get("humidity_pct")); err != nil {
			return named(err, "humidity_pct")
		}
		p.HasAir = true
	}
	if v := get("track_temp_f"); v != "" {
		if r.TrackTemp, err = weather.ParseTemperature(v, unit("track_temp_f", weather.DegC, weather.DegF)); err != nil {
			return named(err, "track_temp_f")
		}
		r.HasTrack = true
	}
	if v := get("wind_mph"); v != "" {
		su := weather.UnitMPH
		if f.Metric["wind_mph"] {
			su = weather.UnitKMH
		}
		if r.Wind, err = weather.ParseSpeed(v, su); err != nil {
			return named(err, "wind_mph")
		}
	}
	if v := get("wind_from_deg"); v != "" {
		if r.WindFrom, err = weather.ParseDirection(v); err != nil {
			return named(err, "wind_from_deg")
		}
	} else if r.Wind > 0 {
		r.WindDirUnknown = true
	}
	check := r
	if !p.HasAir { // only the optional fields to check
		check.Temp, check.Baro, check.RH = weather.Fahrenheit(60), weather.InHg(29.92), 0
	}
	if err := check.Validate(0); err != nil {
		var ie *weather.InputError
		if errors.As(err, &ie) {
			return ie.Named(logbookColumn(ie.Field, f))
		}
		return err
	}
	p.Air = r
	return nil
}

// logbookColumn names, in logbook.csv's terms, a field Validate names in flag terms.
func logbookColumn(field string, f SlipFields) string {
	c := map[string]string{"temp": "temp_f", "baro": "baro_inhg", "humidity": "humidity_pct",
		"wind": "wind_mph", "wind-from": "wind_from_deg", "track-temp": "track_temp_f"}[field]
	if c == "" {
		return field
	}
	if n := f.Names[c]; n != "" {
		return n
	}
	return c
}

// Write writes passes as logbook.csv with its header, in imperial
// columns, times with the digits they were typed with.
func Write(w io.Writer, passes []Pass) error {
	cw := csv.NewWriter(w)
	cols := writtenColumns(passes)
	if err := cw.Write(cols); err != nil {
		return err
	}
	for _, p := range passes {
		rec := PassRecord(p)[:len(cols)]
		for i, c := range cols {
			if textColumns[c] {
				rec[i] = csvtext.Cell(rec[i])
			}
		}
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// textColumns are logbook.csv's columns of free text (a crew's own columns
// are too): written through csvtext, so a note that begins with = opens in a
// spreadsheet as text, not as a formula, and reads back as typed.
var textColumns = map[string]bool{"track": true, "notes": true, "change": true}

// PassRecord is p as a row of logbook.csv's columns (Columns), its
// text as typed.
func PassRecord(p Pass) []string {
	return passValues(p)[:len(Columns)]
}

// fieldColumns are every column passValues fills: logbook.csv's and their
// metric twins; fieldIndex finds a column's place.
var fieldColumns = append(append([]string(nil), Columns...), "temp_c", "baro_hpa", "track_temp_c", "wind_kmh", "weight_kg")

var fieldIndex = func() map[string]int {
	m := make(map[string]int, len(fieldColumns))
	for i, c := range fieldColumns {
		m[c] = i
	}
	return m
}()

// passValues are a pass's fields as logbook.csv writes them, in
// fieldColumns' order, the metric twins included (for a file kept in metric
// columns). One slice per pass, no map: a 100,000-pass logbook is written
// in well under a second.
func passValues(p Pass) []string {
	v := make([]string, len(fieldColumns))
	sec := func(d decimal.NullDecimal) string {
		if !d.Valid {
			return ""
		}
		return FormatSeconds(d.Decimal, 0)
	}
	num := func(x float64, dec int) string {
		s := strconv.FormatFloat(x, 'f', dec, 64)
		if strings.Contains(s, ".") {
			s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
		}
		return s
	}
	set := func(c, x string) { v[fieldIndex[c]] = x }
	set("date", p.Time.Format(weather.DateLayout))
	set("time", p.Time.Format(weather.TimeLayout))
	set("track", p.Track)
	set("session", p.Session.String())
	set("lane", string(p.Lane))
	set("dial", sec(p.Dial))
	set("rt", sec(p.RT))
	set("mph660", sec(p.MPH660))
	set("mph1320", sec(p.MPH1320))
	set("notes", p.Notes)
	set("change", p.Change)
	for i := range TimerDistancesFt {
		set(timerColumns[i], sec(p.ET[i]))
	}
	if p.HasAir {
		set("temp_f", num(p.Air.Temp.Fahrenheit(), 2))
		set("baro_inhg", num(p.Air.Baro.InHg(), 4))
		set("humidity_pct", num(p.Air.RH*100, 2))
		set("temp_c", num(p.Air.Temp.Celsius(), 2))
		set("baro_hpa", num(p.Air.Baro.HPa(), 2))
	}
	if p.Air.HasTrack {
		set("track_temp_f", num(p.Air.TrackTemp.Fahrenheit(), 2))
		set("track_temp_c", num(p.Air.TrackTemp.Celsius(), 2))
	}
	if p.Air.Wind > 0 || p.Air.WindFrom > 0 {
		set("wind_mph", num(p.Air.Wind.MPH(), 2))
		set("wind_kmh", num(p.Air.Wind.KMH(), 2))
		set("wind_from_deg", num(p.Air.WindFrom, 1))
		if p.Air.WindDirUnknown {
			set("wind_from_deg", "")
		}
	}
	if p.WeightLb > 0 {
		set("weight_lb", num(p.WeightLb, 1))
		set("weight_kg", num(p.WeightLb*weather.KgPerLb, 1))
	}
	return v
}

// CheckSlipField checks one field of a slip on its own (its form and range),
// as a prompt asks for it: col is the canonical column, name how the user
// knows it. The checks across fields (times increasing with distance, a
// trap speed plausible with its time) are ParsePass's.
func CheckSlipField(col, name, v string) error {
	v = strings.TrimSpace(v)
	if v == "" || col == "notes" {
		return nil
	}
	lo, hi, unit := 0.0, 0.0, "s"
	switch col {
	case "dial":
		lo, hi = DialRange[0], DialRange[1]
	case "rt":
		lo, hi = RTRange[0], RTRange[1]
	case "mph660", "mph1320":
		lo, hi, unit = MPHRange[0], MPHRange[1], "mph"
	case "change":
		_, err := ParseChange(name, v)
		return err
	default:
		i := -1
		for j, t := range TimerDistancesFt {
			if col == fmt.Sprintf("et%.0f", t) {
				i = j
			}
		}
		if i < 0 {
			return nil
		}
		lo, hi = ETRanges[i][0], ETRanges[i][1]
	}
	d, err := ParseSeconds(name, v)
	if err != nil {
		if unit == "mph" {
			return &weather.InputError{Field: name, Value: v, Reason: "is not a speed in mph (e.g. 123.45)"}
		}
		return err
	}
	return rangeCheck(name, d, lo, hi, unit)
}

// DialWarning is a word on a slip whose dial-in is far from what the car ran
// (a dial of 1.619 beside an 11.85 is most likely the 60-ft time typed in
// the dial's place), or "".
func DialWarning(p Pass) string {
	et, ft, ok := p.Finish()
	if !p.Dial.Valid || !ok {
		return ""
	}
	dial, ran := p.Dial.Decimal.InexactFloat64(), et.InexactFloat64()
	if gap := math.Abs(dial - ran); gap > math.Max(0.5, 0.1*ran) {
		return fmt.Sprintf("the dial %s is %.2f s from the %.0f-ft ET %s: check it is the dial-in (not another timer)",
			FormatSeconds(p.Dial.Decimal, 2), gap, ft, FormatSeconds(et, 3))
	}
	return ""
}
