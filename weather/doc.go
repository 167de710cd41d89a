// Package weather is pitcard's air: typed quantities with their units, a
// reading from a crew's handheld meter, every figure derived from it (vapor
// pressure, dew point, air density, density altitude, the engine correction
// factors), and the weather log with its short-term trend.
//
// Inside, every quantity is SI in float64 (kelvin, pascal, meter, meter per
// second); units are parsed and printed only at the edges, through the Parse
// and Format functions of each type.
//
// The package does no file or terminal I/O of its own: readers and writers take
// an io.Reader or io.Writer, and nothing here reads flags, environment or
// global settings. It imports nothing else of pitcard.
package weather
