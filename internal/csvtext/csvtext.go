// Package csvtext keeps a free-text field of pitcard's CSV files (a note,
// a track's name, a crew's own column) from running as a formula when the
// file is opened in a spreadsheet, and reads such a field back as typed.
//
// A cell whose first character is =, +, -, @, a tab or a carriage return
// is taken for a formula by a spreadsheet (OWASP, "CSV Injection"); Cell
// puts an apostrophe before it, which a spreadsheet shows as text, and Text
// takes it off again. A cell that reads as a number ("-0.034", "+5") is
// left alone: a spreadsheet reads it as the number it is. Numeric columns
// (a reaction time of -0.034) are never passed through here.
package csvtext

import "strconv"

// formulaStart reports whether a spreadsheet would take a cell beginning
// with c for a formula (OWASP's list).
func formulaStart(c byte) bool {
	return c == '=' || c == '+' || c == '-' || c == '@' || c == '\t' || c == '\r'
}

// quoted reports whether s is apostrophes followed by a formula's first
// character: the cells Cell prefixes (and Text unprefixes), so that a field
// typed with its own apostrophe ('=x) comes back with it.
func quoted(s string) bool {
	i := 0
	for i < len(s) && s[i] == '\'' {
		i++
	}
	return i < len(s) && formulaStart(s[i])
}

// Cell is the text field s as a CSV cell that a spreadsheet shows as text.
func Cell(s string) string {
	if s == "" || !quoted(s) {
		return s
	}
	if s[0] != '\'' {
		if _, err := strconv.ParseFloat(s, 64); err == nil {
			return s // a number, which a spreadsheet reads as one
		}
	}
	return "'" + s
}

// Text is the field a cell written by Cell holds: Cell's apostrophe taken
// off, anything else as it is.
func Text(cell string) string {
	if len(cell) > 1 && cell[0] == '\'' && quoted(cell) {
		return cell[1:]
	}
	return cell
}
