//go:build unix

package pitpage

import (
	"fmt"
	"io/fs"
	"syscall"
)

// fileID is what tells two versions of a file apart beyond their size and
// time (a file system that keeps times to the second): every pitcard write
// renames a new file into place, so the inode changes with each.
func fileID(st fs.FileInfo) string {
	if sys, ok := st.Sys().(*syscall.Stat_t); ok {
		return fmt.Sprintf("%d:%d", sys.Dev, sys.Ino)
	}
	return ""
}
