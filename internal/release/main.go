// Command release builds pitcard for the machines crews use and writes the
// SHA-256 checksum file a crew checks them with:
//
//	go run ./internal/release -out DIR [-version v1.2.3] [-commit HASH]
//
// It builds windows/amd64, darwin/arm64, linux/amd64, linux/arm64 and
// linux/arm (GOARM=7) with -trimpath and CGO off, stamps the version and
// commit into each (pitcard --version prints both), and writes
// DIR/SHA256SUMS in the format 'sha256sum -c SHA256SUMS' reads. The version
// defaults to 'git describe --tags --always --dirty', the commit to 'git
// rev-parse HEAD'. Where a binary runs on this machine, its --version is
// checked. It publishes nothing.
package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"runtime"
	"slices"
	"strings"
	"time"
)

// Target is one machine a release is built for.
type Target struct {
	GOOS, GOARCH, GOARM string
	// Machine says which machine the file is for, as the README lists it.
	Machine string
}

// Targets are the release's machines, in the order they are built.
var Targets = []Target{
	{"windows", "amd64", "", "Windows laptop (64-bit Intel or AMD)"},
	{"darwin", "arm64", "", "Mac with Apple silicon (M1 or later)"},
	{"linux", "amd64", "", "Linux PC (64-bit Intel or AMD)"},
	{"linux", "arm64", "", "Raspberry Pi 3/4/5 or other board with a 64-bit OS"},
	{"linux", "arm", "7", "Raspberry Pi 2/3/4 or other board with a 32-bit OS (ARMv7)"},
}

// FileName is the binary's name in the release folder: pitcard-OS-ARCH,
// with "armv7" for GOARM=7 and ".exe" on Windows.
func (t Target) FileName() string {
	arch := t.GOARCH
	if t.GOARM != "" {
		arch += "v" + t.GOARM
	}
	name := "pitcard-" + t.GOOS + "-" + arch
	if t.GOOS == "windows" {
		name += ".exe"
	}
	return name
}

// Env is the environment go build runs with for t: the parent's, with the
// target set and cgo off (a static binary that needs no C library).
func (t Target) Env(parent []string) []string {
	env := slices.DeleteFunc(slices.Clone(parent), func(kv string) bool {
		k, _, _ := strings.Cut(kv, "=")
		return k == "GOOS" || k == "GOARCH" || k == "GOARM" || k == "CGO_ENABLED"
	})
	env = append(env, "GOOS="+t.GOOS, "GOARCH="+t.GOARCH, "CGO_ENABLED=0")
	if t.GOARM != "" {
		env = append(env, "GOARM="+t.GOARM)
	}
	return env
}

// BuildArgs are go build's arguments for a binary at out stamped with
// version and commit.
func BuildArgs(out, version, commit string) []string {
	return []string{"build", "-trimpath",
		"-ldflags", "-s -w -X main.version=" + version + " -X main.commit=" + commit,
		"-o", out, "./cmd/pitcard"}
}

var (
	versionRE = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9._+-]{0,63}$`)
	commitRE  = regexp.MustCompile(`^[0-9a-f]{7,64}$`)
)

// CheckStamp refuses a version or commit that -ldflags -X would not carry
// as one word or that would read wrongly on the card.
func CheckStamp(version, commit string) error {
	if !versionRE.MatchString(version) {
		return fmt.Errorf("-version %q: want letters, digits and . _ + - only, 1 to 64 characters, starting with a letter or digit (like v1.2.3)", version)
	}
	if !commitRE.MatchString(commit) {
		return fmt.Errorf("-commit %q: want a git commit hash, 7 to 64 lowercase hex digits", commit)
	}
	return nil
}

// SumLine is one line of SHA256SUMS for data named name, as sha256sum
// writes it: the hex digest, two spaces, the name.
func SumLine(name string, data io.Reader) (string, error) {
	h := sha256.New()
	if _, err := io.Copy(h, data); err != nil {
		return "", err
	}
	return hex.EncodeToString(h.Sum(nil)) + "  " + name + "\n", nil
}

// WriteSums writes dir/SHA256SUMS for the named files of dir.
func WriteSums(dir string, names []string) error {
	var b strings.Builder
	for _, name := range names {
		f, err := os.Open(filepath.Join(dir, name))
		if err != nil {
			return err
		}
		line, err := SumLine(name, f)
		f.Close()
		if err != nil {
			return fmt.Errorf("reading %s: %w", filepath.Join(dir, name), err)
		}
		b.WriteString(line)
	}
	return os.WriteFile(filepath.Join(dir, "SHA256SUMS"), []byte(b.String()), 0o644)
}

func git(args ...string) string {
	out, err := exec.Command("git", args...).Output()
	if err != nil {
		return ""
	}
	return strings.TrimSpace(string(out))
}

func main() {
	out := flag.String("out", "", "folder to write the binaries and SHA256SUMS to (made if missing)")
	version := flag.String("version", "", "version to stamp (default: git describe --tags --always --dirty)")
	commit := flag.String("commit", "", "commit to stamp (default: git rev-parse HEAD)")
	flag.Parse()
	if err := run(*out, *version, *commit); err != nil {
		fmt.Fprintln(os.Stderr, "release:", err)
		os.Exit(1)
	}
}

func run(out, version, commit string) error {
	if out == "" {
		return errors.New("-out DIR is required: the folder the binaries go to")
	}
	if version == "" {
		version = git("describe", "--tags", "--always", "--dirty")
		if version == "" {
			version = "dev"
		}
	}
	if commit == "" {
		commit = git("rev-parse", "HEAD")
	}
	if err := CheckStamp(version, commit); err != nil {
		return err
	}
	if err := os.MkdirAll(out, 0o755); err != nil {
		return err
	}
	var names []string
	for _, t := range Targets {
		start := time.Now()
		bin := filepath.Join(out, t.FileName())
		cmd := exec.Command("go", BuildArgs(bin, version, commit)...)
		cmd.Env = t.Env(os.Environ())
		cmd.Stdout, cmd.Stderr = os.Stdout, os.Stderr
		if err := cmd.Run(); err != nil {
			return fmt.Errorf("building %s/%s: %w", t.GOOS, t.GOARCH, err)
		}
		fmt.Printf("built %s (%s) in %.0f s\n", bin, t.Machine, time.Since(start).Seconds())
		names = append(names, t.FileName())
		if t.GOOS == runtime.GOOS && t.GOARCH == runtime.GOARCH {
			if err := checkVersion(bin, version, commit); err != nil {
				return err
			}
		}
	}
	if err := WriteSums(out, names); err != nil {
		return err
	}
	fmt.Printf("wrote %s\n", filepath.Join(out, "SHA256SUMS"))
	return nil
}

// checkVersion runs bin --version and checks it names version and commit.
func checkVersion(bin, version, commit string) error {
	got, err := exec.Command(bin, "--version").Output()
	if err != nil {
		return fmt.Errorf("%s --version: %w", bin, err)
	}
	if !bytes.Contains(got, []byte(version)) || !bytes.Contains(got, []byte(commit[:min(12, len(commit))])) {
		return fmt.Errorf("%s --version says %q; want version %s and commit %s", bin, strings.TrimSpace(string(got)), version, commit)
	}
	fmt.Printf("checked: %s", got)
	return nil
}
