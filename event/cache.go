package event

import (
	"bytes"
	"os"
	"path/filepath"

	"pitcard/engine"
	"pitcard/internal/safefile"
)

// CacheDir is the folder's cache: what pitcard can compute again, kept to
// save time (the pass model's held-out predictions). A crew may delete it
// at any time. It carries a CACHEDIR.TAG (the Cache Directory Tagging
// Specification, which backup tools honour) and a .gitignore that ignores
// it all, so version control and backups leave it out.
const CacheDir = ".pitcard-cache"

// heldOutFile is the held-out predictions' file in CacheDir.
const heldOutFile = "heldout.json"

// cacheTag is the tag the Cache Directory Tagging Specification asks for.
const cacheTag = "Signature: 8a477f597d28d172789f06886806bc55\n# This file is a cache directory tag created by pitcard: the folder holds what pitcard can compute again.\n"

// cacheDir is where the folder's cache lives: CacheDir in the folder, and
// for the read-only demo the user's cache directory (os.UserCacheDir, e.g.
// ~/.cache/pitcard/demo). "" where there is none.
func (e *Folder) cacheDir() string {
	if e.Demo {
		if d, err := os.UserCacheDir(); err == nil {
			return filepath.Join(d, "pitcard", "demo")
		}
		return ""
	}
	if e.Dir == "" {
		return ""
	}
	return filepath.Join(e.Dir, CacheDir)
}

// processHeldOut is the held-out predictions every folder of the process
// shares behind its own file: its keys are digests of everything a
// prediction is made from, so one folder's entries are right for another's
// with the same passes (a copy of the event, the same folder opened again),
// and a long-lived process (the pit page's) or a second card of the same
// logbook starts warm. Bounded by engine.MaxHeldOutEntries.
var processHeldOut = engine.NewHeldOutCache()

// ProcessHeldOut is the process-wide cache behind every folder's HeldOut,
// for a front end that keeps its own cache in memory to put in front of.
func ProcessHeldOut() *engine.HeldOutCache { return processHeldOut }

// HeldOut is the folder's cache of the model's held-out predictions, read
// once from its cache directory; an empty one where the file is missing or
// unreadable (a cache is only ever a saving). A prediction it lacks is
// looked up in the process's (ProcessHeldOut), and kept in the folder's.
func (e *Folder) HeldOut() *engine.HeldOutCache {
	if e.heldOut != nil {
		return e.heldOut
	}
	e.heldOut = engine.NewHeldOutCache()
	if dir := e.cacheDir(); dir != "" {
		if f, err := os.Open(filepath.Join(dir, heldOutFile)); err == nil {
			e.heldOut = engine.ReadHeldOutCache(f)
			_ = f.Close()
		}
	}
	return e.heldOut.Behind(processHeldOut)
}

// KeepHeldOut writes the held-out predictions back to CacheDir when a new
// one was computed. A cache that cannot be written is left (the next card
// computes it again); the error says why, for a warning.
func (e *Folder) KeepHeldOut() error {
	dir := e.cacheDir()
	if e.heldOut == nil || dir == "" || !e.heldOut.Changed() {
		return nil
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for name, body := range map[string]string{"CACHEDIR.TAG": cacheTag, ".gitignore": "# pitcard's cache: safe to delete, never worth keeping\n*\n"} {
		if _, err := os.Stat(filepath.Join(dir, name)); err != nil {
			if err := safefile.WriteNoBackup(filepath.Join(dir, name), []byte(body)); err != nil {
				return err
			}
		}
	}
	var buf bytes.Buffer
	if _, err := e.heldOut.WriteTo(&buf); err != nil {
		return err
	}
	return safefile.WriteNoBackup(filepath.Join(dir, heldOutFile), buf.Bytes())
}
