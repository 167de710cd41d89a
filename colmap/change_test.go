package colmap

import (
	"bytes"
	"pitcard/logbook"
	"strings"
	"testing"
	"time"
)

// A spreadsheet's column of what changed on the car maps to the logbook's
// change, by a map or by a guess from its header, its commas and quotes
// kept; Export writes it back in the map's layout.
func TestChangeColumnMaps(t *testing.T) {
	sheet := "Date;Time;Track;Run;Lane;1/4;Mods\n" +
		"13/06/2026;18:42;Test Strip;E1;left;11,538;\"new converter; \"\"5400\"\" stall, 4.10 gear\"\n" +
		"13/06/2026;19:42;Test Strip;E2;left;11,541;\n"
	const want = `new converter; "5400" stall, 4.10 gear`
	m, err := Read([]byte("kind: logbook\nseparator: \";\"\ndecimal: \",\"\ndate: {column: Date, format: \"02/01/2006\"}\ntime: {column: Time}\n"+
		"track: {column: Track}\nsession: {column: Run}\nlane: {column: Lane}\net1320: {column: \"1/4\"}\nchange: {column: Mods}\n"), "map.yaml", Logbook)
	if err != nil {
		t.Fatal(err)
	}
	read := func(m *Map, data string) []logbook.Pass {
		t.Helper()
		tr, err := m.Translate([]byte(data), "season.csv")
		if err != nil {
			t.Fatal(err)
		}
		lb, err := logbook.ReadFile(bytes.NewReader(tr.CSV), "season.csv", time.UTC)
		if err != nil || len(lb.Bad) > 0 || len(lb.Passes) != 2 {
			t.Fatalf("%v %v\n%s", err, lb.Bad, tr.CSV)
		}
		return lb.Passes
	}
	passes := read(m, sheet)
	if passes[0].Change != want || passes[1].Change != "" {
		t.Errorf("by the map: %q, %q", passes[0].Change, passes[1].Change)
	}
	var own bytes.Buffer
	if err := logbook.Write(&own, passes); err != nil {
		t.Fatal(err)
	}
	var back bytes.Buffer
	if err := m.Export(&back, own.Bytes()); err != nil {
		t.Fatal(err)
	}
	if again := read(m, back.String()); again[0].Change != want {
		t.Errorf("exported and read again: %q\n%s", again[0].Change, back.String())
	}

	guessed, _ := Guess([]byte("Date;Time;Track;Run;Lane;1/4;Car change\n13/06/2026 ;18:42;Test Strip;E1;left;11,538;+2 psi boost\n"), "s.csv", Logbook, nil)
	if s := guessed.Fields["change"]; s == nil || s.Column != "Car change" {
		t.Errorf("the guess: %+v", s)
	}
}

// A crew column in a decimal-comma file: a plain number is read with a
// point (a numeric setup item then checks it), anything else is kept as
// typed; export turns a plain number back.
func TestCrewColumnDecimalComma(t *testing.T) {
	m, err := Read([]byte("kind: logbook\nseparator: \";\"\ndecimal: \",\"\ndate: {column: Date, format: \"02/01/2006\"}\ntime: {column: Time}\n"+
		"track: {column: Track}\nsession: {column: Run}\nlane: {column: Lane}\net1320: {column: \"1/4\"}\nrear_psi: {column: PSI}\n"), "map.yaml", Logbook)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct{ name, cell, want string }{
		{"a decimal comma", "15,5", "15.5"},
		{"negative", "-2,25", "-2.25"},
		{"a whole number", "16", "16"},
		{"words with a comma", "3,5 turns, soft", "3,5 turns, soft"},
		{"two commas", "1,2,3", "1,2,3"},
		{"blank", "", ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			sheet := "Date;Time;Track;Run;Lane;1/4;PSI\n13/06/2026;18:42;Test Strip;E1;left;11,538;\"" + tc.cell + "\"\n"
			tr, err := m.Translate([]byte(sheet), "season.csv")
			if err != nil {
				t.Fatal(err)
			}
			lb, err := logbook.ReadFile(bytes.NewReader(tr.CSV), "season.csv", time.UTC)
			if err != nil || len(lb.Passes) != 1 {
				t.Fatalf("%v %v\n%s", err, lb.Bad, tr.CSV)
			}
			if got := lb.Passes[0].Extra["rear_psi"]; got != tc.want {
				t.Errorf("read %q as %q, want %q", tc.cell, got, tc.want)
			}
			var own, back bytes.Buffer
			if err := logbook.WriteWith(&own, lb.Passes, []string{"rear_psi"}); err != nil {
				t.Fatal(err)
			}
			if err := m.Export(&back, own.Bytes()); err != nil {
				t.Fatal(err)
			}
			if !strings.Contains(back.String(), ";"+tc.cell+"\n") && !strings.Contains(back.String(), ";\""+tc.cell+"\"\n") {
				t.Errorf("exported %q as:\n%s", tc.cell, back.String())
			}
		})
	}
}
