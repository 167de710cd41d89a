package bringin

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"pitcard/event"
	"pitcard/logbook"
)

// DiffLogbook, reading both copies a block of rows at a time, finds what
// MergePasses finds from both read whole, at every block size: the passes
// only theirs has, those alike, the conflicts with both rows and the
// columns that differ, and theirs' bad rows at their own lines (pitcard's
// own comparison rules, no source).
func TestDiffLogbookInBlocksIsTheWholeComparison(t *testing.T) {
	dir := t.TempDir()
	if _, err := event.Create(dir, true, time.Date(2026, 6, 13, 20, 31, 0, 0, time.Local)); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, event.LogbookFile)
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	rows := strings.Split(strings.TrimSuffix(string(data), "\n"), "\n")
	head, demo := rows[0], rows[1:]
	// Both: a note over two lines, with a comma. Ours: the demo less its
	// last 5 passes, and a comment line.
	noted := strings.Split(demo[18], ",")
	noted[len(noted)-1] = "\"tires cold,\nlifted early\""
	demo[18] = strings.Join(noted, ",")
	ours := append([]string{head}, demo[:len(demo)-5]...)
	ours = slices.Insert(ours, 10, "# the crew's own comment, with a \" quote")
	// Theirs: every pass, two with another 60-ft time, one bad row, and
	// a pass entered twice, far apart.
	theirs := append([]string{head}, demo...)
	for _, i := range []int{3, 40} {
		f := strings.Split(theirs[i], ",")
		f[7] = "1.999"
		theirs[i] = strings.Join(f, ",")
	}
	theirs = slices.Insert(theirs, 30, "2026-13-01,10:00,Salt Creek Dragway,T1,left,,0.02,1.6,,,,11.1,,120,70,29.9,40,,,,3350,")
	theirs = append(theirs, theirs[5])
	write := func(p string, rows []string) {
		if err := os.WriteFile(p, []byte(strings.Join(rows, "\n")+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write(path, ours)
	other := filepath.Join(t.TempDir(), "theirs.csv")
	write(other, theirs)

	e, err := event.Open(event.OpenOptions{Dir: dir})
	if err != nil {
		t.Fatal(err)
	}
	whole, leftOut := e.Logbook()
	if leftOut != nil {
		t.Fatalf("ours reads whole with %v", leftOut)
	}
	src := Source{Path: other}
	lb, err := src.Passes()
	if err != nil {
		t.Fatal(err)
	}
	want := MergePasses(whole, lb.Passes)
	if len(want.New) != 5 || len(want.Conflicts) != 2 || len(lb.Bad) != 2 {
		t.Fatalf("the scenario: %d new, %d conflicts, %d bad rows; want 5, 2, 2", len(want.New), len(want.Conflicts), len(lb.Bad))
	}
	lines := func(passes []logbook.Pass) []int {
		var out []int
		for _, p := range passes {
			out = append(out, p.Line)
		}
		return out
	}
	badAt := func(bad logbook.RowErrors) []string {
		var out []string
		for _, b := range bad {
			out = append(out, b.Error())
		}
		return out
	}
	for _, block := range []int{1, 2, 3, 7, 64, diffBlock} {
		got, err := diffLogbook(e, src, block)
		if err != nil {
			t.Fatalf("block %d: %v", block, err)
		}
		if !slices.Equal(lines(got.New), lines(want.New)) {
			t.Errorf("block %d: new at lines %v, want %v", block, lines(got.New), lines(want.New))
		}
		if got.Same != want.Same {
			t.Errorf("block %d: %d alike, want %d", block, got.Same, want.Same)
		}
		if len(got.Conflicts) != len(want.Conflicts) {
			t.Fatalf("block %d: %d conflicts, want %d", block, len(got.Conflicts), len(want.Conflicts))
		}
		for i, c := range got.Conflicts {
			w := want.Conflicts[i]
			if c.What != w.What || c.Ours != w.Ours || c.Theirs != w.Theirs || c.OursLine != w.OursLine || c.TheirsLine != w.TheirsLine || !slices.Equal(c.Differs, w.Differs) {
				t.Errorf("block %d: conflict\n%+v\nwant\n%+v", block, c, w)
			}
		}
		if g, w := badAt(got.TheirBad), badAt(lb.Bad); !slices.Equal(g, w) {
			t.Errorf("block %d: their bad rows\n%q\nwant\n%q", block, g, w)
		}
	}
}
