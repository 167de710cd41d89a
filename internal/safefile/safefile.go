// Package safefile writes pitcard's files so that a crash, a full disk or a
// second pitcard process never leaves one half-written or loses a row: writes
// go to a temporary file in the same folder, are flushed to disk, and replace
// the old file by rename, which is atomic on every file system pitcard runs
// on. The previous version is kept as NAME.bak. Writers serialise on a lock
// file, NAME.lock, so two processes appending at once both land.
package safefile

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"time"

	"github.com/gofrs/flock"
)

// LockTimeout is how long Lock waits for another pitcard process to finish.
var LockTimeout = 10 * time.Second

// Lock takes the exclusive lock of path (held on path+".lock") and returns the
// function that releases it. It waits up to LockTimeout for another holder.
func Lock(path string) (unlock func(), err error) {
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

// Write replaces path with what write produces, atomically: a reader sees the
// old content or the new, never a mix. The old file, if any, is kept as
// path+".bak". The caller should hold Lock(path) when it read the old content.
func Write(path string, write func(io.Writer) error) (err error) {
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
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
	if err = tmp.Sync(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err = tmp.Close(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err = os.Chmod(tmp.Name(), mode); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err = backup(path); err != nil {
		return err
	}
	if err = os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
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
func WriteNoBackup(path string, data []byte) error {
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
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
		err = os.Chmod(tmp.Name(), 0o644)
	}
	if err == nil {
		err = os.Rename(tmp.Name(), path)
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
