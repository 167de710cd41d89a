package safefile

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

func TestWriteKeepsBackup(t *testing.T) {
	path := filepath.Join(t.TempDir(), "log.csv")
	if err := WriteBytes(path, []byte("one\n")); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(path + ".bak"); !os.IsNotExist(err) {
		t.Errorf("a first write made a .bak: %v", err)
	}
	if err := WriteBytes(path, []byte("two\n")); err != nil {
		t.Fatal(err)
	}
	got, _ := os.ReadFile(path)
	bak, _ := os.ReadFile(path + ".bak")
	if string(got) != "two\n" || string(bak) != "one\n" {
		t.Errorf("file %q, backup %q", got, bak)
	}
	left, _ := filepath.Glob(filepath.Join(filepath.Dir(path), ".log.csv.tmp-*"))
	if len(left) != 0 {
		t.Errorf("temporary files left: %v", left)
	}
}

func TestWriteFailureLeavesTheOldFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "log.csv")
	_ = WriteBytes(path, []byte("old\n"))
	err := Write(path, func(w io.Writer) error {
		io.WriteString(w, "half a ro")
		return errors.New("disk full")
	})
	if err == nil || !strings.Contains(err.Error(), "disk full") {
		t.Fatalf("error %v", err)
	}
	if got, _ := os.ReadFile(path); string(got) != "old\n" {
		t.Errorf("file now %q", got)
	}
	left, _ := filepath.Glob(filepath.Join(filepath.Dir(path), ".log.csv.tmp-*"))
	if len(left) != 0 {
		t.Errorf("temporary files left: %v", left)
	}
}

// Read-modify-write under the lock from many writers at once loses no row.
func TestLockSerialisesWriters(t *testing.T) {
	path := filepath.Join(t.TempDir(), "log.csv")
	var wg sync.WaitGroup
	for i := range 20 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			unlock, err := Lock(path)
			if err != nil {
				t.Error(err)
				return
			}
			defer unlock()
			old, _ := os.ReadFile(path)
			if err := WriteBytes(path, append(old, fmt.Sprintf("row %d\n", i)...)); err != nil {
				t.Error(err)
			}
		}()
	}
	wg.Wait()
	got, _ := os.ReadFile(path)
	if n := strings.Count(string(got), "row "); n != 20 {
		t.Errorf("%d rows of 20 landed:\n%s", n, got)
	}
}
