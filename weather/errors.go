package weather

import (
	"fmt"
	"strconv"
)

// InputError is bad input a person can fix: a value that does not parse, has
// an unknown unit, or lies outside its valid range. It names the field, the
// value as it was given, and what would have been valid; readers of files add
// the file and line.
type InputError struct {
	File   string // file the value came from, or "" for a flag
	Line   int    // 1-based line in File, or 0
	Field  string // flag or column name, e.g. "temp" or "temp_f"
	Value  string // the value as given
	Reason string // what is wrong and what is valid, e.g. "is outside -40..140 °F"
}

// Error says where (file and line, when known), the field, the value and
// what would have been valid.
func (e *InputError) Error() string {
	where := ""
	switch {
	case e.File != "" && e.Line > 0:
		where = fmt.Sprintf("%s line %d: ", e.File, e.Line)
	case e.File != "":
		where = e.File + ": "
	}
	if e.Value == "" {
		return fmt.Sprintf("%s%s %s", where, e.Field, e.Reason)
	}
	return fmt.Sprintf("%s%s %s %s", where, e.Field, strconv.Quote(shortValue(e.Value)), e.Reason)
}

// shortValue keeps a message readable when the value is huge: a number of
// many digits (1e308 read as a decimal) is shown in exponent form, a long
// text is cut with its length said.
func shortValue(v string) string {
	const maxShown = 40
	if len(v) <= maxShown {
		return v
	}
	if f, err := strconv.ParseFloat(v, 64); err == nil {
		return strconv.FormatFloat(f, 'g', 6, 64)
	}
	return fmt.Sprintf("%s… (%d characters)", v[:maxShown], len(v))
}

// BadInput marks the error as the user's to fix (pitcard exits with code 2).
func (e *InputError) BadInput() bool { return true }

// At returns a copy of the error located at file and line.
func (e *InputError) At(file string, line int) *InputError {
	c := *e
	c.File, c.Line = file, line
	return &c
}

// Named returns a copy of the error naming field instead.
func (e *InputError) Named(field string) *InputError {
	c := *e
	c.Field = field
	return &c
}

func inputErr(field, value, format string, args ...any) *InputError {
	return &InputError{Field: field, Value: value, Reason: fmt.Sprintf(format, args...)}
}
