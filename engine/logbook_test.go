package engine

import (
	"bytes"
	"errors"
	"strings"
	"testing"
	"time"

	"pitcard/weather"
)

const header = "date,time,track,session,lane,dial,rt,et60,et330,et660,et1000,et1320,mph660,mph1320,temp_f,baro_inhg,humidity_pct,track_temp_f,wind_mph,wind_from_deg,weight_lb,notes\n"

// A believable quarter-mile slip for an 11.5-second car: quarter ET ≈ 1.57 ×
// eighth ET and quarter MPH ≈ 1.26 × eighth MPH (common practice, from memory).
const goodRow = "2026-06-13,18:42,Test Strip,E1,left,11.52,0.021,1.612,4.689,7.321,9.605,11.538,92.44,116.79,88,28.91,38,121,6,210,3350,\n"

func TestReadLogbook(t *testing.T) {
	passes, err := ReadLogbook(strings.NewReader(header+goodRow), "logbook.csv", time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	p := passes[0]
	if p.Track != "Test Strip" || p.Session != (Session{Elimination, 1}) || p.Lane != Left || !p.Dial.Decimal.Equal(d("11.52")) ||
		!p.RT.Decimal.Equal(d(".021")) || !p.ET[4].Decimal.Equal(d("11.538")) || !p.MPH1320.Decimal.Equal(d("116.79")) ||
		!p.HasAir || p.WeightLb != 3350 || p.Line != 2 {
		t.Errorf("read %+v", p)
	}
	var buf bytes.Buffer
	if err := WriteLogbook(&buf, passes); err != nil {
		t.Fatal(err)
	}
	if buf.String() != header+goodRow {
		t.Errorf("round trip changed the row:\n%s\nwant\n%s", buf.String(), header+goodRow)
	}
}

func TestReadLogbookMetric(t *testing.T) {
	csv := "date,time,track,session,lane,et1320,temp_c,baro_hpa,humidity_pct,track_temp_c,wind_kmh,weight_kg\n" +
		"2026-06-13,18:42,Test Strip,T1,right,11.538,31,979,38,50,10,1520\n"
	passes, err := ReadLogbook(strings.NewReader(csv), "logbook.csv", time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	p := passes[0]
	// 1 lb = 0.45359237 kg exactly (standard definition): 1520 kg = 3351.0 lb.
	if p.Air.Temp.Celsius() < 30.99 || p.Air.Temp.Celsius() > 31.01 || p.Air.Baro.HPa() != 979 || p.WeightLb < 3350.9 || p.WeightLb > 3351.1 {
		t.Errorf("metric row read as %+v", p)
	}
}

func TestReadLogbookErrors(t *testing.T) {
	row := func(edit func([]string)) string {
		f := strings.Split(strings.TrimSuffix(goodRow, "\n"), ",")
		edit(f)
		return strings.Join(f, ",") + "\n"
	}
	cases := []struct {
		csv  string
		want []string
	}{
		{header + row(func(f []string) { f[14] = "190" }), []string{"logbook.csv line 2", "temp_f", "190", "-40..140 °F"}},
		{header + goodRow + row(func(f []string) { f[1] = "19:10"; f[6] = "2.5" }), []string{"line 3", "rt", "2.5", "-1..2 s"}},
		{header + row(func(f []string) { f[10] = "7.0" }), []string{"et1000", "7.0", "after et660", "increase with distance"}},
		{header + row(func(f []string) { f[13] = "216.79" }), []string{"mph1320", "216.79", "not plausible with et1320"}},
		{header + row(func(f []string) { f[4] = "center" }), []string{"lane", "center", "left or right"}},
		{header + row(func(f []string) { f[3] = "Q3" }), []string{"session", "Q3"}},
		{header + row(func(f []string) { f[11] = "11.5s" }), []string{"et1320", "11.5s", "seconds"}},
		{header + row(func(f []string) { f[15] = "" }), []string{"baro_inhg", "blank while other weather"}},
		{header + row(func(f []string) { f[15] = "33.5" }), []string{"baro_inhg", "15..32.5 inHg"}},
		{header + row(func(f []string) { f[20] = "200" }), []string{"weight_lb", "500..10000"}},
		{header + row(func(f []string) { f[7], f[8], f[9], f[10], f[11], f[12], f[13] = "", "", "", "", "", "", "" }), []string{"a pass needs at least one elapsed time"}},
		{header + goodRow + goodRow, []string{"line 3", "same pass as line 2", "entered twice"}},
		{"date,time,track,session,lane\n", []string{"no elapsed-time column"}},
		{header + "2026-06-13,18:42,Test Strip\n", []string{"line 2", "fields"}},
		{"date;time;track;session;lane;et1320\n", []string{"line 1", "semicolons", "commas"}},
	}
	for _, tc := range cases {
		_, err := ReadLogbook(strings.NewReader(tc.csv), "logbook.csv", time.UTC)
		if err == nil {
			t.Errorf("no error for\n%s", tc.csv)
			continue
		}
		for _, w := range tc.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%q lacks %q", err, w)
			}
		}
	}
	// every bad row is reported at once
	many := header + row(func(f []string) { f[14] = "190" }) + row(func(f []string) { f[1] = "19:00"; f[4] = "x" })
	_, err := ReadLogbook(strings.NewReader(many), "logbook.csv", time.UTC)
	var re RowErrors
	if !errors.As(err, &re) || len(re) != 2 {
		t.Errorf("want 2 row errors, got %v", err)
	}
}

// One bad row does not cost the logbook: the good rows are read, the bad
// ones named and kept as they were, and a crew's own column (fuel) is
// carried through a rewrite with its values.
func TestLogbookKeepsBadRowsAndCrewColumns(t *testing.T) {
	file := "date,time,track,session,lane,fuel,et60,et1320,notes\n" +
		"2026-06-13,18:42,Test Strip,E1,left,8 gal,1.612,11.538,\n" +
		"2026-06-13,19:30,Test Strip,E2,left,7 gal,1.610,11.54\n" + // cut short: one field missing
		"2026-06-13,20:15,Test Strip,E3,left,6 gal,1.605,41.5,\n" // out of range
	lb, err := ReadLogbookFile(strings.NewReader(file), "logbook.csv", time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	if len(lb.Passes) != 1 || len(lb.Bad) != 2 || len(lb.Extra) != 1 || lb.Extra[0] != "fuel" || lb.Passes[0].Extra["fuel"] != "8 gal" {
		t.Fatalf("read %d passes, %d bad, extra %v", len(lb.Passes), len(lb.Bad), lb.Extra)
	}
	for i, want := range [][]string{{"line 3", "has 8 fields, the header has 9"}, {"line 4", "et1320", "41.5", "3.5..40 s"}} {
		for _, w := range want {
			if !strings.Contains(lb.Bad[i].Error(), w) {
				t.Errorf("bad row %d: %q lacks %q", i, lb.Bad[i], w)
			}
		}
	}
	if _, err := ReadLogbook(strings.NewReader(file), "logbook.csv", time.UTC); err == nil {
		t.Error("the strict reader (import) took a file with bad rows")
	}
	added := lb.Passes[0]
	added.Time, added.Session, added.Extra = added.Time.Add(3*time.Hour), Session{Elimination, 4}, map[string]string{"fuel": "5 gal"}
	lb.Passes = append(lb.Passes, added)
	var buf bytes.Buffer
	if err := lb.Write(&buf); err != nil {
		t.Fatal(err)
	}
	written := buf.String()
	again, err := ReadLogbookFile(&buf, "logbook.csv", time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	if len(again.Passes) != 2 || len(again.Bad) != 2 || again.Passes[1].Extra["fuel"] != "5 gal" || again.Passes[0].Extra["fuel"] != "8 gal" {
		t.Errorf("after a rewrite: %d passes, %d bad, fuel %q %q\n%s", len(again.Passes), len(again.Bad),
			again.Passes[0].Extra["fuel"], again.Passes[1].Extra["fuel"], written)
	}
	if !strings.Contains(written, "2026-06-13,19:30,Test Strip,E2,left,7 gal,1.610,11.54\n") {
		t.Errorf("the short row was not kept as it was:\n%s", written)
	}
}

func TestParseSession(t *testing.T) {
	cases := map[string]Session{"T1": {TimeTrial, 1}, "tt2": {TimeTrial, 2}, "time trial 3": {TimeTrial, 3},
		"E1": {Elimination, 1}, "R4": {Elimination, 4}, "round 5": {Elimination, 5}, "2": {Elimination, 2}, "test": {Test, 0}}
	for in, want := range cases {
		if got, err := ParseSession(in); err != nil || got != want {
			t.Errorf("ParseSession(%q) = %v, %v", in, got, err)
		}
	}
	for _, bad := range []string{"", "Q1", "E0", "T", "round -1", "E100"} {
		if _, err := ParseSession(bad); err == nil {
			t.Errorf("ParseSession(%q) accepted", bad)
		}
	}
}

func FuzzReadLogbook(f *testing.F) {
	f.Add(header + goodRow)
	f.Add("date,time,track,session,lane,et660,mph660,temp_c,baro_hpa,humidity_pct\n2026-06-13,18:42,X,T1,r,7.3,92,31,979,40\n")
	f.Add(header + strings.Replace(goodRow, "11.538", "-0", 1))
	f.Add("date,time,track,session,lane,et1320\n\"a\nb\",1,2,3,4,5\n")
	f.Fuzz(func(t *testing.T, s string) {
		passes, err := ReadLogbook(strings.NewReader(s), "logbook.csv", time.UTC)
		if err != nil {
			var re RowErrors
			var ie *weather.InputError
			switch {
			case errors.As(err, &re):
				for _, e := range re {
					if e.File != "logbook.csv" || e.Field == "" {
						t.Fatalf("row error %q does not name its file and field", e)
					}
				}
			case errors.As(err, &ie):
				if ie.File != "logbook.csv" {
					t.Fatalf("error %q does not name the file", err)
				}
			default:
				t.Fatalf("unexpected error type %T: %v", err, err)
			}
			return
		}
		// what was accepted writes and reads back the same
		var buf bytes.Buffer
		if err := WriteLogbook(&buf, passes); err != nil {
			t.Fatal(err)
		}
		again, err := ReadLogbook(&buf, "logbook.csv", time.UTC)
		if err != nil || len(again) != len(passes) {
			t.Fatalf("accepted rows did not read back: %v\n%s", err, buf.String())
		}
	})
}

// Slips print reaction times without the leading zero, ".520" (common practice).
func TestParseSecondsAsSlipsPrintThem(t *testing.T) {
	for in, want := range map[string]string{".520": "0.520", "-.012": "-0.012", "10.9234": "10.9234", "11.5": "11.500", "+.5": "0.500"} {
		v, err := ParseSeconds("rt", in)
		if err != nil || FormatSeconds(v, 3) != want {
			t.Errorf("%q → %q, %v; want %q", in, FormatSeconds(v, 3), err, want)
		}
	}
	for _, bad := range []string{"1e3", "NaN", "", ".", "1.2.3", "0x1", "11.5s", "1234567890123"} {
		if _, err := ParseSeconds("rt", bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}

// Two exports joined into one file repeat the header mid-file: that line is
// named as the header again (not a date "date" that is not a date), and
// rows ended by a bare CR (an old spreadsheet) or mixed CR/CRLF/LF are all
// read.
func TestLogbookRepeatedHeaderAndLineEndings(t *testing.T) {
	second := strings.Replace(goodRow, "2026-06-13", "2026-06-14", 1)
	lb, err := ReadLogbookFile(strings.NewReader(header+goodRow+header+second), "logbook.csv", time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	if len(lb.Passes) != 2 || len(lb.Bad) != 1 || !strings.Contains(lb.Bad[0].Error(), "line 3") || !strings.Contains(lb.Bad[0].Error(), "header") {
		t.Errorf("passes %d, bad %v", len(lb.Passes), lb.Bad)
	}
	for _, tc := range []struct{ name, sep string }{{"CR", "\r"}, {"CRLF", "\r\n"}, {"mixed", "\r"}} {
		t.Run(tc.name, func(t *testing.T) {
			h, a, b := strings.TrimSuffix(header, "\n"), strings.TrimSuffix(goodRow, "\n"), strings.TrimSuffix(second, "\n")
			data := h + tc.sep + a + tc.sep + b + tc.sep
			if tc.name == "mixed" {
				data = h + "\r\n" + a + "\r" + b + "\n"
			}
			passes, err := ReadLogbook(strings.NewReader(data), "logbook.csv", time.UTC)
			if err != nil || len(passes) != 2 {
				t.Errorf("%d passes, %v", len(passes), err)
			}
		})
	}
}

// The same track name typed in two Unicode forms (é as one code point, or e
// and a combining accent, as some keyboards and spreadsheets write it) is one
// track: the same pass in both forms is the same pass, and a track.yaml in
// one form names the logbook's rows in the other.
func TestTrackNameUnicodeForms(t *testing.T) {
	nfc, nfd := "Caf\u00e9 Raceway", "Cafe\u0301 Raceway"
	a := strings.Replace(goodRow, "Test Strip", nfc, 1)
	b := strings.Replace(goodRow, "Test Strip", nfd, 1)
	lb, err := ReadLogbookFile(strings.NewReader(header+a+b), "logbook.csv", time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	if len(lb.Passes) != 1 || len(lb.Bad) != 1 || !strings.Contains(lb.Bad[0].Error(), "same pass") {
		t.Errorf("passes %d, bad %v", len(lb.Passes), lb.Bad)
	}
	trk, err := ReadTrack(strings.NewReader("name: "+nfd+"\nelevation_ft: 900\n"), "track.yaml")
	if err != nil || trk.Name != lb.Passes[0].Track {
		t.Errorf("track.yaml name %q, logbook %q (%v)", trk.Name, lb.Passes[0].Track, err)
	}
}

// A second export joined on with its columns in another order: its header
// line is still named as a header, not as a row of the wrong length.
func TestLogbookRepeatedHeaderOtherOrder(t *testing.T) {
	other := "time,date,track,session,lane,dial,rt,et60,et1320,mph1320,notes\n"
	lb, err := ReadLogbookFile(strings.NewReader(header+goodRow+other), "logbook.csv", time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	if len(lb.Bad) != 1 || !strings.Contains(lb.Bad[0].Error(), "header line again") {
		t.Errorf("bad %v", lb.Bad)
	}
}
