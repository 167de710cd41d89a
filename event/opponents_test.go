package event

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/shopspring/decimal"

	"pitcard/logbook"
	"pitcard/weather"
)

// An invented book: car 4471 of an invented track's season, car "Copper Wren".
const bookHead = "car,date,round,dial,rt,et,breakout,notes\n"

func TestReadOpponentsRows(t *testing.T) {
	for _, tc := range []struct {
		name       string
		rows       string
		good       int
		badField   string // the field the first bad row names
		badLine    int
		badContain string // the valid range or rule
	}{
		{"good", "4471,2026-06-13,E3,11.80,.045,11.842,no,\n\"#Copper Wren\",2026-06-14,T1,12.10,-.012,12.081,yes,red light\n", 2, "", 0, ""},
		{"blank breakout is worked out", "4471,2026-06-13,E3,11.80,.045,11.79,,\n", 1, "", 0, ""},
		{"rt out of range", "4471,2026-06-13,E3,11.80,.045,11.842,no,\n4471,2026-06-13,E4,11.80,4.5,11.842,no,\n", 1, "rt", 3, "-1..2 s"},
		{"dial out of range", "4471,2026-06-13,E3,0.9,.045,11.842,no,\n", 0, "dial", 2, "1.5..40 s"},
		{"breakout disagrees", "4471,2026-06-13,E3,11.80,.045,11.842,yes,\n", 0, "breakout", 2, "disagrees"},
		{"bad round", "4471,2026-06-13,Q3,11.80,.045,11.842,no,\n", 0, "round", 2, "T1, T2"},
		{"bad date", "4471,13/06/2026,E3,11.80,.045,11.842,no,\n", 0, "date", 2, "YYYY-MM-DD"},
		{"blank car", ",2026-06-13,E3,11.80,.045,11.842,no,\n", 0, "car", 2, "blank"},
		{"short row", "4471,2026-06-13,E3\n", 0, "row", 2, "has 3 fields"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			b, err := ReadOpponents(strings.NewReader(bookHead+tc.rows), "opponents.csv")
			if err != nil {
				t.Fatal(err)
			}
			if len(b.Passes) != tc.good {
				t.Errorf("%d good rows, want %d (%v)", len(b.Passes), tc.good, b.Bad)
			}
			if tc.badField == "" {
				if len(b.Bad) > 0 {
					t.Errorf("bad rows: %v", b.Bad)
				}
				return
			}
			var ie *weather.InputError
			if len(b.Bad) == 0 || !errors.As(b.Bad[0], &ie) {
				t.Fatalf("no bad row named: %v", b.Bad)
			}
			if ie.File != "opponents.csv" || ie.Line != tc.badLine || ie.Field != tc.badField || !strings.Contains(ie.Error(), tc.badContain) {
				t.Errorf("bad row said %q (file %q line %d field %q), want line %d field %q with %q", ie.Error(), ie.File, ie.Line, ie.Field, tc.badLine, tc.badField, tc.badContain)
			}
		})
	}
	if _, err := ReadOpponents(strings.NewReader("car,date\n"), "opponents.csv"); err == nil || !strings.Contains(err.Error(), "opponents.csv") {
		t.Errorf("a wrong header must be refused naming the file: %v", err)
	}
	// A bare # starts a comment line; quoted, "#Copper Wren" is the car Copper Wren.
	b, _ := ReadOpponents(strings.NewReader(bookHead+"\"#Copper Wren\",2026-06-14,T1,12.10,-.012,12.081,yes,red light\n#a comment\n"), "x")
	if len(b.Passes) != 1 || b.Passes[0].Car != "Copper Wren" || !b.Passes[0].Breakout {
		t.Errorf("\"#Copper Wren\" was read as %+v", b.Passes)
	}
}

// Appending keeps the bad rows as they were, skips a slip already there and
// refuses another figure for the same car, day and round.
func TestAddOpponentPasses(t *testing.T) {
	dir := t.TempDir()
	bad := "4471,2026-06-12,E1,11.80,9.9,11.842,no,typo\n"
	if err := os.WriteFile(filepath.Join(dir, OpponentsFile), []byte(bookHead+bad), 0o644); err != nil {
		t.Fatal(err)
	}
	e := &Folder{Dir: dir, FS: os.DirFS(dir)}
	e3 := logbook.Session{Kind: logbook.Elimination, N: 3}
	p, err := NewOpponentPass("#4471", "2026-06-13", e3, "11.80", ".045", "11.842", "")
	if err != nil || p.Car != "4471" {
		t.Fatalf("%+v %v", p, err)
	}
	if n, _, err := e.AddOpponentPasses([]OpponentPass{p}, "this slip"); err != nil || n != 1 {
		t.Fatalf("added %d: %v", n, err)
	}
	if n, same, err := e.AddOpponentPasses([]OpponentPass{p}, "this slip"); err != nil || n != 0 || same != 1 {
		t.Errorf("the same slip again: added %d, same %d, %v", n, same, err)
	}
	other := p
	other.ET = decimal.RequireFromString("11.901")
	var c *Conflicts
	if _, _, err := e.AddOpponentPasses([]OpponentPass{other}, "this slip"); !errors.As(err, &c) {
		t.Errorf("another ET for the same car, day and round must be a conflict: %v", err)
	}
	data, _ := os.ReadFile(filepath.Join(dir, OpponentsFile))
	if !strings.Contains(string(data), strings.TrimSuffix(bad, "\n")) || !strings.Contains(string(data), "4471,2026-06-13,E3,11.80,0.045,11.842,no,") {
		t.Errorf("the book lost a row or rewrote one:\n%s", data)
	}
	if _, err := NewOpponentPass("4471", "2026-06-13", e3, "11.80", "3", "11.842", ""); err == nil || !strings.Contains(err.Error(), "--opponent-rt") {
		t.Errorf("a bad slip must name its flag: %v", err)
	}
}

// FuzzReadOpponents: any opponents.csv is read or refused with the file
// named, never a panic; what is read is written back and read the same.
func FuzzReadOpponents(f *testing.F) {
	f.Add(bookHead + "4471,2026-06-13,E3,11.80,.045,11.842,no,\n")
	f.Add(bookHead + "\"#7\",2026-06-13,E3,11.80,.045,11.842,no,\n4471,2026-06-13,E3,11.80,4.5,11.842,no,x\n")
	f.Add("\xef\xbb\xbf" + bookHead + "=1+1,2026-06-13,test,11.80,-.045,11.7,,\"a, b\"\r\n")
	f.Add(bookHead + "4471,2026-06-13,E3,\"11.80\n")
	f.Add("car,date\n1,2\n")
	f.Fuzz(func(t *testing.T, data string) {
		b, err := ReadOpponents(strings.NewReader(data), OpponentsFile)
		if err != nil {
			if !strings.Contains(err.Error(), OpponentsFile) {
				t.Fatalf("the error does not name the file: %v", err)
			}
			return
		}
		for _, e := range b.Bad {
			if !strings.Contains(e.Error(), OpponentsFile) {
				t.Fatalf("a bad row does not name the file: %v", e)
			}
		}
		if b.broken {
			return
		}
		var w strings.Builder
		if err := b.Write(&w); err != nil {
			t.Fatal(err)
		}
		again, err := ReadOpponents(strings.NewReader(w.String()), OpponentsFile)
		if err != nil || len(again.Passes) != len(b.Passes) || len(again.Bad) != len(b.Bad) {
			t.Fatalf("rewritten: %d good %d bad (%v), was %d good %d bad\n%q", len(again.Passes), len(again.Bad), err, len(b.Passes), len(b.Bad), w.String())
		}
		for i := range b.Passes {
			if strings.Join(again.Passes[i].Record(), ",") != strings.Join(b.Passes[i].Record(), ",") {
				t.Fatalf("row %d rewritten as %v, was %v", i, again.Passes[i].Record(), b.Passes[i].Record())
			}
		}
	})
}
