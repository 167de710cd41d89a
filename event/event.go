// Package event is pitcard's event folder: the names of its files, the
// commented starter folder that `pitcard init` writes, and the built-in demo
// event (an invented track, car and race day) that `--demo` reads. Both are
// embedded in the binary, so nothing is downloaded at run time.
//
// The demo lives here rather than under testdata/ because go:embed can only
// reach files inside the embedding package's own folder.
package event

import (
	"embed"
	"io/fs"
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

// Demo is the built-in demo event folder.
func Demo() fs.FS { return sub(demo, "demo") }

func sub(f embed.FS, dir string) fs.FS {
	s, err := fs.Sub(f, dir)
	if err != nil {
		panic(err) // the folder is embedded at build time; a miss is a build bug
	}
	return s
}
