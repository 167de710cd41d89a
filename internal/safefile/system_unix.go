//go:build unix

// Unix asks whether a process runs with kill(pid, 0), which Windows lacks;
// a rename there replaces a file that others have open, so nothing is busy.

package safefile

import (
	"errors"
	"os"
	"syscall"
)

// osSystem is the Unix system.
type osSystem struct{}

// alive sends signal 0, which checks without sending anything; EPERM means
// the process exists as another user.
func (osSystem) alive(pid int) bool {
	err := syscall.Kill(pid, 0)
	return err == nil || errors.Is(err, syscall.EPERM)
}

// busy is false: a Unix rename is not refused because a file is open.
func (osSystem) busy(error) bool { return false }

func (osSystem) rename(from, to string) error { return os.Rename(from, to) }
