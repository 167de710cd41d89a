//go:build !unix && !windows

// Platforms that are neither Unix nor Windows (wasm, plan9) have no way
// pitcard uses to ask whether a process runs: a writer is taken as alive,
// and its temporaries are removed by age alone.

package safefile

import "os"

// osSystem is the fallback system.
type osSystem struct{}

func (osSystem) alive(int) bool { return true }

func (osSystem) busy(error) bool { return false }

func (osSystem) rename(from, to string) error { return os.Rename(from, to) }
