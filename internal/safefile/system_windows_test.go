//go:build windows

// These run only on Windows, where a file held open without sharing delete
// refuses a rename and process ids are asked of the process table.

package safefile

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// A reader that holds the logbook open (as a spreadsheet does) delays the
// write; once it lets go, the write lands (common practice (no source)).
func TestWindowsWriteWaitsForOpenFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "log.csv")
	if err := WriteBytes(path, []byte("a\n")); err != nil {
		t.Fatal(err)
	}
	p, err := syscall.UTF16PtrFromString(path)
	if err != nil {
		t.Fatal(err)
	}
	h, err := syscall.CreateFile(p, syscall.GENERIC_READ, syscall.FILE_SHARE_READ, nil, syscall.OPEN_EXISTING, syscall.FILE_ATTRIBUTE_NORMAL, 0)
	if err != nil {
		t.Fatal(err)
	}
	go func() {
		time.Sleep(300 * time.Millisecond)
		syscall.CloseHandle(h)
	}()
	if err := WriteBytes(path, []byte("b\n")); err != nil {
		t.Fatalf("write while the file was open for 300 ms: %v", err)
	}
	if got, _ := os.ReadFile(path); string(got) != "b\n" {
		t.Errorf("file holds %q, want \"b\\n\"", got)
	}
}

// A process that has finished is not alive; this one is.
func TestWindowsAlive(t *testing.T) {
	cmd := exec.Command("cmd", "/c", "exit 0")
	if err := cmd.Run(); err != nil {
		t.Skipf("cannot start a process: %v", err)
	}
	if (osSystem{}).alive(cmd.Process.Pid) {
		t.Errorf("alive(%d) = true for a finished process", cmd.Process.Pid)
	}
	if !(osSystem{}).alive(os.Getpid()) {
		t.Errorf("alive(own pid) = false")
	}
}

// A path with a drive letter and backslashes is named as given in errors.
func TestWindowsErrorNamesThePath(t *testing.T) {
	path := filepath.Join(t.TempDir(), "no such folder", "log.csv")
	err := WriteBytes(path, []byte("a\n"))
	if err == nil || !filepath.IsAbs(path) || !strings.Contains(err.Error(), path) {
		t.Errorf("error %v does not name %s", err, path)
	}
}
