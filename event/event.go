// Package event is pitcard's event folder: its files and their names, the
// settings (pitcard.yaml, the PITCARD_ variables, the flags), the locks and
// safe writes, and the folder's files read and written. What a crew typed
// (a reading, a slip, a round) is package entry's, and files brought in
// from elsewhere (imports, a crewmate's copy compared) are package
// bringin's; both import event, never the reverse. It does not predict
// (engine), settle a race (bracket) or lay out a card (prep).
//
// The commented starter folder that `pitcard init` writes and the built-in
// demo event (an invented track, car and race day) that `--demo` reads are
// embedded in the binary, so nothing is downloaded at run time. The demo
// lives here rather than under testdata/ because go:embed can only reach
// files inside the embedding package's own folder.
package event

import (
	"embed"
	"io/fs"
	"sort"
)

// The files of an event folder.
const (
	SettingsFile = "pitcard.yaml"
	CarFile      = "car.yaml"
	TrackFile    = "track.yaml"
	LogbookFile  = "logbook.csv"
	WeatherFile  = "weather.csv"
	RulesDir     = "rules"
)

//go:embed all:starter
var starter embed.FS

//go:embed all:demo
var demo embed.FS

// Starter is the commented starter folder.
func Starter() fs.FS { return sub(starter, "starter") }

// Demo is the built-in demo event folder. Its rules/ are the rules that ship
// with pitcard (rules), laid over it: one copy of them in the source.
func Demo(rules fs.FS) fs.FS { return overlay{sub(demo, "demo"), rules} }

// overlay is a read-only file system that reads from top first, then base.
type overlay struct{ base, top fs.FS }

func (o overlay) Open(name string) (fs.File, error) {
	if f, err := o.top.Open(name); err == nil {
		if st, err := f.Stat(); err == nil && !st.IsDir() {
			return f, nil
		}
		if b, err := o.base.Open(name); err == nil {
			f.Close()
			return b, nil
		}
		return f, nil // a folder only the top has
	}
	return o.base.Open(name)
}

// ReadDir merges the two folders' entries.
func (o overlay) ReadDir(name string) ([]fs.DirEntry, error) {
	a, errA := fs.ReadDir(o.base, name)
	b, errB := fs.ReadDir(o.top, name)
	if errA != nil && errB != nil {
		return nil, errA
	}
	seen := map[string]bool{}
	var out []fs.DirEntry
	for _, d := range append(b, a...) {
		if !seen[d.Name()] {
			seen[d.Name()] = true
			out = append(out, d)
		}
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name() < out[j].Name() })
	return out, nil
}

func sub(f embed.FS, dir string) fs.FS {
	s, err := fs.Sub(f, dir)
	if err != nil {
		panic(err) // the folder is embedded at build time; a miss is a build bug
	}
	return s
}
