// Package logbook is the car's logbook of passes: a time slip's fields and
// checks, logbook.csv read and written, the notes that mark an aborted run,
// the figures of a group of passes, and a pass cut into its segments
// between timers with their average speeds and accelerations (segments.go).
//
// What a slip shows (dial-ins, elapsed and reaction times, trap speeds) is
// kept exact as it was typed. The package reads no files, flags or
// environment: callers hand it readers and writers.
package logbook
