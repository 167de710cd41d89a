package safefile

import (
	"errors"
	"os"
	"path/filepath"
	"testing"
)

// Append adds at the end and nowhere else; it needs the file, honours
// FailWrites, and Torn tells a cut last line from one being written.
// pitcard's own rules (no source).
func TestAppend(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "log.csv")
	if err := Append(path, []byte("a\n")); err == nil {
		t.Fatal("appended to a file that does not exist")
	}
	os.WriteFile(path, []byte("h\n1\n"), 0o644)
	for _, tc := range []struct {
		add, want string
		torn      bool
	}{
		{"2\n", "h\n1\n2\n", false},
		{"3,cut", "h\n1\n2\n3,cut", true},
	} {
		if err := Append(path, []byte(tc.add)); err != nil {
			t.Fatal(err)
		}
		if got, _ := os.ReadFile(path); string(got) != tc.want {
			t.Fatalf("after %q: %q, want %q", tc.add, got, tc.want)
		}
		if got := Torn(path); got != tc.torn {
			t.Fatalf("after %q: Torn %v, want %v", tc.add, got, tc.torn)
		}
	}
	unlock, err := Lock(path)
	if err != nil {
		t.Fatal(err)
	}
	if Torn(path) {
		t.Fatal("a line under a held lock was called torn")
	}
	unlock()
	full := errors.New("no space left on device")
	FailWrites = func(string) error { return full }
	defer func() { FailWrites = nil }()
	if err := Append(path, []byte("4\n")); !errors.Is(err, full) {
		t.Fatalf("FailWrites: %v", err)
	}
	if got, _ := os.ReadFile(path); string(got) != "h\n1\n2\n3,cut" {
		t.Fatalf("a failed append wrote: %q", got)
	}
}
