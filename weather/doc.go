// Package weather is pitcard's air: typed quantities with their units, a
// meter's reading, every figure derived from it, and the weather log with its
// short-term trend.
// It does no file or terminal I/O of its own (readers and writers take an
// io.Reader or io.Writer), reads no flags, environment or global settings,
// and imports nothing else of pitcard.
//
// The figures derived from a reading from a crew's handheld meter are vapor
// pressure, dew point, air density, density altitude and the engine
// correction factors. Inside, every quantity is SI in float64 (kelvin,
// pascal, meter, meter per second); units are parsed and printed only at the
// edges, through the Parse and Format functions of each type.
package weather
