package event

import (
	"errors"
	"fmt"
	"strings"

	"github.com/shopspring/decimal"

	"pitcard/weather"
)

// Errors that are the crew's to fix, and the few helpers that name a field
// in them: both event and the packages over it (entry, bringin, the front
// ends) answer bad input through these.

// IsBadInput reports whether err is the crew's to fix: a front end answers
// it as bad input (the command line's exit 2, the page's form message).
func IsBadInput(err error) bool {
	var b interface{ BadInput() bool }
	return errors.As(err, &b) && b.BadInput()
}

// FlagErr names the flag in an InputError from a parser; any other error
// (and nil) passes unchanged.
func FlagErr(err error, flag string) error {
	var ie *weather.InputError
	if errors.As(err, &ie) {
		return ie.Named(flag)
	}
	return err
}

// BrokenInput is bad input the card could print around: the input is
// usable, and the errors are reported after the card.
type BrokenInput struct {
	// Errs are the errors collected, each the crew's to fix.
	Errs []error
}

// Error lists the errors, one a line.
func (b BrokenInput) Error() string {
	msgs := make([]string, len(b.Errs))
	for i, e := range b.Errs {
		msgs[i] = e.Error()
	}
	return strings.Join(msgs, "\n")
}

// BadInput marks the errors as the crew's to fix.
func (b BrokenInput) BadInput() bool { return true }

// Unwrap gives the errors collected, so errors.Is and errors.As reach each
// of them (an InputError among them, say).
func (b BrokenInput) Unwrap() []error { return b.Errs }

// Usable reports whether err still left something to use (a round's input
// to print a card from, an opponent book's good rows): it is none, or a
// BrokenInput.
func Usable(err error) bool {
	var b BrokenInput
	return err == nil || errors.As(err, &b)
}

// RangeErr is an InputError for field when the seconds d lie outside r,
// and nil when they lie within it.
func RangeErr(field string, d decimal.Decimal, r [2]float64) error {
	if f := d.InexactFloat64(); f < r[0] || f > r[1] {
		return &weather.InputError{Field: field, Value: d.String(), Reason: fmt.Sprintf("is outside %g..%g s", r[0], r[1])}
	}
	return nil
}
