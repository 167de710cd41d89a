//go:build windows

// Windows has no kill(pid, 0): whether a writer runs is asked by opening
// the process and reading its exit code. And a rename over a file that
// another program has open without FILE_SHARE_DELETE is refused there with
// a sharing or access error that passes once the other program lets go.

package safefile

import (
	"errors"
	"os"
	"syscall"
)

// Windows error and access codes that package syscall does not name.
const (
	errorSharingViolation          syscall.Errno = 32
	errorLockViolation             syscall.Errno = 33
	errorInvalidParameter          syscall.Errno = 87
	processQueryLimitedInformation               = 0x1000
	stillActive                                  = 259
)

// osSystem is the Windows system.
type osSystem struct{}

// alive opens the process: no such process gives ERROR_INVALID_PARAMETER,
// another user's gives ERROR_ACCESS_DENIED (it runs); one that exited but
// whose handle someone still holds opens, with an exit code other than
// STILL_ACTIVE.
func (osSystem) alive(pid int) bool {
	h, err := syscall.OpenProcess(processQueryLimitedInformation, false, uint32(pid))
	if err != nil {
		return !errors.Is(err, errorInvalidParameter)
	}
	defer syscall.CloseHandle(h)
	var code uint32
	if err := syscall.GetExitCodeProcess(h, &code); err != nil {
		return true
	}
	return code == stillActive
}

// busy reports the errors a rename gets while another program has the file
// open.
func (osSystem) busy(err error) bool {
	return errors.Is(err, errorSharingViolation) || errors.Is(err, errorLockViolation) ||
		errors.Is(err, syscall.ERROR_ACCESS_DENIED)
}

// rename is os.Rename, which on Windows is MoveFileEx with
// MOVEFILE_REPLACE_EXISTING.
func (osSystem) rename(from, to string) error { return os.Rename(from, to) }
