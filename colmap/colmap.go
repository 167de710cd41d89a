// Package colmap reads and writes CSV files in other layouts than pitcard's
// own, as a column map describes them.
// It does not judge the values it carries: pitcard's own readers check every
// translated row, and it opens no file itself.
//
// Such a file is a handheld meter's export, or a spreadsheet saved on a
// European laptop. A column map (a small YAML file) says which source column
// is which pitcard field, in which unit or date layout, which fields are
// constants and which columns to leave out; the separator and the decimal mark are detected or
// set. Translate turns such a file into pitcard's own CSV, row for row, so
// the usual readers check every row exactly as they check pitcard's files;
// Export writes pitcard's CSV in the map's layout.
//
// Values keep their unit by carrying it ("31.5C", "979hPa"): pitcard's own
// parsers convert them, and refuse them with their usual messages.
package colmap

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"
	"time"

	"go.yaml.in/yaml/v3"

	"pitcard/internal/yamlfile"
	"pitcard/weather"
)

// Kind is the pitcard file a map fills.
type Kind string

const (
	Weather Kind = "weather" // a map for weather.csv
	Logbook Kind = "logbook" // a map for logbook.csv
)

// value types of fields: what a unit may be and how a value is read.
type valueType int

const (
	text valueType = iota
	date
	clock
	temperature
	pressure
	percent
	speed
	degrees
	seconds
	trapSpeed
	weight
	// crew is a crew column (a setup item, a note of their own): text,
	// except that a plain number in the file's decimal comma ("15,5") is
	// read as the number it is, so a numeric setup item checks it.
	crew
)

// field is one pitcard field a map may fill: its name in the map, its
// column in pitcard's CSV, the type of its values.
type field struct {
	name, column string
	typ          valueType
}

var weatherFields = []field{
	{"date", "date", date}, {"time", "time", clock}, {"temp", "temp_f", temperature}, {"baro", "baro_inhg", pressure},
	{"baro_kind", "baro_kind", text}, {"humidity", "humidity_pct", percent}, {"dewpoint", "dewpoint_f", temperature},
	{"wind", "wind_mph", speed}, {"wind_from", "wind_from_deg", degrees}, {"track_temp", "track_temp_f", temperature},
	{"notes", "notes", text},
}

var logbookFields = []field{
	{"date", "date", date}, {"time", "time", clock}, {"track", "track", text}, {"session", "session", text},
	{"lane", "lane", text}, {"dial", "dial", seconds}, {"rt", "rt", seconds},
	{"et60", "et60", seconds}, {"et330", "et330", seconds}, {"et660", "et660", seconds}, {"et1000", "et1000", seconds},
	{"et1320", "et1320", seconds}, {"mph660", "mph660", trapSpeed}, {"mph1320", "mph1320", trapSpeed},
	{"temp", "temp_f", temperature}, {"baro", "baro_inhg", pressure}, {"humidity", "humidity_pct", percent},
	{"track_temp", "track_temp_f", temperature}, {"wind", "wind_mph", speed}, {"wind_from", "wind_from_deg", degrees},
	{"weight", "weight_lb", weight}, {"notes", "notes", text}, {"change", "change", text},
}

func fieldsOf(k Kind) []field {
	if k == Weather {
		return weatherFields
	}
	return logbookFields
}

// units a value of each type may be given in, as the map writes them.
var unitsOf = map[valueType][]string{
	temperature: {"F", "C"},
	pressure:    {"inHg", "hPa", "mbar", "kPa"},
	speed:       {"mph", "km/h", "m/s", "kt"},
	trapSpeed:   {"mph"},
	weight:      {"lb", "kg"},
	percent:     {"%"},
	seconds:     {"s"},
	degrees:     {"deg"},
}

// Source is where one pitcard field comes from: a column of the source file
// (with its unit, date layout and barometer kind) or a constant.
type Source struct {
	Column string // the source column's header, as written
	Unit   string // the unit its bare numbers are in; "" for pitcard's
	Format string // a Go time layout for date and time fields
	Kind   string // for baro: station or altimeter
	Value  string // a constant, when Column is ""
	Line   int    // the map's line, for messages
}

// Map is a column map.
type Map struct {
	File      string // the map's file name, for messages
	Kind      Kind
	Separator rune // 0: detect
	Decimal   byte // 0: detect; '.' or ','
	Fields    map[string]*Source
	Order     []string // the fields in the map's order
	Skip      []string // source columns left out on purpose
	// Extra are logbook fields that are not pitcard's (a crew's own
	// columns), kept as crew columns.
	lines map[string]int
}

func (m *Map) errAt(line int, field, value, reason string) error {
	return &weather.InputError{File: m.File, Line: line, Field: field, Value: value, Reason: reason}
}

// Read reads a map file for kind.
func Read(data []byte, name string, kind Kind) (*Map, error) {
	doc, err := yamlfile.Parse(data, name)
	if err != nil {
		return nil, err
	}
	m := &Map{File: name, Kind: kind, Fields: map[string]*Source{}, lines: doc.Lines}
	var root yaml.Node
	if err := yaml.Unmarshal(data, &root); err != nil {
		// The YAML parser's words only: what to check for is the map's InputError.
		return nil, m.errAt(0, "map", "", "is not YAML: "+strings.TrimPrefix(err.Error(), "yaml: "))
	}
	if len(root.Content) == 0 || root.Content[0].Kind != yaml.MappingNode {
		return nil, m.errAt(1, "map", "", "must be a mapping of pitcard fields to source columns (temp: {column: \"Temp (C)\", unit: C})")
	}
	known := map[string]field{}
	for _, f := range fieldsOf(kind) {
		known[f.name] = f
	}
	top := root.Content[0]
	for i := 0; i+1 < len(top.Content); i += 2 {
		k, v := top.Content[i], top.Content[i+1]
		switch k.Value {
		case "kind":
			if v.Value != string(kind) {
				return nil, m.errAt(k.Line, "kind", v.Value, fmt.Sprintf("is not %s: this map is for another file (weather or logbook)", kind))
			}
		case "separator":
			switch v.Value {
			case ",", ";":
				m.Separator = rune(v.Value[0])
			case "tab", "\t":
				m.Separator = '\t'
			default:
				return nil, m.errAt(k.Line, "separator", v.Value, `is not ",", ";" or "tab"`)
			}
		case "decimal":
			switch v.Value {
			case ".", ",":
				m.Decimal = v.Value[0]
			default:
				return nil, m.errAt(k.Line, "decimal", v.Value, `is not "." or ","`)
			}
		case "skip":
			if v.Kind != yaml.SequenceNode {
				return nil, m.errAt(k.Line, "skip", v.Value, "must be a list of source columns: skip: [Battery, Serial]")
			}
			for _, c := range v.Content {
				m.Skip = append(m.Skip, c.Value)
			}
		default:
			f, ok := known[k.Value]
			if !ok && kind == Weather {
				return nil, m.errAt(k.Line, "field", k.Value, "is not a field of the weather log (fields: "+fieldNames(kind)+"; and kind, separator, decimal, skip)")
			}
			if !ok && !validExtra(k.Value) {
				return nil, m.errAt(k.Line, "field", k.Value, "is not a logbook field ("+fieldNames(kind)+") nor a crew column name (letters, digits and _)")
			}
			s, err := m.source(k, v, f, ok)
			if err != nil {
				return nil, err
			}
			if _, dup := m.Fields[k.Value]; dup {
				return nil, m.errAt(k.Line, "field", k.Value, "is mapped twice")
			}
			m.Fields[k.Value] = s
			m.Order = append(m.Order, k.Value)
		}
	}
	if err := m.checkRequired(top.Line); err != nil {
		return nil, err
	}
	return m, nil
}

func validExtra(s string) bool {
	if s == "" || len(s) > 40 {
		return false
	}
	for _, r := range s {
		if !(r == '_' || r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9') {
			return false
		}
	}
	return true
}

func fieldNames(k Kind) string {
	var names []string
	for _, f := range fieldsOf(k) {
		names = append(names, f.name)
	}
	return strings.Join(names, ", ")
}

// source reads one field's entry: a scalar is a constant, a mapping names
// its column and options.
func (m *Map) source(k, v *yaml.Node, f field, known bool) (*Source, error) {
	s := &Source{Line: k.Line}
	switch v.Kind {
	case yaml.ScalarNode:
		s.Value = v.Value
		return s, nil
	case yaml.MappingNode:
	default:
		return nil, m.errAt(k.Line, k.Value, "", "must be a constant (track: Juniper Bend) or {column: NAME, unit: U, format: LAYOUT}")
	}
	for i := 0; i+1 < len(v.Content); i += 2 {
		ok, ov := v.Content[i], v.Content[i+1]
		switch ok.Value {
		case "column":
			s.Column = ov.Value
		case "unit":
			s.Unit = ov.Value
		case "format":
			s.Format = ov.Value
		case "kind":
			s.Kind = ov.Value
		case "value":
			s.Value = ov.Value
		default:
			return nil, m.errAt(ok.Line, k.Value+"."+ok.Value, ov.Value, "is not an option of a field (column, unit, format, kind, value)")
		}
	}
	if s.Column == "" && s.Value == "" {
		return nil, m.errAt(k.Line, k.Value, "", "has neither a column nor a value")
	}
	if s.Unit != "" {
		units := unitsOf[f.typ]
		if !known || !containsFold(units, s.Unit) {
			why := "takes no unit"
			if len(units) > 0 {
				why = "is not a unit of this field (use " + strings.Join(units, ", ") + ")"
			}
			return nil, m.errAt(m.lineOf(k.Value+".unit", k.Line), k.Value+".unit", s.Unit, why)
		}
	}
	if s.Format != "" {
		if f.typ != date && f.typ != clock {
			return nil, m.errAt(m.lineOf(k.Value+".format", k.Line), k.Value+".format", s.Format, "is for date and time fields only")
		}
		if !strings.ContainsAny(s.Format, "0123456789") {
			return nil, m.errAt(m.lineOf(k.Value+".format", k.Line), k.Value+".format", s.Format,
				`is not a Go time layout (written with the reference time: "2006-01-02", "01/02/2006 3:04 PM", "02.01.2006 15:04")`)
		}
	}
	if s.Kind != "" {
		if k.Value != "baro" {
			return nil, m.errAt(m.lineOf(k.Value+".kind", k.Line), k.Value+".kind", s.Kind, "is for baro only (station or altimeter)")
		}
		if _, err := weather.ParsePressureKind(s.Kind); err != nil {
			return nil, m.errAt(m.lineOf(k.Value+".kind", k.Line), k.Value+".kind", s.Kind, "is not station or altimeter")
		}
		if m.Kind == Logbook && strings.EqualFold(s.Kind, "altimeter") {
			return nil, m.errAt(m.lineOf(k.Value+".kind", k.Line), k.Value+".kind", s.Kind, "is not for the logbook: it holds station pressure (convert altimeter settings first)")
		}
	}
	return s, nil
}

func (m *Map) lineOf(key string, def int) int {
	if l := m.lines[key]; l > 0 {
		return l
	}
	return def
}

func containsFold(list []string, s string) bool {
	for _, x := range list {
		if strings.EqualFold(x, s) {
			return true
		}
	}
	return false
}

// checkRequired refuses a map that leaves out a field pitcard needs.
func (m *Map) checkRequired(line int) error {
	has := func(f string) bool { _, ok := m.Fields[f]; return ok }
	timeHasDate := has("time") && layoutHasDate(m.Fields["time"].Format)
	var need []string
	switch m.Kind {
	case Weather:
		need = []string{"time", "temp", "baro"}
		if !has("humidity") && !has("dewpoint") {
			return m.errAt(line, "humidity", "", "is not in the map, nor dewpoint: one of them is required")
		}
	case Logbook:
		need = []string{"time", "track", "session", "lane"}
		ok := false
		for _, t := range []string{"et60", "et330", "et660", "et1000", "et1320"} {
			ok = ok || has(t)
		}
		if !ok {
			return m.errAt(line, "et1320", "", "is not in the map, nor any other elapsed time (et60 ... et1320): one is required")
		}
	}
	if !timeHasDate {
		need = append(need, "date")
	}
	for _, f := range need {
		if !has(f) {
			return m.errAt(line, f, "", "is not in the map: it is required (a column, or a constant such as track: Juniper Bend)")
		}
	}
	return nil
}

func layoutHasDate(layout string) bool {
	return strings.Contains(layout, "2006") || strings.Contains(layout, "06") && strings.Contains(layout, "01")
}

// Layout is a file's separator and decimal mark.
type Layout struct {
	Separator rune
	Decimal   byte
	Detected  bool // either was found in the file, not set in the map
}

// String says the layout in words, as a map's report prints it.
func (l Layout) String() string {
	sep := map[rune]string{',': "comma", ';': "semicolon", '\t': "tab"}[l.Separator]
	dec := "decimal point"
	if l.Decimal == ',' {
		dec = "decimal comma"
	}
	return sep + "-separated, " + dec
}

// Sniff finds a file's separator (the commonest of comma, semicolon and tab
// in its header) and decimal mark (a comma inside numbers of the first rows,
// when the separator is not a comma).
func Sniff(data []byte) Layout {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	lines := strings.SplitN(string(data), "\n", 12)
	l := Layout{Separator: ',', Decimal: '.', Detected: true}
	if len(lines) == 0 {
		return l
	}
	head := lines[0]
	best := strings.Count(head, ",")
	for _, s := range []rune{';', '\t'} {
		if n := strings.Count(head, string(s)); n > best {
			best, l.Separator = n, s
		}
	}
	if l.Separator == ',' {
		return l
	}
	for _, line := range lines[1:] {
		for _, f := range strings.Split(line, string(l.Separator)) {
			f = strings.Trim(strings.TrimSpace(f), `"`)
			if i := strings.IndexByte(f, ','); i > 0 && i < len(f)-1 {
				if _, err := strconv.ParseFloat(strings.Replace(f, ",", ".", 1), 64); err == nil {
					l.Decimal = ','
					return l
				}
			}
		}
	}
	return l
}

// Layout is the map's layout for data, with what it leaves out detected.
func (m *Map) Layout(data []byte) Layout {
	l := Sniff(data)
	if m.Separator != 0 {
		l.Separator = m.Separator
	}
	if m.Decimal != 0 {
		l.Decimal = m.Decimal
	}
	l.Detected = m.Separator == 0 || m.Decimal == 0
	return l
}

// Translation is a source file in pitcard's own CSV.
type Translation struct {
	CSV    []byte
	Layout Layout
	lines  []int // the source line of each row of CSV (index: row, from 0 for the first data row)
	// To say an error in the source's words: the source, and each of
	// pitcard's columns' source column (and whether a unit was added).
	source []byte
	from   map[string]fromColumn
}

type fromColumn struct {
	name      string
	index     int
	converted bool
}

// SourceLine is the source file's line of line n of the translated CSV.
func (t *Translation) SourceLine(n int) int {
	if n >= 2 && n-2 < len(t.lines) {
		return t.lines[n-2]
	}
	return n
}

// Remap points an error of the translated CSV's reader (an *InputError or
// a list of them) at the source file's lines.
func (t *Translation) Remap(err error) error {
	var ie *weather.InputError
	var list interface{ Unwrap() []error }
	switch {
	case errors.As(err, &list):
		for _, e := range list.Unwrap() {
			if errors.As(e, &ie) && ie.Line > 1 {
				ie.Line = t.SourceLine(ie.Line)
				t.inSourceWords(ie)
			}
		}
	case errors.As(err, &ie) && ie.Line > 1:
		ie.Line = t.SourceLine(ie.Line)
		t.inSourceWords(ie)
	}
	return err
}

// Fix points one error of the translated CSV at the source file's line,
// naming the source column and its value as written.
func (t *Translation) Fix(ie *weather.InputError) {
	if ie != nil && ie.Line > 1 {
		ie.Line = t.SourceLine(ie.Line)
		t.inSourceWords(ie)
	}
}

// inSourceWords names the source column and its value as written in an
// error about one of pitcard's columns.
func (t *Translation) inSourceWords(ie *weather.InputError) {
	f, ok := t.from[ie.Field]
	if !ok || t.source == nil {
		return
	}
	cr := csv.NewReader(bytes.NewReader(bytes.TrimPrefix(t.source, []byte("\xef\xbb\xbf"))))
	cr.Comma = t.Layout.Separator
	cr.FieldsPerRecord = -1
	for {
		rec, err := cr.Read()
		if err != nil {
			return
		}
		if line, _ := cr.FieldPos(0); line == ie.Line && f.index < len(rec) {
			if f.converted && ie.Value != "" {
				ie.Reason += " (read as " + ie.Value + ")"
			}
			ie.Field, ie.Value = f.name, strings.TrimSpace(rec[f.index])
			return
		}
	}
}

// Translate reads data (the source file called name) through the map into
// pitcard's CSV of the map's kind.
func (m *Map) Translate(data []byte, name string) (*Translation, error) {
	tr := &Translation{Layout: m.Layout(data)}
	cr := csv.NewReader(bytes.NewReader(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))))
	cr.Comma = tr.Layout.Separator
	cr.FieldsPerRecord = -1
	cr.LazyQuotes = false
	header, err := cr.Read()
	if errors.Is(err, io.EOF) {
		return nil, &weather.InputError{File: name, Line: 1, Field: "header", Reason: "is missing: the file is empty"}
	}
	if err != nil {
		return nil, weather.CSVError(name, err)
	}
	index, err := m.checkHeader(header, name, tr.Layout)
	if err != nil {
		return nil, err
	}
	cols := m.outColumns(index)
	tr.source, tr.from = data, map[string]fromColumn{}
	for _, c := range cols {
		if c.idx >= 0 && c.f.typ != date && c.f.typ != clock {
			tr.from[c.col] = fromColumn{name: c.src.Column, index: c.idx, converted: c.src.Unit != ""}
		}
	}
	var buf bytes.Buffer
	cw := csv.NewWriter(&buf)
	head := make([]string, len(cols))
	for i, c := range cols {
		head[i] = c.col
	}
	_ = cw.Write(head)
	rt := rowTranslator{m: m, name: name, index: index, cols: cols, layout: tr.Layout, row: make([]string, len(cols))}
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, weather.CSVError(name, err)
		}
		line, _ := cr.FieldPos(0)
		if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
			continue // a blank line
		}
		if ie := weather.RepeatedHeader(rec, header, name, line); ie != nil {
			return nil, ie
		}
		if len(rec) != len(header) {
			return nil, &weather.InputError{File: name, Line: line, Field: "row",
				Reason: fmt.Sprintf("has %d fields, the header has %d (read as %s)", len(rec), len(header), tr.Layout)}
		}
		row, err := rt.translate(rec, line)
		if err != nil {
			return nil, err
		}
		_ = cw.Write(row)
		tr.lines = append(tr.lines, line)
	}
	cw.Flush()
	tr.CSV = buf.Bytes()
	return tr, nil
}

// checkHeader is the file's columns by name. Every column the map names
// must be there; every other column must be named or skipped (a misspelt
// map would otherwise drop data silently); no column twice.
func (m *Map) checkHeader(header []string, name string, layout Layout) (map[string]int, error) {
	index := map[string]int{}
	for i, h := range header {
		h = strings.TrimSpace(h)
		if _, dup := index[h]; dup {
			return nil, &weather.InputError{File: name, Line: 1, Field: "column", Value: h, Reason: "appears twice in the header"}
		}
		index[h] = i
	}
	used := map[string]bool{}
	for _, f := range m.Order {
		s := m.Fields[f]
		if s.Column == "" {
			continue
		}
		if _, ok := index[s.Column]; !ok {
			return nil, m.errAt(m.lineOf(f+".column", s.Line), f+".column", s.Column,
				fmt.Sprintf("is not a column of %s (its columns: %s; read as %s)", name, quoteList(header), layout))
		}
		used[s.Column] = true
	}
	for _, c := range m.Skip {
		used[c] = true
	}
	for _, h := range header {
		if h = strings.TrimSpace(h); !used[h] {
			return nil, &weather.InputError{File: name, Line: 1, Field: "column", Value: h,
				Reason: fmt.Sprintf("is not in the map %s: map it to a field or list it under skip", m.File)}
		}
	}
	return index, nil
}

// outColumn is one column of the translation: its name in pitcard's CSV,
// the field it fills, the map's source for it and the source column's
// place (-1 for a constant).
type outColumn struct {
	col string
	f   field
	src *Source
	idx int
}

// outColumns are the translation's columns: pitcard's, in its order, then
// the crew columns in the map's.
func (m *Map) outColumns(index map[string]int) []outColumn {
	known := map[string]field{}
	for _, f := range fieldsOf(m.Kind) {
		known[f.name] = f
	}
	indexOf := func(s *Source) int {
		if s.Column == "" {
			return -1
		}
		return index[s.Column]
	}
	var cols []outColumn
	for _, f := range fieldsOf(m.Kind) {
		if f.name == "date" && m.Fields["date"] == nil {
			cols = append(cols, outColumn{col: "date", f: f, idx: -1})
			continue
		}
		if s := m.Fields[f.name]; s != nil {
			col := f.column
			if f.typ == weight && strings.EqualFold(s.Unit, "kg") {
				col = "weight_kg" // the logbook's metric twin reads it as it is
			}
			cols = append(cols, outColumn{col: col, f: f, src: s, idx: indexOf(s)})
			if f.name == "baro" && s.Kind != "" && m.Kind == Weather && m.Fields["baro_kind"] == nil {
				cols = append(cols, outColumn{col: "baro_kind", f: field{"baro_kind", "baro_kind", text}, src: &Source{Value: strings.ToLower(s.Kind)}, idx: -1})
			}
		}
	}
	for _, f := range m.Order {
		if _, ok := known[f]; !ok {
			cols = append(cols, outColumn{col: f, f: field{f, f, crew}, src: m.Fields[f], idx: indexOf(m.Fields[f])})
		}
	}
	return cols
}

// rowTranslator turns one source row into a row of pitcard's CSV: dates
// and times by the map's layouts, numbers with a point and their unit.
type rowTranslator struct {
	m      *Map
	name   string // the source file, for messages
	index  map[string]int
	cols   []outColumn
	layout Layout
	row    []string // reused: each row is written before the next is read
}

// parse reads a date or time field by its map's layout.
func (rt *rowTranslator) parse(src *Source, field, v string, line int) (time.Time, error) {
	t, err := time.ParseInLocation(src.Format, v, time.Local)
	if err != nil {
		return t, &weather.InputError{File: rt.name, Line: line, Field: src.Column, Value: v,
			Reason: fmt.Sprintf("does not match the %s format %q of %s line %d", field, src.Format, rt.m.File, rt.m.lineOf(field+".format", src.Line))}
	}
	return t, nil
}

// translate is the row rec (the file's line) in pitcard's columns.
func (rt *rowTranslator) translate(rec []string, line int) ([]string, error) {
	m := rt.m
	timeSrc, dateSrc := m.Fields["time"], m.Fields["date"]
	var when time.Time
	haveWhen := false
	if timeSrc != nil && timeSrc.Format != "" {
		if v := strings.TrimSpace(valueOf(rec, rt.index, timeSrc)); v != "" {
			t, err := rt.parse(timeSrc, "time", v, line)
			if err != nil {
				return nil, err
			}
			when, haveWhen = t, true
		}
	}
	for i, c := range rt.cols {
		v := ""
		switch {
		case c.idx >= 0:
			v = strings.TrimSpace(rec[c.idx])
		case c.src != nil:
			v = c.src.Value
		}
		switch c.f.typ {
		case date:
			switch {
			case dateSrc == nil && haveWhen:
				v = when.Format(weather.DateLayout)
			case dateSrc != nil && dateSrc.Format != "" && v != "":
				d, err := rt.parse(dateSrc, "date", v, line)
				if err != nil {
					return nil, err
				}
				v = d.Format(weather.DateLayout)
			}
		case clock:
			if haveWhen {
				v = when.Format("15:04:05")
				if m.Kind == Logbook {
					v = when.Format(weather.TimeLayout)
				}
			}
		case text:
		case crew:
			if rt.layout.Decimal == ',' && commaNumber.MatchString(v) {
				v = strings.Replace(v, ",", ".", 1)
			}
		default:
			if v != "" && rt.layout.Decimal == ',' {
				v = strings.Replace(v, ",", ".", 1)
			}
			if v != "" && c.src != nil && c.src.Unit != "" {
				v = withUnit(v, c.src.Unit, c.f.typ)
			}
		}
		rt.row[i] = strings.ReplaceAll(strings.ReplaceAll(v, "\r", " "), "\n", " ")
	}
	return rt.row, nil
}

// commaNumber and pointNumber are a plain number with a decimal comma and
// with a decimal point: what a crew column's cell is converted between.
var (
	commaNumber = regexp.MustCompile(`^\s*[+-]?[0-9]+,[0-9]+\s*$`)
	pointNumber = regexp.MustCompile(`^[+-]?[0-9]+\.[0-9]+$`)
)

func valueOf(rec []string, index map[string]int, s *Source) string {
	if s.Column == "" {
		return s.Value
	}
	return rec[index[s.Column]]
}

// withUnit writes a value with its unit so pitcard's parser converts it.
// (A weight in kg goes to the logbook's own weight_kg column instead.)
func withUnit(v, unit string, typ valueType) string {
	switch typ {
	case temperature, pressure, speed: // the types whose parsers read a unit
	default:
		return v // pitcard's own unit (%, s, degrees, mph traps) or weight_kg's column
	}
	if _, err := strconv.ParseFloat(v, 64); err != nil {
		return v // not a bare number: the reader says what is wrong
	}
	return v + unit
}

func round6(x float64) float64 { return math.Round(x*1e6) / 1e6 }

func quoteList(h []string) string {
	q := make([]string, len(h))
	for i, s := range h {
		q[i] = strconv.Quote(strings.TrimSpace(s))
	}
	return strings.Join(q, ", ")
}

// Export writes pitcard's CSV (from its own writer) to w in the map's
// layout: the map's columns in its order, values in its units and date
// layouts, its separator and decimal mark (a comma and a point when the map
// leaves them to detection). Constants and skipped columns are not written.
func (m *Map) Export(w io.Writer, canonical []byte) error {
	cr := csv.NewReader(bytes.NewReader(canonical))
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if err != nil {
		return err
	}
	at := map[string]int{}
	for i, h := range header {
		at[h] = i
	}
	known := map[string]field{}
	for _, f := range fieldsOf(m.Kind) {
		known[f.name] = f
	}
	sep, dec, err := m.exportMarks()
	if err != nil {
		return err
	}
	names, fields := m.exportColumns()
	cw := csv.NewWriter(w)
	cw.Comma = sep
	if err := cw.Write(names); err != nil {
		return err
	}
	row := make([]string, len(fields))
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return err
		}
		get := func(col string) string {
			if i, ok := at[col]; ok && i < len(rec) {
				return rec[i]
			}
			return ""
		}
		for i, f := range fields {
			row[i] = m.exportValue(f, known, get, dec)
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// exportMarks is the separator and decimal mark an export writes: the
// map's, or a comma and a point when it leaves them to detection. A comma
// for both is an error.
func (m *Map) exportMarks() (sep rune, dec byte, err error) {
	sep, dec = m.Separator, m.Decimal
	if sep == 0 {
		sep = ','
	}
	if dec == 0 {
		dec = '.'
	}
	if sep == ',' && dec == ',' {
		return 0, 0, m.errAt(0, "decimal", ",", "cannot go with a comma separator")
	}
	return sep, dec, nil
}

// exportColumns is the header an export writes and the field of each of
// its columns, in the map's order; constants and skipped columns are left
// out.
func (m *Map) exportColumns() (names, fields []string) {
	for _, f := range m.Order {
		if s := m.Fields[f]; s.Column != "" {
			names, fields = append(names, s.Column), append(fields, f)
		}
	}
	return names, fields
}

// exportValue is field f of one of pitcard's rows (get reads its columns)
// as the map writes it: dates and times in the map's layout, quantities in
// its unit, numbers with its decimal mark dec. A field pitcard does not know
// (a crew column) is copied, a plain number given the map's decimal mark.
// known holds the fields of the map's kind by name.
func (m *Map) exportValue(f string, known map[string]field, get func(string) string, dec byte) string {
	s := m.Fields[f]
	fd, isKnown := known[f]
	if !isKnown { // a crew column: a plain number takes the map's decimal mark
		v := get(f)
		if dec == ',' && pointNumber.MatchString(v) {
			v = strings.Replace(v, ".", ",", 1)
		}
		return v
	}
	v := get(fd.column)
	switch fd.typ {
	case date, clock:
		if s.Format != "" && v != "" {
			t, err := parseCanonicalTime(get("date"), get("time"))
			if err == nil {
				v = t.Format(s.Format)
			}
		}
	case text, seconds, percent, degrees, trapSpeed:
	default:
		if v != "" && s.Unit != "" {
			v = inUnit(v, s.Unit, fd.typ)
		}
	}
	if dec == ',' && fd.typ != text && fd.typ != date && fd.typ != clock {
		v = strings.Replace(v, ".", ",", 1)
	}
	return v
}

func parseCanonicalTime(d, c string) (time.Time, error) {
	for _, layout := range []string{"2006-01-02 15:04:05", "2006-01-02 15:04"} {
		if t, err := time.ParseInLocation(layout, d+" "+c, time.Local); err == nil {
			return t, nil
		}
	}
	return time.Time{}, errors.New("not a date and time")
}

// inUnit converts a value of pitcard's CSV (in its imperial columns) to
// unit, with weather's own units: one of unit is parsed for its size.
func inUnit(v, unit string, typ valueType) string {
	var y float64
	switch typ {
	case temperature:
		t, err := weather.ParseTemperature(v, weather.DegF)
		if err != nil {
			return v
		}
		y = t.Fahrenheit()
		if strings.EqualFold(unit, "C") {
			y = t.Celsius()
		}
	case pressure:
		p, err := weather.ParsePressure(v, weather.UnitInHg)
		one, err1 := weather.ParsePressure("1"+unit, weather.UnitInHg)
		if err != nil || err1 != nil {
			return v
		}
		y = float64(p) / float64(one)
	case speed:
		sp, err := weather.ParseSpeed(v, weather.UnitMPH)
		one, err1 := weather.ParseSpeed("1"+unit, weather.UnitMPH)
		if err != nil || err1 != nil {
			return v
		}
		y = float64(sp) / float64(one)
	case weight:
		x, err := strconv.ParseFloat(v, 64)
		if err != nil {
			return v
		}
		y = x
		if strings.EqualFold(unit, "kg") {
			y = x * weather.KgPerLb
		}
	default:
		return v
	}
	return strconv.FormatFloat(round6(y), 'f', -1, 64)
}

// YAML writes the map as a map file, commented.
func (m *Map) YAML() []byte {
	var b strings.Builder
	cmd := map[Kind]string{Weather: "weather", Logbook: "log"}[m.Kind]
	fmt.Fprintf(&b, "# pitcard column map for the %s (pitcard %s import FILE --map THIS.yaml)\n", m.Kind, cmd)
	fmt.Fprintf(&b, "kind: %s\n", m.Kind)
	if m.Separator != 0 {
		fmt.Fprintf(&b, "separator: %s\n", map[rune]string{',': `","`, ';': `";"`, '\t': "tab"}[m.Separator])
	}
	if m.Decimal != 0 {
		fmt.Fprintf(&b, "decimal: %q\n", string(m.Decimal))
	}
	for _, f := range m.Order {
		s := m.Fields[f]
		if s.Column == "" {
			fmt.Fprintf(&b, "%s: %s\n", f, yamlString(s.Value))
			continue
		}
		parts := []string{"column: " + yamlString(s.Column)}
		if s.Unit != "" {
			parts = append(parts, "unit: "+yamlString(s.Unit))
		}
		if s.Format != "" {
			parts = append(parts, "format: "+yamlString(s.Format))
		}
		if s.Kind != "" {
			parts = append(parts, "kind: "+s.Kind)
		}
		fmt.Fprintf(&b, "%s: {%s}\n", f, strings.Join(parts, ", "))
	}
	if len(m.Skip) > 0 {
		q := make([]string, len(m.Skip))
		for i, s := range m.Skip {
			q[i] = yamlString(s)
		}
		fmt.Fprintf(&b, "skip: [%s]\n", strings.Join(q, ", "))
	}
	return []byte(b.String())
}

func yamlString(s string) string {
	out, err := yaml.Marshal(s)
	if err != nil {
		return strconv.Quote(s)
	}
	q := strings.TrimSpace(string(out))
	if strings.ContainsAny(q, "\n") {
		return strconv.Quote(s)
	}
	// Flow mappings end at commas and braces: quote anything with them, or
	// with spaces and brackets, for the eye.
	if strings.ContainsAny(s, " ,{}[]:#()%'") && !strings.HasPrefix(q, `"`) && !strings.HasPrefix(q, "'") {
		return strconv.Quote(s)
	}
	return q
}
