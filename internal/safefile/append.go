package safefile

import (
	"fmt"
	"os"

	"github.com/gofrs/flock"
)

// Stages of an Append, in order, as PauseAt names them.
const (
	StageAppendedHalf = "appended-half" // half the new bytes are in the file
	StageAppended     = "appended"      // all of them, not yet flushed
	StageAppendSynced = "append-synced" // flushed to disk and closed
)

// Append adds data at the end of path, which must exist, and flushes it to
// disk before returning: the constant-time write of a row added after every
// other. The caller holds Lock(path) and has checked that the file ends
// where a row may begin (a line end). A crash mid-append can leave part of
// data at the end, without its final line end: the reader finds such a
// torn last line and sets it aside, and the next writer must not append to
// it (it checks the line end). No .bak is kept (the old content is not
// changed) and the folder is not touched, so it needs no flush.
func Append(path string, data []byte, opts ...Option) (err error) {
	o := optionsOf(opts)
	stage := o.stage
	if path, err = Resolve(path); err != nil {
		return err
	}
	if err := failed(path); err != nil {
		return err
	}
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_APPEND, 0)
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	defer func() {
		if cerr := f.Close(); err == nil && cerr != nil {
			err = fmt.Errorf("writing %s: %w", path, cerr)
		}
	}()
	first := data
	if o.pause != nil { // the crash test stops the writer halfway
		first = data[:len(data)/2]
	}
	if _, err = f.Write(first); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if len(first) < len(data) {
		stage(StageAppendedHalf)
		if _, err = f.Write(data[len(first):]); err != nil {
			return fmt.Errorf("writing %s: %w", path, err)
		}
	}
	stage(StageAppended)
	if err = f.Sync(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	stage(StageAppendSynced)
	return nil
}

// EndsWithLineEnd reports whether the file at path ends with a line end
// (an empty file does not): where a row can be appended without being
// glued to a torn one.
func EndsWithLineEnd(path string) (bool, error) {
	path, err := Resolve(path)
	if err != nil {
		return false, err
	}
	f, err := os.Open(path)
	if err != nil {
		return false, err
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil || st.Size() == 0 {
		return false, err
	}
	var b [1]byte
	if _, err := f.ReadAt(b[:], st.Size()-1); err != nil {
		return false, err
	}
	return b[0] == '\n', nil
}

// Torn reports whether the file at path ends in a line a writer left cut
// short (a crash mid-append), not one being appended right now: it does not
// end with a line end, and no writer holds its lock. A reader that finds a
// last line without its line end asks this before it says the line is torn;
// a line being appended is taken as not there yet. A caller holding the
// lock itself must not ask (the line is torn: no one else is writing).
func Torn(path string) bool {
	path, err := Resolve(path)
	if err != nil {
		return false
	}
	l := flock.New(path + ".lock")
	ok, err := l.TryLock()
	if err != nil || !ok {
		return false // a writer is at it
	}
	defer func() { _ = l.Unlock() }()
	ends, err := EndsWithLineEnd(path)
	return err == nil && !ends
}
