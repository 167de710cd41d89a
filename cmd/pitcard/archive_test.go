package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pitcard/event"
)

// A file with passes already logged is refused, the first shownDuplicates
// of them listed and the rest counted in one line; a file already
// imported in full is one line (pitcard's own message rules, no source).
func TestAnImportOfLoggedPassesSaysItInFewLines(t *testing.T) {
	a := demoCopy(t)
	logbook := filepath.Join(a, event.LogbookFile)
	ours := read(t, logbook)
	lines := strings.Split(strings.TrimRight(ours, "\n"), "\n")
	newer := strings.Replace(lines[len(lines)-1], "2026-", "2027-", 1) // one pass not logged
	theirs := filepath.Join(t.TempDir(), "theirs.csv")
	if err := os.WriteFile(theirs, []byte(ours+newer+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		file       string
		lines      int
		must, more string
	}{
		{theirs, shownDuplicates + 2, "the same pass entered twice", "45 more passes are already in"},
		{logbook, 1, "nothing new in", "its 65 passes are already in"},
	} {
		_, errs, code := pitcard(t, "log", "import", tc.file, "--dir", a)
		if code != exitBadInput || !strings.Contains(errs, tc.must) || !strings.Contains(errs, tc.more) {
			t.Errorf("import %s: %d %q", filepath.Base(tc.file), code, errs)
		}
		if n := strings.Count(strings.TrimRight(errs, "\n"), "\n") + 1; n != tc.lines {
			t.Errorf("import %s: %d lines, want %d:\n%s", filepath.Base(tc.file), n, tc.lines, errs)
		}
		if read(t, logbook) != ours {
			t.Errorf("import %s: the logbook was written", filepath.Base(tc.file))
		}
	}
}
