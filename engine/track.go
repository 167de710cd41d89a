package engine

import (
	"errors"
	"fmt"
	"io"

	"pitcard/internal/yamlfile"
	"pitcard/logbook"
	"pitcard/weather"
)

// Track describes a drag strip, as written in track.yaml.
type Track struct {
	// Name as the logbook's track column spells it.
	Name string `yaml:"name"`
	// ElevationFt is the elevation of the starting line above sea level, ft.
	// Valid range −1500..15000.
	ElevationFt float64 `yaml:"elevation_ft"`
	// HeadingDeg is the compass direction the cars run, degrees 0..360
	// (0 = north). It turns the wind into head- and tailwind.
	HeadingDeg float64 `yaml:"heading_deg"`
	// Prep is the usual surface preparation: none, light, full, or a number
	// 0..1 (see the traction model). Default full.
	Prep string `yaml:"prep"`
}

// Elevation is the track's elevation as a length.
func (t Track) Elevation() weather.Length { return weather.Feet(t.ElevationFt) }

// ReadTrack reads a track.yaml from r; name is the file's name for messages.
// Unknown keys are refused (a misspelt key would silently be ignored
// otherwise), and every value is checked against its range.
func ReadTrack(r io.Reader, name string) (Track, error) {
	t := Track{Prep: "full"}
	doc, err := decodeStrict(r, name, &t)
	if err != nil {
		return t, err
	}
	t, err = t.validate(name)
	return t, doc.At(err)
}

func (t Track) validate(name string) (Track, error) {
	t.Name = logbook.TrackName(t.Name)
	if t.Name == "" {
		return t, &weather.InputError{File: name, Field: "name", Reason: "is missing (the track's name as the logbook spells it)"}
	}
	if err := weather.CheckElevation(t.Elevation()); err != nil {
		var ie *weather.InputError
		errors.As(err, &ie)
		return t, ie.Named("elevation_ft").At(name, 0)
	}
	if !(t.HeadingDeg >= 0 && t.HeadingDeg <= 360) {
		return t, &weather.InputError{File: name, Field: "heading_deg", Value: fmt.Sprint(t.HeadingDeg), Reason: "is outside 0..360 degrees"}
	}
	return t, nil
}

// decodeStrict decodes one YAML document into v, refusing unknown keys, and
// turns YAML's errors into InputErrors that name the file and line.
func decodeStrict(r io.Reader, name string, v any) (*yamlfile.Doc, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, err
	}
	doc, err := yamlfile.Parse(data, name)
	if err != nil {
		return nil, err
	}
	return doc, doc.Decode(v, true)
}
