package safefile

import (
	"errors"
	"os"
	"path/filepath"
	"testing"
	"time"
)

// The decision whether a temporary is left behind, the same on every
// platform (common practice (no source): a writer that died cannot finish;
// a file with no id is judged by age).
func TestIsStale(t *testing.T) {
	alive := func(pid int) bool { return pid == 4242 }
	for _, c := range []struct {
		name   string
		suffix string
		age    time.Duration
		want   bool
	}{
		{"dead writer, fresh", "777-123", time.Second, true},
		{"live writer, fresh", "4242-123", time.Second, false},
		{"live writer, an hour", "4242-123", time.Hour, false},
		{"this process", "100-5", time.Minute, false},
		{"live id but older than a day (id reused)", "4242-9", 25 * time.Hour, true},
		{"this process but older than a day", "100-9", 25 * time.Hour, true},
		{"no id, fresh", "123456", time.Minute, false},
		{"no id, older than StaleAge", "123456", 11 * time.Minute, true},
		{"id not a number, fresh", "abc-1", time.Minute, false},
		{"id not a number, old", "abc-1", time.Hour, true},
		{"id zero", "0-1", time.Minute, false},
	} {
		if got := isStale(c.suffix, c.age, 100, alive); got != c.want {
			t.Errorf("%s: isStale(%q, %s) = %v, want %v", c.name, c.suffix, c.age, got, c.want)
		}
	}
}

var errBusy = errors.New("the process cannot access the file because it is being used by another process")

// fakeSystem refuses the first refusals renames as busy (a spreadsheet has
// the file open), then renames; or renames and still reports an error.
type fakeSystem struct {
	refusals   int
	calls      int
	landAnyway bool
	other      error
}

func (f *fakeSystem) alive(int) bool      { return true }
func (f *fakeSystem) busy(err error) bool { return errors.Is(err, errBusy) }
func (f *fakeSystem) rename(from, to string) error {
	f.calls++
	if f.other != nil {
		return f.other
	}
	if f.calls <= f.refusals {
		return errBusy
	}
	if err := os.Rename(from, to); err != nil {
		return err
	}
	if f.landAnyway {
		return errors.New("rename reported failure after moving the file")
	}
	return nil
}

// The rename is tried again while the old file is held open, gives up after
// RenameRetry with the old file intact, and a rename that landed but
// reported an error counts as done (common practice (no source): Windows'
// MoveFileEx refuses while another program holds the file).
func TestReplaceRetriesBusyRename(t *testing.T) {
	defer func(d time.Duration) { RenameRetry = d }(RenameRetry)
	RenameRetry = 300 * time.Millisecond
	for _, c := range []struct {
		name      string
		sys       *fakeSystem
		wantErr   bool
		wantCalls int // 0: not checked
		wantNew   bool
	}{
		{"lands first time", &fakeSystem{}, false, 1, true},
		{"busy twice then lands", &fakeSystem{refusals: 2}, false, 3, true},
		{"busy past RenameRetry", &fakeSystem{refusals: 1000}, true, 0, false},
		{"other error is not retried", &fakeSystem{other: errors.New("disk gone")}, true, 1, false},
		{"landed though it said no", &fakeSystem{landAnyway: true}, false, 1, true},
	} {
		dir := t.TempDir()
		path := filepath.Join(dir, "log.csv")
		tmp := filepath.Join(dir, ".log.csv.tmp-1-1")
		_ = os.WriteFile(path, []byte("old\n"), 0o644)
		_ = os.WriteFile(tmp, []byte("new\n"), 0o644)
		err := replace(c.sys, tmp, path)
		if (err != nil) != c.wantErr {
			t.Errorf("%s: err = %v, want error %v", c.name, err, c.wantErr)
		}
		if c.wantCalls > 0 && c.sys.calls != c.wantCalls {
			t.Errorf("%s: %d renames, want %d", c.name, c.sys.calls, c.wantCalls)
		}
		if c.name == "busy past RenameRetry" && c.sys.calls < 3 {
			t.Errorf("%s: only %d tries in %s", c.name, c.sys.calls, RenameRetry)
		}
		got, _ := os.ReadFile(path)
		if want := map[bool]string{true: "new\n", false: "old\n"}[c.wantNew]; string(got) != want {
			t.Errorf("%s: file holds %q, want %q", c.name, got, want)
		}
	}
}

// Write goes through the platform's rename: a busy file delays the write,
// which still lands with the .bak kept.
func TestWriteWaitsForBusyFile(t *testing.T) {
	defer func(s system) { platform = s }(platform)
	f := &fakeSystem{refusals: 3}
	platform = f
	path := filepath.Join(t.TempDir(), "log.csv")
	if err := WriteBytes(path, []byte("a\n")); err != nil {
		t.Fatal(err)
	}
	f.calls = 0
	if err := WriteBytes(path, []byte("b\n")); err != nil {
		t.Fatal(err)
	}
	got, _ := os.ReadFile(path)
	bak, _ := os.ReadFile(path + ".bak")
	if string(got) != "b\n" || string(bak) != "a\n" {
		t.Errorf("file %q, .bak %q; want \"b\\n\", \"a\\n\"", got, bak)
	}
}

// This platform's alive: this process runs; a finished child does not
// (common practice (no source)).
func TestAliveThisPlatform(t *testing.T) {
	if !(osSystem{}).alive(os.Getpid()) {
		t.Errorf("alive(own pid %d) = false", os.Getpid())
	}
}
