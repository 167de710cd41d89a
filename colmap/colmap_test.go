package colmap

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"pitcard/logbook"
	"pitcard/weather"
)

func readMapFile(t testing.TB, name string, kind Kind) *Map {
	t.Helper()
	data, err := os.ReadFile(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	m, err := Read(data, name, kind)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// The demo event's files, exported through each example map and imported
// back through it, come back byte for byte.
func TestExampleMapsRoundTrip(t *testing.T) {
	demo, err := os.ReadFile("../event/demo/logbook.csv")
	if err != nil {
		t.Fatal(err)
	}
	m := readMapFile(t, "spreadsheet-map.yaml", Logbook)
	var sheet bytes.Buffer
	if err := m.Export(&sheet, demo); err != nil {
		t.Fatal(err)
	}
	// the demo's first pass, its 60-ft time with a decimal comma
	first := strings.Split(strings.Split(string(demo), "\n")[1], ",")
	want := "28/03/2026;11:00;Salt Creek Dragway;test;left;;0,017;" + strings.Replace(first[7], ".", ",", 1)
	if !strings.HasPrefix(sheet.String(), "Date;Time;Track;Run;Lane;Dial;R/T;60'") || !strings.Contains(sheet.String(), want) {
		t.Fatalf("the spreadsheet layout:\n%.400s", sheet.String())
	}
	tr, err := m.Translate(sheet.Bytes(), "season.csv")
	if err != nil {
		t.Fatal(err)
	}
	lb, err := logbook.ReadFile(bytes.NewReader(tr.CSV), "season.csv", time.Local)
	if err != nil || len(lb.Bad) > 0 {
		t.Fatalf("%v %v", err, lb.Bad)
	}
	var back bytes.Buffer
	if err := logbook.Write(&back, lb.Passes); err != nil {
		t.Fatal(err)
	}
	if back.String() != string(demo) {
		t.Errorf("the logbook through the spreadsheet map is not the same:\n%s", firstDiff(string(demo), back.String()))
	}

	wlog, err := os.ReadFile("../event/demo/weather.csv")
	if err != nil {
		t.Fatal(err)
	}
	wm := readMapFile(t, "meter-map.yaml", Weather)
	var export bytes.Buffer
	if err := wm.Export(&export, wlog); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(export.String(), "Stamp;Temp (C);Baro (hPa)") || !strings.Contains(export.String(), "13.06.2026 13:30;") {
		t.Fatalf("the meter layout:\n%.300s", export.String())
	}
	tr, err = wm.Translate(export.Bytes(), "meter.csv")
	if err != nil {
		t.Fatal(err)
	}
	readings, err := weather.ReadLog(bytes.NewReader(tr.CSV), "meter.csv", weather.Feet(2240), time.Local)
	if err != nil {
		t.Fatal(err)
	}
	back.Reset()
	if err := weather.WriteLog(&back, readings); err != nil {
		t.Fatal(err)
	}
	if back.String() != string(wlog) {
		t.Errorf("the weather log through the meter map is not the same:\n%s", firstDiff(string(wlog), back.String()))
	}
}

func firstDiff(a, b string) string {
	al, bl := strings.Split(a, "\n"), strings.Split(b, "\n")
	for i := range al {
		if i >= len(bl) || al[i] != bl[i] {
			other := ""
			if i < len(bl) {
				other = bl[i]
			}
			return "line " + string(rune('0'+i%10)) + ":\nwant " + al[i] + "\ngot  " + other
		}
	}
	return "(longer)"
}

// The meter's own export reads, with its decimal commas and units converted.
func TestTheMeterExportReads(t *testing.T) {
	m := readMapFile(t, "meter-map.yaml", Weather)
	data, err := os.ReadFile("testdata/meter-export.csv")
	if err != nil {
		t.Fatal(err)
	}
	tr, err := m.Translate(data, "meter-export.csv")
	if err != nil {
		t.Fatal(err)
	}
	readings, err := weather.ReadLog(bytes.NewReader(tr.CSV), "meter-export.csv", weather.Feet(2240), time.Local)
	if err != nil {
		t.Fatal(err)
	}
	if len(readings) != 3 {
		t.Fatalf("%d readings", len(readings))
	}
	r := readings[1]
	// 34.4 °C = 93.92 °F; 932.1 hPa = 27.525 inHg (1 inHg = 33.8639 hPa, NIST SP 811);
	// 6.4 km/h = 3.977 mph (1 mph = 1.609344 km/h exactly).
	if got := r.Temp.Fahrenheit(); got < 93.91 || got > 93.93 {
		t.Errorf("temperature %.3f °F, want 93.92", got)
	}
	if got := r.Baro.InHg(); got < 27.52 || got > 27.53 {
		t.Errorf("barometer %.4f inHg, want 27.525", got)
	}
	if got := r.Wind.MPH(); got < 3.97 || got > 3.98 {
		t.Errorf("wind %.3f mph, want 3.977", got)
	}
	if r.Time.Format("2006-01-02 15:04") != "2026-06-13 14:00" || r.Note != "shade on the line" || !r.HasTrack {
		t.Errorf("reading %+v", r)
	}
	if tr.Layout.String() != "semicolon-separated, decimal comma" {
		t.Errorf("layout %s", tr.Layout)
	}
}

// The bad-input tour of the maps: each a clear error with the map's file and line.
func TestMapErrorsNameTheMapAndLine(t *testing.T) {
	meter, _ := os.ReadFile("testdata/meter-export.csv")
	for _, c := range []struct {
		name, mapText string
		want          []string
	}{
		{"a missing column", "time: {column: Stamp, format: \"02.01.2006 15:04\"}\ntemp: {column: \"Temperature\", unit: C}\nbaro: {column: \"Baro (hPa)\", unit: hPa}\nhumidity: {column: \"RH (%)\"}\n",
			[]string{"m.yaml line 2", "temp.column", `"Temperature"`, "is not a column of meter.csv", `"Temp (C)"`}},
		{"a unit that is not one", "time: {column: Stamp, format: \"02.01.2006 15:04\"}\ntemp: {column: \"Temp (C)\", unit: kelvinish}\n",
			[]string{"m.yaml line 2", "temp.unit", "kelvinish", "use F, C"}},
		{"a date layout that does not match", "time: {column: Stamp, format: \"01/02/2006 3:04 PM\"}\ntemp: {column: \"Temp (C)\", unit: C}\nbaro: {column: \"Baro (hPa)\", unit: hPa}\nhumidity: {column: \"RH (%)\"}\nskip: [\"Dew (C)\", \"Wind (km/h)\", Dir, \"Surface (C)\", Batt, Note]\n",
			[]string{"meter.csv line 2", "Stamp", "13.06.2026 13:30", `does not match the time format "01/02/2006 3:04 PM" of m.yaml line 1`}},
		{"a required field left out", "time: {column: Stamp, format: \"02.01.2006 15:04\"}\ntemp: {column: \"Temp (C)\", unit: C}\nhumidity: {column: \"RH (%)\"}\n",
			[]string{"m.yaml line 1", "baro", "is not in the map: it is required"}},
		{"no humidity nor dew point", "time: {column: Stamp, format: \"02.01.2006 15:04\"}\ntemp: {column: \"Temp (C)\", unit: C}\nbaro: {column: \"Baro (hPa)\"}\n",
			[]string{"m.yaml line 1", "humidity", "nor dewpoint"}},
		{"an unmapped column", "time: {column: Stamp, format: \"02.01.2006 15:04\"}\ntemp: {column: \"Temp (C)\", unit: C}\nbaro: {column: \"Baro (hPa)\", unit: hPa}\nhumidity: {column: \"RH (%)\"}\n",
			[]string{"meter.csv line 1", `"Dew (C)"`, "is not in the map m.yaml: map it to a field or list it under skip"}},
		{"a field pitcard does not have", "time: {column: Stamp}\nozone: {column: O3}\n", []string{"m.yaml line 2", "ozone", "is not a field of the weather log"}},
		{"a bad separator", "separator: \"|\"\n", []string{"m.yaml line 1", "separator", `is not ",", ";" or "tab"`}},
		{"a format on a number", "temp: {column: T, format: \"2006\"}\n", []string{"m.yaml line 1", "temp.format", "for date and time fields only"}},
		{"a map for the logbook", "kind: logbook\n", []string{"m.yaml line 1", "is not weather"}},
		{"not a layout", "time: {column: Stamp, format: \"dd.mm.yyyy\"}\n", []string{"m.yaml line 1", "time.format", "is not a Go time layout"}},
		{"a bad barometer kind", "baro: {column: B, kind: gauge}\n", []string{"m.yaml line 1", "baro.kind", "station or altimeter"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			m, err := Read([]byte(c.mapText), "m.yaml", Weather)
			if err == nil {
				_, err = m.Translate(meter, "meter.csv")
			}
			if err == nil {
				t.Errorf("%s: accepted", c.name)
				return
			}
			var ie *weather.InputError
			if !errors.As(err, &ie) {
				t.Errorf("%s: not an input error: %v", c.name, err)
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%s: %q lacks %q", c.name, err, w)
				}
			}
		})
	}
}

// A bad value in a mapped row is refused by pitcard's own reader, at the
// source file's line (a quoted field spanning lines included).
func TestRowErrorsPointAtTheSourceLine(t *testing.T) {
	m := readMapFile(t, "meter-map.yaml", Weather)
	data := []byte("Stamp;Temp (C);Baro (hPa);RH (%);Dew (C);Wind (km/h);Dir;Surface (C);Batt;Note\n" +
		"13.06.2026 13:30;33,6;932,2;22;9,0;5,0;190;61,1;87;\"two\nlines\"\n" +
		"13.06.2026 14:00;91;932,1;21;9,1;6,4;200;60,6;87;\n")
	tr, err := m.Translate(data, "meter.csv")
	if err != nil {
		t.Fatal(err)
	}
	_, err = weather.ReadLog(bytes.NewReader(tr.CSV), "meter.csv", weather.Feet(2240), time.Local)
	err = tr.Remap(err)
	if err == nil || !strings.Contains(err.Error(), `meter.csv line 4: Temp (C) "91" is outside -40..140 °F (read as 195.8 °F)`) {
		t.Errorf("91 °C on the file's line 4 must be refused there: %v", err)
	}
}

func TestSniff(t *testing.T) {
	for _, c := range []struct {
		data string
		sep  rune
		dec  byte
	}{
		{"a,b,c\n1.5,2,3\n", ',', '.'},
		{"a;b;c\n1,5;2;3\n", ';', ','},
		{"a;b;c\n1.5;2;3\n", ';', '.'},
		{"a\tb\tc\n1,5\t2\t3\n", '\t', ','},
		{"\xef\xbb\xbfa;b\r\n12,75;x\r\n", ';', ','},
		{"name;notes\nx;\"a, b\"\n", ';', '.'},
	} {
		t.Run(fmt.Sprintf("separator %q, decimal %q", c.sep, c.dec), func(t *testing.T) {
			l := Sniff([]byte(c.data))
			if l.Separator != c.sep || l.Decimal != c.dec {
				t.Errorf("%q: %q %q, want %q %q", c.data, l.Separator, l.Decimal, c.sep, c.dec)
			}
		})
	}
}

func TestGuessReadsUnitsFromHeaders(t *testing.T) {
	m, notes := Guess([]byte("Stamp;Temp (C);Baro (hPa);RH (%);Wind (km/h);Dir;Surface (C);Batt\n13.06.2026 13:30;33,6;932,2;22;5,0;190;61,1;87\n"), "x.csv", Weather, nil)
	want := map[string]Source{
		"time": {Column: "Stamp", Format: "02.01.2006 15:04"}, "temp": {Column: "Temp (C)", Unit: "C"}, "baro": {Column: "Baro (hPa)", Unit: "hPa"},
		"humidity": {Column: "RH (%)"}, "wind": {Column: "Wind (km/h)", Unit: "km/h"}, "wind_from": {Column: "Dir"}, "track_temp": {Column: "Surface (C)", Unit: "C"},
	}
	for f, w := range want {
		t.Run(f, func(t *testing.T) {
			got := m.Fields[f]
			if got == nil || got.Column != w.Column || got.Unit != w.Unit || got.Format != w.Format {
				t.Errorf("%s: %+v, want %+v", f, got, w)
			}
		})
	}
	if len(m.Skip) != 1 || m.Skip[0] != "Batt" || len(notes) != 1 {
		t.Errorf("skip %v, notes %v", m.Skip, notes)
	}
	if m.Separator != ';' || m.Decimal != ',' {
		t.Errorf("layout %q %q", m.Separator, m.Decimal)
	}
	// What it prints is a map that reads back the same.
	again, err := Read(m.YAML(), "guess.yaml", Weather)
	if err != nil {
		t.Fatalf("%v\n%s", err, m.YAML())
	}
	if string(again.YAML()) != string(m.YAML()) {
		t.Errorf("the printed map does not read back the same:\n%s\n%s", m.YAML(), again.YAML())
	}
	lb, _ := Guess([]byte("date,time,temp_f,baro_inhg,Pressure inHg,humidity\n2026-06-13,14:00,90,27.5,27.5,20\n"), "y.csv", Weather, nil)
	if s := lb.Fields["temp"]; s == nil || s.Unit != "F" || s.Column != "temp_f" {
		t.Errorf("temp_f: %+v", s)
	}
	if s := lb.Fields["baro"]; s == nil || s.Unit != "inHg" {
		t.Errorf("baro_inhg: %+v", s)
	}
	sheet, _ := Guess([]byte("Date,Time,Run,Lane,Dial,R/T,60',1/8,1/8 mph,1/4,1/4 mph\n06/13/2026,19:23,E1,left,11.45,.021,1.61,7.3,94,11.44,117\n"), "s.csv", Logbook, nil)
	for f, col := range map[string]string{"session": "Run", "rt": "R/T", "et60": "60'", "et660": "1/8", "mph660": "1/8 mph", "et1320": "1/4", "mph1320": "1/4 mph"} {
		t.Run(f, func(t *testing.T) {
			if s := sheet.Fields[f]; s == nil || s.Column != col {
				t.Errorf("%s: %+v, want column %q", f, s, col)
			}
		})
	}
	if s := sheet.Fields["date"]; s == nil || s.Format != "01/02/2006" {
		t.Errorf("date: %+v", s)
	}
}

// FuzzReadMap: any map file is read or refused naming the map, never a
// panic; a map read translates any file without a panic.
func FuzzReadMap(f *testing.F) {
	for _, name := range []string{"meter-map.yaml", "spreadsheet-map.yaml"} {
		data, _ := os.ReadFile(filepath.Join("testdata", name))
		f.Add(string(data), "Stamp;Temp (C)\n13.06.2026 13:30;33,6\n")
	}
	f.Add("time: {column: a}\ntemp: b\n", "a,b\n1,2\n")
	f.Add("skip: 3\n", "")
	f.Fuzz(func(t *testing.T, mapText, file string) {
		for _, kind := range []Kind{Weather, Logbook} {
			m, err := Read([]byte(mapText), "f.yaml", kind)
			if err != nil {
				if !strings.Contains(err.Error(), "f.yaml") {
					t.Fatalf("the error does not name the map: %v", err)
				}
				continue
			}
			tr, err := m.Translate([]byte(file), "x.csv")
			if err == nil {
				_ = tr.Remap(errors.New("x"))
			}
			var out bytes.Buffer
			_ = m.Export(&out, []byte(file))
			_ = m.YAML()
		}
	})
}

// BenchmarkImport100000 translates a 100,000-row spreadsheet through the
// example map and reads it as pitcard reads an import (every row checked).
func BenchmarkImport100000(b *testing.B) {
	m := readMapFile(b, "spreadsheet-map.yaml", Logbook)
	var buf bytes.Buffer
	buf.WriteString("Date;Time;Track;Run;Lane;Dial;R/T;60';330';1/8;1/8 mph;1000';1/4;1/4 mph;Air °C;Baro hPa;RH %;Track °C;Wind km/h;Wind from;Weight kg;Comments\n")
	start := time.Date(2020, 1, 1, 8, 0, 0, 0, time.Local)
	for i := 0; i < 100000; i++ {
		t := start.Add(time.Duration(i) * 20 * time.Minute)
		buf.WriteString(t.Format("02/01/2006;15:04") + ";Juniper Bend Raceway;test;left;;0,021;1,602;4,655;7,268;94,02;9,494;11,431;117,61;29,5;932,1;31;48,3;6,4;190;1519,5;\n")
	}
	data := buf.Bytes()
	b.ResetTimer()
	for range b.N {
		tr, err := m.Translate(data, "sheet.csv")
		if err != nil {
			b.Fatal(err)
		}
		lb, err := logbook.ReadFile(bytes.NewReader(tr.CSV), "sheet.csv", time.Local)
		if err != nil || len(lb.Bad) > 0 || len(lb.Passes) != 100000 {
			b.Fatalf("%v %d bad, %d passes", err, len(lb.Bad), len(lb.Passes))
		}
	}
}

// A byte-order mark, CRLF line ends and tabs read as commas and LF do.
func TestBOMCRLFAndTabs(t *testing.T) {
	m, err := Read([]byte("time: {column: When, format: \"2006-01-02 15:04\"}\ntemp: {column: T, unit: C}\nbaro: {column: P, unit: hPa}\nhumidity: {column: RH}\n"), "t.yaml", Weather)
	if err != nil {
		t.Fatal(err)
	}
	for name, data := range map[string]string{
		"tabs, CRLF, BOM": "\xef\xbb\xbfWhen\tT\tP\tRH\r\n2026-06-13 14:00\t34,4\t932,1\t21\r\n",
		"commas":          "When,T,P,RH\n2026-06-13 14:00,34.4,932.1,21\n",
		"semicolons":      "When;T;P;RH\n2026-06-13 14:00;34.4;932.1;21\n",
	} {
		t.Run(name, func(t *testing.T) {
			tr, err := m.Translate([]byte(data), "x.csv")
			if err != nil {
				t.Errorf("%s: %v", name, err)
				return
			}
			log, err := weather.ReadLog(bytes.NewReader(tr.CSV), "x.csv", weather.Feet(2240), time.Local)
			if err != nil || len(log) != 1 || log[0].Temp.Fahrenheit() < 93.91 || log[0].Temp.Fahrenheit() > 93.93 {
				t.Errorf("%s: %v %+v", name, err, log)
			}
		})
	}
}

// A column named "Track" is the track's name and "Track Temp (F)" its
// surface temperature, in either order: the guess once mapped "Track" to the
// temperature, skipped the real one and then failed on every row.
func TestGuessTellsTrackFromTrackTemp(t *testing.T) {
	for _, tc := range []struct{ name, header, row string }{
		{"name first", "Date,Time,Track,Track Temp (F),Lane,1/4,1/4 mph", "2026-06-13,19:23,Juniper Bend,118,left,11.44,117"},
		{"temperature first", "Date,Time,Track Temp (F),Track,Lane,1/4,1/4 mph", "2026-06-13,19:23,118,Juniper Bend,left,11.44,117"},
		{"track name", "Date,Time,Track Name,Track Temperature,Lane,1/4,1/4 mph", "2026-06-13,19:23,Juniper Bend,118,left,11.44,117"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m, notes := Guess([]byte(tc.header+"\n"+tc.row+"\n"), "s.csv", Logbook, nil)
			if s := m.Fields["track"]; s == nil || !strings.HasPrefix(s.Column, "Track") || strings.Contains(s.Column, "Temp") {
				t.Errorf("track: %+v (notes %v)", s, notes)
			}
			if s := m.Fields["track_temp"]; s == nil || !strings.Contains(s.Column, "Temp") {
				t.Errorf("track_temp: %+v (notes %v)", s, notes)
			}
			tr, err := m.Translate([]byte(tc.header+"\n"+tc.row+"\n"), "s.csv")
			if err != nil {
				t.Fatalf("translate: %v", err)
			}
			if !strings.Contains(string(tr.CSV), "Juniper Bend") || !strings.Contains(string(tr.CSV), "118") {
				t.Errorf("translated:\n%s", tr.CSV)
			}
		})
	}
}
