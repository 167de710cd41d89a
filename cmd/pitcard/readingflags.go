package main

import (
	"pitcard/entry"

	"github.com/spf13/cobra"
)

// readingFlags are the flags of one weather reading, shared by every command
// that takes the air: the same names and unit handling everywhere.
type readingFlags struct{ entry.ReadingFields }

func (f *readingFlags) bind(cmd *cobra.Command) {
	fl := cmd.Flags()
	fl.StringVar(&f.Temp, "temp", "", `air temperature, e.g. 88F or 31C`)
	fl.StringVar(&f.Baro, "baro", "", `barometer, e.g. 28.92inHg or 979hPa (station pressure unless --baro-kind altimeter)`)
	fl.StringVar(&f.BaroKind, "baro-kind", "", `station (handheld meter, uncorrected) or altimeter (airport/app, sea-level)`)
	fl.StringVar(&f.Humidity, "humidity", "", `relative humidity, e.g. 45%`)
	fl.StringVar(&f.DewPoint, "dewpoint", "", `dew point instead of humidity, e.g. 52F`)
	fl.StringVar(&f.Elevation, "elevation", "", `track elevation, e.g. 2240ft (default: track.yaml)`)
	fl.StringVar(&f.Wind, "wind", "", `wind speed, e.g. 8mph`)
	fl.StringVar(&f.WindFrom, "wind-from", "", `compass direction the wind blows from, degrees (0 = north)`)
	fl.StringVar(&f.TrackTemp, "track-temp", "", `track surface temperature, e.g. 118F`)
}
