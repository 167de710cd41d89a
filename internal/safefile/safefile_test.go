package safefile

import (
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"
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

// A logbook shared between folders by a symbolic link: the write lands in
// the link's target, the link stays a link, and the .bak sits beside the target.
func TestWriteThroughSymlink(t *testing.T) {
	shared := filepath.Join(t.TempDir(), "shared.csv")
	if err := WriteBytes(shared, []byte("one\n")); err != nil {
		t.Fatal(err)
	}
	folder := t.TempDir()
	link := filepath.Join(folder, "log.csv")
	if err := os.Symlink(shared, link); err != nil {
		t.Skipf("no symbolic links here: %v", err)
	}
	unlock, err := Lock(link)
	if err != nil {
		t.Fatal(err)
	}
	err = WriteBytes(link, []byte("one\ntwo\n"))
	unlock()
	if err != nil {
		t.Fatal(err)
	}
	if st, err := os.Lstat(link); err != nil || st.Mode()&os.ModeSymlink == 0 {
		t.Errorf("the link was replaced by a plain file: %v %v", st.Mode(), err)
	}
	if got, _ := os.ReadFile(shared); string(got) != "one\ntwo\n" {
		t.Errorf("the shared target holds %q", got)
	}
	if bak, _ := os.ReadFile(shared + ".bak"); string(bak) != "one\n" {
		t.Errorf("the target's .bak holds %q", bak)
	}
	if _, err := os.Stat(shared + ".lock"); err != nil {
		t.Errorf("the lock is not beside the target: %v", err)
	}
}

// A writer killed mid-write leaves its temporary file; the next write of the
// same file removes it (its process is gone), but not a live writer's.
func TestWriteRemovesStaleTemporaries(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "log.csv")
	dead := exec.Command("true")
	if err := dead.Run(); err != nil {
		t.Skipf("cannot start a process: %v", err)
	}
	stale := filepath.Join(dir, fmt.Sprintf(".log.csv.tmp-%d-111", dead.Process.Pid))
	old := filepath.Join(dir, ".log.csv.tmp-222") // an older pitcard's name, no process id
	live := filepath.Join(dir, fmt.Sprintf(".log.csv.tmp-%d-333", os.Getppid()))
	other := filepath.Join(dir, fmt.Sprintf(".weather.csv.tmp-%d-444", dead.Process.Pid))
	for _, f := range []string{stale, old, live, other} {
		_ = os.WriteFile(f, []byte("half a row"), 0o644)
	}
	hourAgo := time.Now().Add(-time.Hour)
	_ = os.Chtimes(old, hourAgo, hourAgo)
	if err := WriteBytes(path, []byte("row\n")); err != nil {
		t.Fatal(err)
	}
	for f, want := range map[string]bool{stale: false, old: false, live: true, other: true} {
		if _, err := os.Stat(f); (err == nil) != want {
			t.Errorf("%s: kept %v, want %v", filepath.Base(f), err == nil, want)
		}
	}
}
