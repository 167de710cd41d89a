package colmap

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"regexp"
	"slices"
	"strings"
	"time"
)

// A guess names each source column by its header: the words in it ("Temp",
// "Baro", "RH") and a unit written into it ("_f", "(C)", "inHg", "hPa").
// It is printed for the crew to confirm, never used silently.

// synonyms are header words for each field, most specific first; a header
// is matched by its words with units and punctuation removed.
var synonyms = []struct {
	field string
	kinds []Kind
	words []string
	// unless: a header holding one of these words is never this field
	// ("Track Temp" names a temperature, not the track).
	unless []string
}{
	{"track_temp", nil, []string{"track temp", "track temperature", "tracktemp", "surface temp", "surface"}, nil},
	// The track's name: "Track" alone is the name, never the temperature.
	{"track", []Kind{Logbook}, []string{"track name", "track", "venue", "strip"}, []string{"temp", "temperature", "surface"}},
	{"dewpoint", nil, []string{"dew point", "dewpoint", "dew"}, nil},
	{"wind_from", nil, []string{"wind from", "wind dir", "wind direction", "direction", "wdir", "dir"}, nil},
	{"wind", nil, []string{"wind speed", "wind"}, nil},
	{"humidity", nil, []string{"relative humidity", "humidity", "rh", "hum"}, nil},
	{"baro", nil, []string{"station pressure", "barometer", "baro", "pressure", "press"}, nil},
	{"temp", nil, []string{"air temp", "air temperature", "temperature", "temp", "air"}, nil},
	{"date", nil, []string{"date", "day"}, nil},
	{"time", nil, []string{"timestamp", "date time", "datetime", "stamp", "time", "clock"}, nil},
	{"notes", nil, []string{"notes", "note", "comment", "comments", "remarks"}, nil},
	{"session", []Kind{Logbook}, []string{"session", "round", "run"}, nil},
	{"lane", []Kind{Logbook}, []string{"lane"}, nil},
	{"dial", []Kind{Logbook}, []string{"dial in", "dial", "dialin"}, nil},
	{"rt", []Kind{Logbook}, []string{"reaction time", "reaction", "rt", "r t"}, nil},
	{"et60", []Kind{Logbook}, []string{"60 ft", "60ft", "60", "sixty"}, nil},
	{"et330", []Kind{Logbook}, []string{"330 ft", "330ft", "330"}, nil},
	{"mph660", []Kind{Logbook}, []string{"1 8 mph", "eighth mph", "660 mph", "mph 660", "mph 1 8"}, nil},
	{"et660", []Kind{Logbook}, []string{"1 8 et", "1 8", "eighth", "660 ft", "660ft", "660"}, nil},
	{"et1000", []Kind{Logbook}, []string{"1000 ft", "1000ft", "1000"}, nil},
	{"mph1320", []Kind{Logbook}, []string{"1 4 mph", "quarter mph", "1320 mph", "mph 1320", "mph", "speed", "trap"}, nil},
	{"et1320", []Kind{Logbook}, []string{"1 4 et", "1 4", "quarter", "1320 ft", "1320ft", "1320", "et"}, nil},
	{"weight", []Kind{Logbook}, []string{"weight", "wt"}, nil},
	// what changed on the car before the pass
	{"change", []Kind{Logbook}, []string{"car change", "setup change", "change", "changes", "changed"}, nil},
}

// header units: a unit written into a header, and what it is for.
var headerUnits = []struct {
	re   *regexp.Regexp
	unit string
}{
	{regexp.MustCompile(`(?i)(°\s*c|\(c\)|\[c\]|_c$|\bdeg ?c\b|\bcelsius\b)`), "C"},
	{regexp.MustCompile(`(?i)(°\s*f|\(f\)|\[f\]|_f$|\bdeg ?f\b|\bfahrenheit\b)`), "F"},
	{regexp.MustCompile(`(?i)in\.?\s?hg|inhg`), "inHg"},
	{regexp.MustCompile(`(?i)hpa`), "hPa"},
	{regexp.MustCompile(`(?i)mbar|\bmb\b`), "mbar"},
	{regexp.MustCompile(`(?i)kpa`), "kPa"},
	{regexp.MustCompile(`(?i)km/?h|kph`), "km/h"},
	{regexp.MustCompile(`(?i)m/s`), "m/s"},
	{regexp.MustCompile(`(?i)\bmph\b|_mph$`), "mph"},
	{regexp.MustCompile(`(?i)\bkg\b|_kg$`), "kg"},
	{regexp.MustCompile(`(?i)\blbs?\b|_lb$`), "lb"},
}

var nonWord = regexp.MustCompile(`[^a-z0-9]+`)

// words is a header reduced to its words: units, brackets and punctuation out.
func words(h string) string {
	h = strings.ToLower(h)
	for _, u := range headerUnits {
		if u.unit != "mph" { // "mph" names a trap speed column as well as a unit
			h = u.re.ReplaceAllString(h, " ")
		}
	}
	h = strings.NewReplacer("(", " ", ")", " ", "[", " ", "]", " ", "%", " ", "°", " ").Replace(h)
	return strings.TrimSpace(nonWord.ReplaceAllString(h, " "))
}

// timeLayouts are tried, in order, on the first value of a date or time column.
var timeLayouts = []string{
	"2006-01-02 15:04:05", "2006-01-02 15:04", "2006-01-02T15:04:05", "2006-01-02T15:04",
	"01/02/2006 3:04:05 PM", "01/02/2006 3:04 PM", "01/02/2006 15:04:05", "01/02/2006 15:04",
	"02.01.2006 15:04:05", "02.01.2006 15:04", "02/01/2006 15:04",
	"2006-01-02", "01/02/2006", "02/01/2006", "02.01.2006", "15:04:05", "15:04", "3:04 PM", "3:04:05 PM",
}

// Guess makes a map for data from its header and first rows. notes say
// what it could not place (those columns are skipped) and what it assumed.
// defaults are constants for required fields the file lacks (the folder's
// track), each said in a note.
func Guess(data []byte, name string, kind Kind, defaults map[string]string) (*Map, []string) {
	m := &Map{File: "(guessed)", Kind: kind, Fields: map[string]*Source{}, lines: map[string]int{}}
	lay := Sniff(data)
	m.Separator, m.Decimal = lay.Separator, lay.Decimal
	cr := csv.NewReader(bytes.NewReader(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))))
	cr.Comma = lay.Separator
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if err != nil {
		return m, []string{"the header could not be read"}
	}
	first, _ := cr.Read()
	var notes []string
	for i, raw := range header {
		h := strings.TrimSpace(raw)
		w := words(h)
		field := ""
		for _, s := range synonyms {
			if len(s.kinds) > 0 && s.kinds[0] != kind {
				continue
			}
			if _, taken := m.Fields[s.field]; taken {
				continue
			}
			if matchWords(w, s.words) && !hasWord(w, s.unless) {
				field = s.field
				break
			}
		}
		if field == "" {
			m.Skip = append(m.Skip, h)
			notes = append(notes, "column "+quote(h)+" not recognized: skipped")
			continue
		}
		src := &Source{Column: h}
		for _, u := range headerUnits {
			if u.re.MatchString(h) && unitFits(field, u.unit) {
				src.Unit = u.unit
				break
			}
		}
		if (field == "time" || field == "date") && i < len(first) {
			v := strings.TrimSpace(first[i])
			for _, l := range timeLayouts {
				if _, err := time.Parse(l, v); err == nil {
					if !(field == "time" && (l == "15:04" || l == "15:04:05")) && !(field == "date" && l == "2006-01-02") {
						src.Format = l
					}
					if eu := strings.NewReplacer("01/02", "02/01").Replace(l); eu != l {
						if _, err := time.Parse(eu, v); err == nil {
							notes = append(notes, fmt.Sprintf("%s %q reads as month/day (%s); if it is day/month, make its format %q", h, v, l, eu))
						}
					}
					break
				}
			}
		}
		m.Fields[field] = src
		m.Order = append(m.Order, field)
	}
	for _, f := range []string{"track"} {
		if _, ok := m.Fields[f]; ok || kind != Logbook {
			continue
		}
		if v := defaults[f]; v != "" {
			m.Fields[f] = &Source{Value: v}
			m.Order = append(m.Order, f)
			notes = append(notes, fmt.Sprintf("no %s column: every pass is taken as at %s (this folder's); change the constant if they ran elsewhere", f, v))
		} else {
			notes = append(notes, "no "+f+" column: add a constant, e.g. track: Juniper Bend Raceway")
		}
	}
	return m, notes
}

func matchWords(w string, candidates []string) bool {
	for _, c := range candidates {
		if w == c || strings.HasPrefix(w, c+" ") || strings.HasSuffix(w, " "+c) {
			return true
		}
	}
	return false
}

// hasWord reports whether the header's words w hold one of list.
func hasWord(w string, list []string) bool {
	for _, x := range strings.Fields(w) {
		if slices.Contains(list, x) {
			return true
		}
	}
	return false
}

func unitFits(field, unit string) bool {
	typ := map[string]valueType{}
	for _, f := range logbookFields {
		typ[f.name] = f.typ
	}
	for _, f := range weatherFields {
		typ[f.name] = f.typ
	}
	return containsFold(unitsOf[typ[field]], unit)
}

func quote(s string) string { return `"` + s + `"` }
