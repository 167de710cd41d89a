package csvtext_test

import (
	"bytes"
	"strings"
	"testing"
	"time"

	"pitcard/internal/csvtext"
	"pitcard/logbook"
	"pitcard/weather"
)

// The cells a spreadsheet runs as a formula (OWASP, "CSV Injection": a
// first character of =, +, -, @, tab or carriage return) are written with
// an apostrophe before them, and read back as typed.
func TestCellAndText(t *testing.T) {
	for _, c := range []struct{ typed, cell string }{
		{"good launch", "good launch"},
		{"", ""},
		{"=HYPERLINK(\"http://evil.example\",\"click\")", "'=HYPERLINK(\"http://evil.example\",\"click\")"}, // OWASP
		{"+1+cmd|' /C calc'!A0", "'+1+cmd|' /C calc'!A0"},                                                   // OWASP
		{"-2+3", "'-2+3"},
		{"@SUM(A1:A9)", "'@SUM(A1:A9)"},
		{"\t=1", "'\t=1"},
		{"\r=1", "'\r=1"},
		{"-0.034", "-0.034"}, // a number stays a number (common practice, no source)
		{"+5", "+5"},
		{"-", "'-"},
		{"'=typed with its own apostrophe", "''=typed with its own apostrophe"},
		{"'63 coupe", "'63 coupe"}, // an apostrophe before text is no formula: left alone
		{"a = b", "a = b"},
	} {
		t.Run(c.typed, func(t *testing.T) {
			if got := csvtext.Cell(c.typed); got != c.cell {
				t.Errorf("Cell(%q) = %q, want %q", c.typed, got, c.cell)
			}
			if got := csvtext.Text(c.cell); got != c.typed {
				t.Errorf("Text(%q) = %q, want %q", c.cell, got, c.typed)
			}
		})
	}
}

// logbook.csv and weather.csv: a note or a track that begins like a
// formula is written as text and read back as typed; the numbers, a
// negative reaction time among them, are written as numbers.
func TestTheLogsWriteFormulasAsText(t *testing.T) {
	loc := time.UTC
	note := "=HYPERLINK(\"http://evil.example\")"
	p, err := logbook.ParsePass(logbook.SlipFields{Values: map[string]string{"date": "2026-06-13", "time": "20:48", "track": "@Juniper Bend",
		"session": "E3", "lane": "left", "rt": "-0.034", "et60": "1.602", "et1320": "11.431", "mph1320": "117.61", "notes": note}}, loc)
	if err != nil {
		t.Fatal(err)
	}
	var lb bytes.Buffer
	if err := logbook.Write(&lb, []logbook.Pass{p}); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{",'@Juniper Bend,", ",-0.034,", `"'=HYPERLINK(""http://evil.example"")"`} {
		if !strings.Contains(lb.String(), want) {
			t.Errorf("logbook.csv lacks %s:\n%s", want, lb.String())
		}
	}
	back, err := logbook.Read(strings.NewReader(lb.String()), "logbook.csv", loc)
	if err != nil || len(back) != 1 || back[0].Notes != note || back[0].Track != "@Juniper Bend" || back[0].RT.Decimal.String() != "-0.034" {
		t.Errorf("logbook.csv read back: %+v %v", back, err)
	}

	r := weather.Reading{Time: time.Date(2026, 6, 13, 20, 40, 0, 0, loc), Temp: weather.Fahrenheit(81.5), Baro: weather.InHg(27.62), RH: 0.41,
		WindDirUnknown: true, Note: "-shade+1"}
	var wl bytes.Buffer
	if err := weather.WriteLog(&wl, []weather.Reading{r}); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(wl.String(), ",'-shade+1") {
		t.Errorf("weather.csv:\n%s", wl.String())
	}
	got, err := weather.ReadLog(strings.NewReader(wl.String()), "weather.csv", 0, loc)
	if err != nil || len(got) != 1 || got[0].Note != "-shade+1" {
		t.Errorf("weather.csv read back: %+v %v", got, err)
	}
}
