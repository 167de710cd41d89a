package event

import "pitcard/engine"

// What event's external tests (package event_test: those that gather a
// round with package entry, which imports event) reach of its unexported
// state.

// HeldOutFile is heldOutFile, the held-out predictions' file in CacheDir.
const HeldOutFile = heldOutFile

// SetProcessHeldOut replaces the held-out predictions every folder of the
// process shares (a test's clean start, and its restore).
func SetProcessHeldOut(c *engine.HeldOutCache) { processHeldOut = c }
