//go:build !unix

package pitpage

import "io/fs"

// fileID is empty where the file system gives no inode: size and time alone
// tell versions apart.
func fileID(fs.FileInfo) string { return "" }
