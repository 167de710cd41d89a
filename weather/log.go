package weather

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"

	"pitcard/internal/csvtext"
)

// LogColumns are the weather log's columns, in order. The weather log is
// weather.csv: one reading per row, in the columns below.
// Units are in the names. Imperial columns are written; the metric columns
// are accepted on reading in their place.
//
//	date, time      local date (2006-01-02) and time (15:04 or 15:04:05)
//	temp_f          air temperature (or temp_c)
//	baro_inhg       barometer figure (or baro_hpa), of the kind in baro_kind
//	baro_kind       station (default) or altimeter
//	humidity_pct    relative humidity, or blank when dewpoint_f is given
//	dewpoint_f      dew point (or dewpoint_c), or blank
//	wind_mph        wind speed (or wind_kmh), blank = not read (0 = calm)
//	wind_from_deg   compass direction the wind blows from, blank = 0
//	track_temp_f    track surface temperature (or track_temp_c), blank = not read
//	notes           free text
var LogColumns = []string{"date", "time", "temp_f", "baro_inhg", "baro_kind", "humidity_pct",
	"dewpoint_f", "wind_mph", "wind_from_deg", "track_temp_f", "notes"}

// metric alternatives: column → the canonical column it stands for.
var logAlternatives = map[string]string{
	"temp_c": "temp_f", "baro_hpa": "baro_inhg", "dewpoint_c": "dewpoint_f",
	"wind_kmh": "wind_mph", "track_temp_c": "track_temp_f",
}

// Timestamps in pitcard's files: ISO date and 24-hour time.
const (
	DateLayout = "2006-01-02"
	TimeLayout = "15:04"
)

// ParseClock reads a time of day, "21:40" or "21:40:30", on the calendar
// date of day in loc. A time a daylight-saving change skips is refused and
// one it repeats is its first occurrence (LocalTime); a time on a race day
// that runs past midnight is DayStart.Clock's.
func ParseClock(s string, day time.Time, loc *time.Location) (time.Time, error) {
	h, m, sec, err := parseClock(s)
	if err != nil {
		return time.Time{}, err
	}
	y, mo, d := day.In(loc).Date()
	return LocalTime(y, mo, d, h, m, sec, loc, s)
}

// ParseDateTime reads a date and a time of day in loc.
func ParseDateTime(date, clock string, loc *time.Location) (time.Time, error) {
	d, err := time.ParseInLocation(DateLayout, strings.TrimSpace(date), loc)
	if err != nil {
		return time.Time{}, inputErr("date", date, "is not a date (use YYYY-MM-DD, e.g. 2026-06-13)")
	}
	return ParseClock(clock, d, loc)
}

// SortLog puts a weather log in time order, stably: readings of the same
// time keep their order. The one way pitcard orders readings.
func SortLog(log []Reading) {
	slices.SortStableFunc(log, func(a, b Reading) int { return a.Time.Compare(b.Time) })
}

// ReadLog reads a weather log from r. name is the file's name for messages,
// elev the track's elevation (to check altimeter settings), loc the zone its
// times are in. Every row is validated; the first bad row is an *InputError
// naming the file, line, column, value and range. The readings come back in
// time order.
func ReadLog(r io.Reader, name string, elev Length, loc *time.Location) ([]Reading, error) {
	cr, header, err := OpenCSV(r, name)
	if err != nil || header == nil {
		return nil, err
	}
	col, err := logHeader(header, name)
	if err != nil {
		return nil, err
	}
	var out []Reading
	bad := &BadReadings{File: name}
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, CSVError(name, err)
		}
		line, _ := cr.FieldPos(0)
		if ie := RepeatedHeader(rec, header, name, line); ie != nil {
			bad.Rows = append(bad.Rows, ie)
			continue
		}
		if len(rec) != len(header) {
			bad.Rows = append(bad.Rows, &InputError{File: name, Line: line, Field: "row",
				Reason: fmt.Sprintf("has %d fields, the header has %d", len(rec), len(header))})
			continue
		}
		rd, err := logRow(rec, col, elev, loc)
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) {
				return nil, err
			}
			bad.Rows = append(bad.Rows, ie.At(name, line))
			continue
		}
		out = append(out, rd)
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].Time.Before(out[j].Time) })
	if len(bad.Rows) > 0 {
		bad.Good = len(out)
		return out, bad
	}
	return out, nil
}

// BadReadings are the rows of a weather log that could not be read, each
// with its file, line, field and reason. ReadLog returns it beside the rows
// that could be: a command that only reads (the card, the list) uses those
// and says what was left out; one that writes the log refuses, so no row
// is lost.
type BadReadings struct {
	File string
	Rows []error
	Good int // the readings that were read
}

// Error lists the rows left out of the weather log.
func (b *BadReadings) Error() string {
	var s strings.Builder
	fmt.Fprintf(&s, "%s: %d row(s) cannot be read, left out (the other %d readings are used):", b.File, len(b.Rows), b.Good)
	for i, r := range b.Rows {
		if i == 10 {
			fmt.Fprintf(&s, "\n  ... and %d more", len(b.Rows)-i)
			break
		}
		s.WriteString("\n  " + r.Error())
	}
	return s.String()
}

// Unwrap gives the rows' errors (errors.As finds an InputError among them).
func (b *BadReadings) Unwrap() []error { return b.Rows }

// OpenCSV starts reading one of pitcard's CSV files: rows of any length
// (checked against the header by the caller), '#' lines as comments. It
// returns the reader and the header, or a nil header for an empty file.
func OpenCSV(r io.Reader, name string) (*csv.Reader, []string, error) {
	cr := csv.NewReader(&lineEnds{r: r})
	cr.FieldsPerRecord = -1
	cr.Comment = '#'
	header, err := cr.Read()
	if errors.Is(err, io.EOF) {
		return cr, nil, nil
	}
	if err != nil {
		return nil, nil, CSVError(name, err)
	}
	return cr, header, nil
}

// lineEnds reads r with every line ended by LF: a bare CR (old spreadsheets
// and loggers end lines with CR alone, which encoding/csv takes as part of a
// field) becomes LF, and a CRLF stays as it is (encoding/csv drops its CR).
// Line numbers are kept: one line end stays one.
type lineEnds struct {
	r       io.Reader
	pending bool // the last chunk ended with a CR, not yet written
	skipLF  bool // that CR was written as LF: an LF right after it is its CRLF's
}

func (l *lineEnds) Read(p []byte) (int, error) {
	if len(p) == 0 {
		return 0, nil
	}
	off := 0
	if l.pending { // the CR that ended the last chunk is a line end
		p[0], off, l.pending, l.skipLF = '\n', 1, false, true
	}
	n, err := l.r.Read(p[off:])
	w := off
	for i := off; i < off+n; i++ {
		b := p[i]
		if l.skipLF {
			l.skipLF = false
			if b == '\n' {
				continue
			}
		}
		if b == '\r' {
			if i+1 == off+n {
				l.pending = true // the chunk's last byte: the next one decides
				continue
			}
			if p[i+1] != '\n' {
				p[w] = '\n'
				w++
			}
			continue // a CRLF's CR: its LF follows
		}
		p[w] = b
		w++
	}
	if l.pending && err != nil {
		l.pending = false
		p[w] = '\n' // the CR's own place: w < off+n
		w++
	}
	return w, err
}

// LineEnds is data with every line ended by LF (bare CR and CRLF become LF):
// for readers of a whole file, as OpenCSV reads a stream.
func LineEnds(data []byte) []byte {
	if !bytes.ContainsRune(data, '\r') {
		return data
	}
	return bytes.ReplaceAll(bytes.ReplaceAll(data, []byte("\r\n"), []byte("\n")), []byte("\r"), []byte("\n"))
}

// RepeatedHeader is the error for a row that is a header line again (two
// exports joined into one file, perhaps with their columns in another
// order), or nil when rec is data. A row is a header when at least two of
// its fields, and at least half, are names of the header's columns: no value
// of a date, a time or a number is a column's name.
func RepeatedHeader(rec, header []string, name string, line int) *InputError {
	names := make(map[string]bool, len(header))
	for _, h := range header {
		names[strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))] = true
	}
	n := 0
	for _, f := range rec {
		if f = strings.ToLower(strings.TrimSpace(strings.TrimPrefix(f, "\ufeff"))); f != "" && names[f] {
			n++
		}
	}
	if n < 2 || 2*n < len(rec) {
		return nil
	}
	return &InputError{File: name, Line: line, Field: "row", Reason: "is the header line again (two files joined into one?): delete this line"}
}

// CSVError is a CSV reader's error as pitcard reports it: malformed CSV is an
// *InputError at its file and line; anything else (a failing disk) is not
// the user's input and keeps its own error.
func CSVError(name string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		// The parser's words only: the row is the user's to fix, not a csv error to check for.
		return &InputError{File: name, Line: pe.Line, Field: "row", Reason: "is not valid CSV: " + pe.Err.Error()}
	}
	return fmt.Errorf("%s: %w", name, err)
}

// Column is one column of a CSV header: its index, the name it was given,
// and whether it is the metric twin of the canonical column.
type Column struct {
	Index  int
	Name   string
	Metric bool
}

// ReadHeader maps a CSV header to the canonical columns of a file kind.
// columns are the canonical names, alternatives maps each metric twin to
// its canonical column, required must all be present; kind names the file
// kind in messages ("weather-log"). Names are trimmed and lower-cased (and a
// byte-order mark dropped); an unknown or doubled column is an error naming
// it and listing the valid ones.
func ReadHeader(header []string, file, kind string, columns []string, alternatives map[string]string, required []string) (map[string]Column, error) {
	col, extra, err := ReadHeaderExtra(header, file, kind, columns, alternatives, required)
	if len(extra) > 0 {
		var metric []string
		for m := range alternatives {
			metric = append(metric, m)
		}
		sort.Strings(metric)
		return nil, &InputError{File: file, Line: 1, Field: "column", Value: extra[0].Name,
			Reason: "is not a " + kind + " column (columns: " + strings.Join(columns, ", ") + "; metric: " + strings.Join(metric, ", ") + ")"}
	}
	return col, err
}

// ReadHeaderExtra is ReadHeader that keeps the columns it does not know
// (a crew's own columns) instead of refusing them: they come back in file
// order, named as written.
func ReadHeaderExtra(header []string, file, kind string, columns []string, alternatives map[string]string, required []string) (map[string]Column, []Column, error) {
	if len(header) == 1 && strings.ContainsAny(header[0], ";\t") {
		return nil, nil, &InputError{File: file, Line: 1, Field: "header", Value: header[0],
			Reason: "is separated by semicolons or tabs: pitcard reads comma-separated files (save as CSV with commas)"}
	}
	col := map[string]Column{}
	known := map[string]bool{}
	for _, c := range columns {
		known[c] = true
	}
	var extra []Column
	seen := map[string]bool{}
	for i, h := range header {
		h = strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
		canon, isMetric := h, false
		if alt, ok := alternatives[h]; ok {
			canon, isMetric = alt, true
		}
		if _, dup := col[canon]; dup || seen[h] {
			return nil, nil, &InputError{File: file, Line: 1, Field: "column", Value: h, Reason: "appears twice (or with its metric twin)"}
		}
		seen[h] = true
		if !known[canon] {
			if h == "" {
				return nil, nil, &InputError{File: file, Line: 1, Field: "column", Value: h, Reason: fmt.Sprintf("%d has no name in the header", i+1)}
			}
			extra = append(extra, Column{Index: i, Name: strings.TrimSpace(strings.TrimPrefix(header[i], "\ufeff"))})
			continue
		}
		col[canon] = Column{Index: i, Name: h, Metric: isMetric}
	}
	for _, need := range required {
		if _, ok := col[need]; !ok {
			return nil, extra, &InputError{File: file, Line: 1, Field: "column", Value: need, Reason: "is missing from the header"}
		}
	}
	return col, extra, nil
}

func logHeader(header []string, name string) (map[string]Column, error) {
	col, err := ReadHeader(header, name, "weather-log", LogColumns, logAlternatives, []string{"date", "time", "temp_f", "baro_inhg"})
	if err != nil {
		return nil, err
	}
	_, rh := col["humidity_pct"]
	_, dp := col["dewpoint_f"]
	if !rh && !dp {
		return nil, &InputError{File: name, Line: 1, Field: "column", Value: "humidity_pct", Reason: "is missing (give humidity_pct or dewpoint_f)"}
	}
	return col, nil
}

func logRow(rec []string, col map[string]Column, elev Length, loc *time.Location) (Reading, error) {
	get := func(c string) (string, string, bool) {
		x, ok := col[c]
		if !ok {
			return "", c, false
		}
		return strings.TrimSpace(rec[x.Index]), x.Name, x.Metric
	}
	var r Reading
	date, _, _ := get("date")
	clock, _, _ := get("time")
	t, err := ParseDateTime(date, clock, loc)
	if err != nil {
		return r, err
	}
	r.Time = t

	v, name, metric := get("temp_f")
	if r.Temp, err = ParseTemperature(v, unitIf(metric, DegC, DegF)); err != nil {
		return r, renamed(err, name)
	}
	v, name, metric = get("baro_inhg")
	if r.Baro, err = ParsePressure(v, unitIf(metric, UnitHPa, UnitInHg)); err != nil {
		return r, renamed(err, name)
	}
	if v, _, _ := get("baro_kind"); v != "" {
		if r.BaroKind, err = ParsePressureKind(strings.ToLower(v)); err != nil {
			return r, renamed(err, "baro_kind")
		}
	}
	rh, _, _ := get("humidity_pct")
	dp, dpName, dpMetric := get("dewpoint_f")
	switch {
	case dp != "":
		r.DewPointSet = true
		if r.DewPoint, err = ParseTemperature(dp, unitIf(dpMetric, DegC, DegF)); err != nil {
			return r, renamed(err, dpName)
		}
	case rh != "":
		if r.RH, err = ParsePercent(rh); err != nil {
			return r, renamed(err, "humidity_pct")
		}
	default:
		return r, inputErr("humidity_pct", "", "is blank, and so is dewpoint_f (give one)")
	}
	if v, name, metric := get("wind_mph"); v != "" {
		if r.Wind, err = ParseSpeed(v, unitIf(metric, UnitKMH, UnitMPH)); err != nil {
			return r, renamed(err, name)
		}
	} else {
		r.WindUnknown = true
	}
	if v, _, _ := get("wind_from_deg"); r.WindUnknown {
		// no speed: a direction alone says nothing of the wind
	} else if v != "" {
		if r.WindFrom, err = ParseDirection(v); err != nil {
			return r, renamed(err, "wind_from_deg")
		}
	} else if r.Wind > 0 {
		r.WindDirUnknown = true
	}
	if v, name, metric := get("track_temp_f"); v != "" {
		r.HasTrack = true
		if r.TrackTemp, err = ParseTemperature(v, unitIf(metric, DegC, DegF)); err != nil {
			return r, renamed(err, name)
		}
	}
	r.Note, _, _ = get("notes")
	r.Note = csvtext.Text(r.Note) // written by WriteLog with csvtext.Cell
	if err := r.Validate(elev); err != nil {
		var ie *InputError
		if errors.As(err, &ie) {
			return r, ie.Named(fileColumn(ie.Field))
		}
		return r, err
	}
	return r, nil
}

// renamed gives err, when it is (or wraps) an *InputError, the column name
// field; any other error passes unchanged rather than panicking.
func renamed(err error, field string) error {
	var ie *InputError
	if errors.As(err, &ie) {
		return ie.Named(field)
	}
	return err
}

// fileColumn names, in weather.csv's terms, a field Validate names in flag terms.
func fileColumn(field string) string {
	switch field {
	case "temp":
		return "temp_f"
	case "baro":
		return "baro_inhg"
	case "humidity":
		return "humidity_pct"
	case "dewpoint":
		return "dewpoint_f"
	case "wind":
		return "wind_mph"
	case "wind-from":
		return "wind_from_deg"
	case "track-temp":
		return "track_temp_f"
	}
	return field
}

func unitIf[U any](metric bool, m, imperial U) U {
	if metric {
		return m
	}
	return imperial
}

// WriteLog writes readings as a weather log with its header, in time order as
// given, in imperial columns. Values keep enough digits to come back as typed.
func WriteLog(w io.Writer, readings []Reading) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(LogColumns); err != nil {
		return err
	}
	notes := slices.Index(LogColumns, "notes")
	for _, r := range readings {
		rec := Record(r)
		// A note that begins with = opens in a spreadsheet as text, not as
		// a formula.
		rec[notes] = csvtext.Cell(rec[notes])
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// Record is r as a row of the weather log's columns (LogColumns).
func Record(r Reading) []string {
	rh, dp := "", ""
	if r.DewPointSet {
		dp = num(r.DewPoint.Fahrenheit(), 2)
	} else {
		rh = num(r.RH*100, 2)
	}
	track := ""
	if r.HasTrack {
		track = num(r.TrackTemp.Fahrenheit(), 2)
	}
	wind, from := num(r.Wind.MPH(), 2), windFrom(r)
	if r.WindUnknown {
		wind, from = "", ""
	}
	return []string{
		r.Time.Format(DateLayout), r.Time.Format("15:04:05"),
		num(r.Temp.Fahrenheit(), 2), num(r.Baro.InHg(), 4), r.BaroKind.String(),
		rh, dp, wind, from, track, r.Note,
	}
}

// num prints v rounded to at most decimals places, without trailing zeros.
func num(v float64, decimals int) string {
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if s == "-0" {
		s = "0"
	}
	return s
}

// windFrom is the wind direction column: blank when it was not read.
func windFrom(r Reading) string {
	if r.WindDirUnknown {
		return ""
	}
	return num(r.WindFrom, 1)
}
