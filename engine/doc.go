// Package engine is pitcard's model of the car on the track: the track and car
// descriptions, the physics of one pass, track-prep traction, calibration to
// the car's own logbook, and prediction with its interval.
//
// Physics is float64 and SI inside. The logbook itself is package logbook and
// the bracket-racing arithmetic package bracket. The package reads no files,
// flags or environment: callers hand it readers and values.
//
// It does not settle a race or pick a dial (package bracket), and it does
// not print: the card is package prep.
package engine
