// Package safefile writes pitcard's files so that a crash, a full disk or a
// second pitcard process never leaves one half-written or loses a row: writes
// go to a temporary file in the same folder, are flushed to disk, and replace
// the old file by rename, which is atomic on every file system pitcard runs
// on. The previous version is kept as NAME.bak. Writers serialize on a lock
// file, NAME.lock, so two processes appending at once both land.
//
// A path that is a symbolic link (a logbook shared between folders) is
// written through the link: the lock, the temporary file, the rename and the
// .bak all happen beside the link's target, so the shared file gets the row.
// Temporary files are named .NAME.tmp-PID-RANDOM; one left by a writer that
// died (kill -9, a power cut) is removed by the next write of that file: its
// process id no longer runs, or it is older than StaleAge and carries no
// process id, or it is older than StaleLiveAge whatever it carries (process
// ids are reused, on Windows within minutes).
//
// On Windows the same guarantees hold, with these differences: whether a
// writer still runs is asked of the process table (OpenProcess and its exit
// code) instead of kill(pid, 0); os.Rename replaces the file with
// MoveFileEx(MOVEFILE_REPLACE_EXISTING), which fails while another program
// (a spreadsheet, a virus scanner, the pit page reading) has the old file
// open without sharing delete, so a rename that fails so is tried again for
// up to RenameRetry before the write gives up with the old file intact; the
// lock (gofrs/flock) is LockFileEx on NAME.lock; symbolic links need
// Developer Mode or an administrator to make but are followed the same way.
// WritePrivate's mode 0600 is a Unix mode: on Windows the file keeps the
// folder's access list (a user's profile folder is private to that user).
package safefile

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/gofrs/flock"
)

// Resolve is the file a write of path lands in: path itself, or the target
// of the symbolic link(s) path is, even when that target does not exist yet.
func Resolve(path string) (string, error) {
	for range 40 {
		st, err := os.Lstat(path)
		if err != nil || st.Mode()&fs.ModeSymlink == 0 {
			return path, nil
		}
		target, err := os.Readlink(path)
		if err != nil {
			return "", fmt.Errorf("reading the link %s: %w", path, err)
		}
		if !filepath.IsAbs(target) {
			target = filepath.Join(filepath.Dir(path), target)
		}
		path = target
	}
	return "", fmt.Errorf("%s: too many levels of symbolic links", path)
}

// tempPattern is the pattern of this process's temporary files for path.
func tempPattern(path string) string {
	return "." + filepath.Base(path) + ".tmp-" + strconv.Itoa(os.Getpid()) + "-*"
}

// StaleAge is how old a temporary file without a live writer's process id
// must be before it is taken as left behind.
var StaleAge = 10 * time.Minute

// StaleLiveAge is how old a temporary file must be to be taken as left
// behind even though a process with its id runs: no write takes that long,
// and the id may be another program's by now.
var StaleLiveAge = 24 * time.Hour

// removeStale deletes the temporary files of path whose writer is gone.
func removeStale(path string) {
	prefix := "." + filepath.Base(path) + ".tmp-"
	entries, err := os.ReadDir(filepath.Dir(path))
	if err != nil {
		return
	}
	now := time.Now()
	for _, de := range entries {
		name := de.Name()
		if !strings.HasPrefix(name, prefix) {
			continue
		}
		info, err := de.Info()
		if err != nil {
			continue
		}
		if isStale(strings.TrimPrefix(name, prefix), now.Sub(info.ModTime()), os.Getpid(), platform.alive) {
			os.Remove(filepath.Join(filepath.Dir(path), name))
		}
	}
}

// isStale decides whether a temporary file is left behind, from what
// follows ".NAME.tmp-" in its name ("PID-RANDOM", or "RANDOM" from an older
// pitcard), its age, this process's id and whether a process id runs. The
// same on every platform; only alive differs.
func isStale(suffix string, age time.Duration, self int, alive func(pid int) bool) bool {
	if age > StaleLiveAge {
		return true
	}
	pid, _, hasPID := strings.Cut(suffix, "-")
	if n, err := strconv.Atoi(pid); hasPID && err == nil && n > 0 {
		return n != self && !alive(n)
	}
	return age > StaleAge
}

// system is what safefile asks of the operating system that differs per
// platform (system_unix.go, system_windows.go); tests put in a fake.
type system interface {
	// alive reports whether a process with that id runs.
	alive(pid int) bool
	// busy reports whether a rename failed only because another process
	// has the file open: worth trying again shortly.
	busy(err error) bool
	// rename moves from over to, replacing it.
	rename(from, to string) error
}

// platform is this platform's system.
var platform system = osSystem{}

// RenameRetry is how long a rename that fails because the old file is open
// elsewhere (Windows) is tried again before the write gives up.
var RenameRetry = 3 * time.Second

// replace renames tmp over path. A rename refused because another process
// has path open is tried again, waiting 10 ms, then twice as long each time
// up to 250 ms, for RenameRetry in all. A rename that reports an error but
// landed (tmp gone, path now the very file tmp was) counts as done.
func replace(sys system, tmp, path string) error {
	before, _ := os.Stat(tmp)
	deadline := time.Now().Add(RenameRetry)
	wait := 10 * time.Millisecond
	for {
		err := sys.rename(tmp, path)
		if err == nil || landed(before, tmp, path) {
			return nil
		}
		if !sys.busy(err) || time.Now().Add(wait).After(deadline) {
			return err
		}
		time.Sleep(wait)
		wait = min(2*wait, 250*time.Millisecond)
	}
}

// landed reports whether a rename of tmp (which was before) to path took
// place although it reported an error.
func landed(before fs.FileInfo, tmp, path string) bool {
	if before == nil {
		return false
	}
	if _, err := os.Lstat(tmp); !errors.Is(err, fs.ErrNotExist) {
		return false
	}
	now, err := os.Stat(path)
	return err == nil && os.SameFile(before, now)
}

// FailWrites is asked before every write when it is set, and its error
// returned with nothing written: tests use it to stand for a full or
// failing disk (and reset it when they end).
var FailWrites func(path string) error

// LockTimeout is how long Lock waits for another pitcard process to finish.
var LockTimeout = 10 * time.Second

// Lock takes the exclusive lock of path (held on path+".lock") and returns the
// function that releases it. It waits up to LockTimeout for another holder.
func Lock(path string) (unlock func(), err error) {
	if path, err = Resolve(path); err != nil {
		return nil, err
	}
	l := flock.New(path + ".lock")
	deadline := time.Now().Add(LockTimeout)
	for {
		ok, err := l.TryLock()
		if err != nil {
			return nil, fmt.Errorf("locking %s: %w", path, err)
		}
		if ok {
			return func() { _ = l.Unlock() }, nil
		}
		if time.Now().After(deadline) {
			return nil, fmt.Errorf("%s is being written by another pitcard process (lock %s.lock held for %s); try again", path, path, LockTimeout)
		}
		time.Sleep(20 * time.Millisecond)
	}
}

// Option changes how one Write goes.
type Option func(*options)

type options struct{ pause func(stage string) }

// optionsOf gathers a write's options.
func optionsOf(opts []Option) options {
	var o options
	for _, opt := range opts {
		opt(&o)
	}
	return o
}

// stage tells the crash test the write has reached stage s (nothing
// without PauseAt).
func (o options) stage(s string) {
	if o.pause != nil {
		o.pause(s)
	}
}

// failed is FailWrites's word on a write of path (nil: go ahead).
func failed(path string) error {
	if FailWrites == nil {
		return nil
	}
	if err := FailWrites(path); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}

// Stages of a Write, in order, as PauseAt names them.
const (
	StageWritten  = "written"   // the new content is in the temporary file
	StageSynced   = "synced"    // flushed to disk and closed
	StageBackedUp = "backed-up" // the old file kept as .bak
	StageRenamed  = "renamed"   // the new file in place
)

// PauseAt has Write call f at each stage: the crash test stops a writer
// there, so every kill lands at a known point of the write.
func PauseAt(f func(stage string)) Option { return func(o *options) { o.pause = f } }

// Write replaces path with what write produces, atomically: a reader sees the
// old content or the new, never a mix. The old file, if any, is kept as
// path+".bak". The caller should hold Lock(path) when it read the old content.
func Write(path string, write func(io.Writer) error, opts ...Option) (err error) {
	o := optionsOf(opts)
	stage := o.stage
	if path, err = Resolve(path); err != nil {
		return err
	}
	if err := failed(path); err != nil {
		return err
	}
	removeStale(path)
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, tempPattern(path))
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	mode := fs.FileMode(0o644)
	if st, err := os.Stat(path); err == nil {
		mode = st.Mode().Perm()
	}
	if err = write(tmp); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	stage(StageWritten)
	if err = tmp.Sync(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err = tmp.Close(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err = os.Chmod(tmp.Name(), mode); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	stage(StageSynced)
	if err = backup(path); err != nil {
		return err
	}
	stage(StageBackedUp)
	if err = replace(platform, tmp.Name(), path); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	stage(StageRenamed)
	syncDir(dir)
	return nil
}

// WriteBytes is Write of a byte slice.
func WriteBytes(path string, data []byte) error {
	return Write(path, func(w io.Writer) error { _, err := w.Write(data); return err })
}

// backup keeps the current path as path.bak by a hard link where the file
// system allows it (so path never disappears), else by a copy.
func backup(path string) error {
	if _, err := os.Stat(path); errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	bak := path + ".bak"
	_ = os.Remove(bak)
	if err := os.Link(path, bak); err == nil {
		return nil
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return fmt.Errorf("keeping %s: %w", bak, err)
	}
	return WriteNoBackup(bak, data)
}

// WriteNoBackup writes data to path atomically without keeping a .bak.
func WriteNoBackup(path string, data []byte) error { return writeMode(path, data, 0o644) }

// WritePrivate writes data to path atomically, readable by its owner alone
// (mode 0600) from the first byte: for secrets.
func WritePrivate(path string, data []byte) error { return writeMode(path, data, 0o600) }

func writeMode(path string, data []byte, mode os.FileMode) error {
	path, err := Resolve(path)
	if err != nil {
		return err
	}
	removeStale(path)
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, tempPattern(path))
	if err != nil {
		return err
	}
	if _, err = tmp.Write(data); err == nil {
		err = tmp.Sync()
	}
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(tmp.Name(), mode)
	}
	if err == nil {
		err = replace(platform, tmp.Name(), path)
	}
	if err != nil {
		os.Remove(tmp.Name())
		return err
	}
	syncDir(dir)
	return nil
}

func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		_ = d.Sync()
		d.Close()
	}
}
