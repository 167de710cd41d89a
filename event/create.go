package event

import (
	"bytes"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"pitcard/scripts"
)

// IgnoreFile is written into every new folder: what version control and
// sync tools should leave out (pitcard's locks, backups and temporaries,
// and the pit page's access tokens).
const IgnoreFile = ".gitignore"

const ignoreText = `# pitcard's working files: locks, backups and half-written temporaries
*.lock
*.bak
.*.tmp-*
# what pitcard remembers of a file between writes (its rows, for the quick append)
.*.count
# the pit page's access links: anyone holding them can read (or write) the logbook
` + TokensFile + "\n"

// TokensFile holds the pit page's access tokens (see pitpage); it is made
// with mode 0600 and left out of version control by the folder's .gitignore.
const TokensFile = ".pitcard-tokens"

// Create writes a new event folder in dir: the starter (or, with demo, the
// demo event), the rules that ship with pitcard and the .gitignore. It never
// overwrites: a folder holding any of those files is refused. today dates the
// starter's schedule. It returns the files written.
func Create(dir string, demo bool, today time.Time) ([]string, error) {
	src := Starter()
	if demo {
		src = Demo(scripts.Shipped())
	}
	// The folder's files, and the rules that ship with pitcard (the demo has its own copy).
	from := map[string]fs.FS{}
	var files []string
	for _, f := range []fs.FS{scripts.Shipped(), src} {
		err := fs.WalkDir(f, ".", func(p string, d fs.DirEntry, err error) error {
			if err == nil && !d.IsDir() {
				if _, dup := from[p]; !dup {
					files = append(files, p)
				}
				from[p] = f
			}
			return err
		})
		if err != nil {
			return nil, err
		}
	}
	files = append(files, IgnoreFile)
	sort.Strings(files)
	var exist []string
	for _, f := range files {
		if _, err := os.Stat(filepath.Join(dir, f)); err == nil {
			exist = append(exist, f)
		}
	}
	if len(exist) > 0 {
		return nil, userErrf("%s already has %s: pitcard init never overwrites; choose an empty folder", dir, strings.Join(exist, ", "))
	}
	for _, f := range files {
		var data []byte
		if f == IgnoreFile {
			data = []byte(ignoreText)
		} else {
			var err error
			if data, err = fs.ReadFile(from[f], f); err != nil {
				return nil, err
			}
		}
		if f == ScheduleFile && !demo {
			data = bytes.ReplaceAll(data, []byte("DATE"), []byte(today.Format("2006-01-02")))
		}
		dst := filepath.Join(dir, f)
		if err := os.MkdirAll(filepath.Dir(dst), 0o755); err != nil {
			return nil, err
		}
		if err := os.WriteFile(dst, data, 0o644); err != nil {
			return nil, err
		}
	}
	return files, nil
}
