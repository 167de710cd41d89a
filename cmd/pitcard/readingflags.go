package main

import (
	"errors"
	"time"

	"github.com/spf13/cobra"

	"pitcard/weather"
)

// readingFlags are the flags of one weather reading, shared by every command
// that takes the air: the same names and unit handling everywhere.
type readingFlags struct {
	Temp, Baro, BaroKind, Humidity, DewPoint, Elevation, Wind, WindFrom, TrackTemp string
}

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

// given reports whether any reading flag was set.
func (f *readingFlags) given() bool {
	return f.Temp != "" || f.Baro != "" || f.BaroKind != "" || f.Humidity != "" || f.DewPoint != "" ||
		f.Wind != "" || f.WindFrom != "" || f.TrackTemp != ""
}

// elevation is --elevation, or the track's.
func (f *readingFlags) elevation(u weather.Units, track weather.Length, haveTrack bool) (weather.Length, error) {
	if f.Elevation == "" {
		if !haveTrack {
			return 0, userErrf("the track elevation is unknown: give --elevation (e.g. --elevation 2240ft) or write track.yaml")
		}
		return track, nil
	}
	h, err := weather.ParseLength(f.Elevation, u.Length)
	return h, flagErr(err, "--elevation")
}

// reading builds a reading from the flags at time now. With base (the latest
// logged reading, say) the flags given replace its fields; without it temp,
// baro and humidity (or dew point) are required.
func (f *readingFlags) reading(u weather.Units, now time.Time, base *weather.Reading) (weather.Reading, error) {
	var r weather.Reading
	if base != nil {
		r = *base
	} else {
		for _, req := range []struct{ name, v string }{{"--temp", f.Temp}, {"--baro", f.Baro}} {
			if req.v == "" {
				return r, userErrf("%s is required (or use --latest for the weather log's last reading)", req.name)
			}
		}
		if f.Humidity == "" && f.DewPoint == "" {
			return r, userErrf("--humidity or --dewpoint is required (or use --latest for the weather log's last reading)")
		}
		r.Time = now
	}
	var err error
	if f.Temp != "" {
		if r.Temp, err = weather.ParseTemperature(f.Temp, u.Temp); err != nil {
			return r, flagErr(err, "--temp")
		}
	}
	if f.Baro != "" {
		if r.Baro, err = weather.ParsePressure(f.Baro, u.Pressure); err != nil {
			return r, flagErr(err, "--baro")
		}
		r.BaroKind = weather.StationPressure
	}
	if f.BaroKind != "" {
		if r.BaroKind, err = weather.ParsePressureKind(f.BaroKind); err != nil {
			return r, flagErr(err, "--baro-kind")
		}
	}
	if f.Humidity != "" && f.DewPoint != "" {
		return r, userErrf("give --humidity or --dewpoint, not both")
	}
	if f.Humidity != "" {
		if r.RH, err = weather.ParsePercent(f.Humidity); err != nil {
			return r, flagErr(err, "--humidity")
		}
		r.DewPointSet = false
	}
	if f.DewPoint != "" {
		if r.DewPoint, err = weather.ParseTemperature(f.DewPoint, u.Temp); err != nil {
			return r, flagErr(err, "--dewpoint")
		}
		r.DewPointSet = true
	}
	if f.Wind != "" {
		if r.Wind, err = weather.ParseSpeed(f.Wind, u.Speed); err != nil {
			return r, flagErr(err, "--wind")
		}
	}
	if f.WindFrom != "" {
		if r.WindFrom, err = weather.ParseDirection(f.WindFrom); err != nil {
			return r, flagErr(err, "--wind-from")
		}
		r.WindDirUnknown = false
	} else if f.Wind != "" && base == nil && r.Wind > 0 {
		r.WindDirUnknown = true // a speed without a direction: neither head- nor tailwind
	}
	if f.TrackTemp != "" {
		if r.TrackTemp, err = weather.ParseTemperature(f.TrackTemp, u.Temp); err != nil {
			return r, flagErr(err, "--track-temp")
		}
		r.HasTrack = true
	}
	return r, nil
}

// flagErr names the flag in an InputError from a parser.
func flagErr(err error, flag string) error {
	var ie *weather.InputError
	if errors.As(err, &ie) {
		return ie.Named(flag)
	}
	return err
}

// validateFlags checks a reading and names the flags in its error.
func validateFlags(r weather.Reading, h weather.Length) error {
	err := r.Validate(h)
	var ie *weather.InputError
	if errors.As(err, &ie) {
		return ie.Named("--" + ie.Field)
	}
	return err
}
