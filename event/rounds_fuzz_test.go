package event

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pitcard/logbook"
)

// FuzzReadRounds: any rounds.csv is read or refused with the file named,
// never a panic; what is read is written back and read the same.
func FuzzReadRounds(f *testing.F) {
	f.Add("date,session,entry,value,at\n2026-06-13,E3,opponent_dial,11.62,2026-06-13T20:31:00Z\n2026-06-13,E3,checked,Fuel,2026-06-13T20:32:00Z\n")
	f.Add("date,session,entry,value,at\n")
	f.Add("\xef\xbb\xbfdate,session,entry,value,at\r\n2026-06-13,E3,checked,\"a, b\",2026-06-13T20:32:00+02:00\r\n")
	f.Add("date,session\n1,2\n")
	f.Fuzz(func(t *testing.T, data string) {
		dir := t.TempDir()
		if err := os.WriteFile(filepath.Join(dir, RoundsFile), []byte(data), 0o644); err != nil {
			t.Fatal(err)
		}
		e := &Folder{Dir: dir, FS: os.DirFS(dir)}
		entries, err := e.readRounds()
		if err != nil {
			if !strings.Contains(err.Error(), RoundsFile) {
				t.Fatalf("the error does not name the file: %v", err)
			}
			return
		}
		if err := e.editRounds(func(es []roundEntry) []roundEntry { return es }); err != nil {
			t.Fatal(err)
		}
		again, err := e.readRounds()
		if err != nil || len(again) != len(entries) {
			t.Fatalf("rewritten rounds.csv reads %d entries (%v), was %d", len(again), err, len(entries))
		}
		_, _ = e.RoundNotes("2026-06-13", logbook.Session{Kind: logbook.Elimination, N: 3})
	})
}
