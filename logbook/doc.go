// Package logbook is the car's logbook of passes: a time slip's fields and
// checks, and logbook.csv read and written.
// It opens no file and reads no flag or environment (callers hand it readers
// and writers), and it predicts nothing: the model and the card are elsewhere.
//
// Besides, it knows the notes that mark an aborted run, the figures of a
// group of passes, and a pass cut into its segments between timers with
// their average speeds and accelerations (segments.go). What a slip shows
// (dial-ins, elapsed and reaction times, trap speeds) is kept exact as it
// was typed.
package logbook
