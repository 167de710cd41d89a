// Package engine is pitcard's model of the car on the track: the track and car
// descriptions, the physics of one pass, track-prep traction, calibration to
// the car's own logbook, prediction with its interval, and the bracket-racing
// arithmetic of dial-ins, breakouts and margins.
//
// Physics is float64 and SI inside; what a time slip shows (dial-ins, elapsed
// and reaction times) is exact decimal. The package reads no files, flags or
// environment: callers hand it readers and values.
package engine
