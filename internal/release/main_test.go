package main

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// The release's file names, one per machine (common practice (no source)).
func TestFileNames(t *testing.T) {
	want := []string{"pitcard-windows-amd64.exe", "pitcard-darwin-arm64", "pitcard-linux-amd64", "pitcard-linux-arm64", "pitcard-linux-armv7"}
	var got []string
	for _, tg := range Targets {
		got = append(got, tg.FileName())
	}
	if !slices.Equal(got, want) {
		t.Errorf("file names %v, want %v", got, want)
	}
}

// The build environment sets the target and turns cgo off, replacing what
// the parent had.
func TestEnv(t *testing.T) {
	parent := []string{"HOME=/h", "GOOS=plan9", "CGO_ENABLED=1", "GOARM=5", "PATH=/bin"}
	for _, c := range []struct {
		tg   Target
		want []string
	}{
		{Target{GOOS: "linux", GOARCH: "arm", GOARM: "7"}, []string{"HOME=/h", "PATH=/bin", "GOOS=linux", "GOARCH=arm", "CGO_ENABLED=0", "GOARM=7"}},
		{Target{GOOS: "windows", GOARCH: "amd64"}, []string{"HOME=/h", "PATH=/bin", "GOOS=windows", "GOARCH=amd64", "CGO_ENABLED=0"}},
	} {
		if got := c.tg.Env(parent); !slices.Equal(got, c.want) {
			t.Errorf("%s/%s: env %v, want %v", c.tg.GOOS, c.tg.GOARCH, got, c.want)
		}
	}
}

// go build's arguments carry -trimpath and both stamps.
func TestBuildArgs(t *testing.T) {
	got := strings.Join(BuildArgs("out/p", "v1.2.3", "abcdef1"), " ")
	for _, want := range []string{"-trimpath", "-X main.version=v1.2.3", "-X main.commit=abcdef1", "-o out/p", "./cmd/pitcard"} {
		if !strings.Contains(got, want) {
			t.Errorf("build args %q lack %q", got, want)
		}
	}
}

// Stamps that -ldflags -X would split or that read wrongly are refused.
func TestCheckStamp(t *testing.T) {
	for _, c := range []struct {
		version, commit string
		ok              bool
	}{
		{"v1.2.3", "0123456789abcdef0123456789abcdef01234567", true},
		{"3270144-dirty", "32701447e36a", true},
		{"v1 2", "abcdef1", false},
		{"-v1", "abcdef1", false},
		{"", "abcdef1", false},
		{"v1.2.3", "", false},
		{"v1.2.3", "ABCDEF1", false},
		{"v1.2.3", "abc", false},
		{"v1.2.3'x", "abcdef1", false},
	} {
		if err := CheckStamp(c.version, c.commit); (err == nil) != c.ok {
			t.Errorf("CheckStamp(%q, %q) = %v, want ok %v", c.version, c.commit, err, c.ok)
		}
	}
}

// SHA256SUMS lines are as sha256sum writes them; the digests are the
// published SHA-256 test vectors (FIPS 180-2 examples: "abc", empty).
func TestWriteSums(t *testing.T) {
	dir := t.TempDir()
	_ = os.WriteFile(filepath.Join(dir, "a"), []byte("abc"), 0o644)
	_ = os.WriteFile(filepath.Join(dir, "empty.exe"), nil, 0o644)
	if err := WriteSums(dir, []string{"a", "empty.exe"}); err != nil {
		t.Fatal(err)
	}
	got, _ := os.ReadFile(filepath.Join(dir, "SHA256SUMS"))
	want := "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad  a\n" +
		"e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855  empty.exe\n"
	if string(got) != want {
		t.Errorf("SHA256SUMS:\n%s\nwant:\n%s", got, want)
	}
	if err := WriteSums(dir, []string{"missing"}); err == nil {
		t.Error("a missing file gave no error")
	}
}

// Without -out nothing is built.
func TestRunNeedsOut(t *testing.T) {
	if err := run("", "v1", "abcdef1"); err == nil || !strings.Contains(err.Error(), "-out") {
		t.Errorf("run without -out: %v", err)
	}
}
