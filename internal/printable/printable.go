// Package printable makes text that came from outside pitcard (a rule's
// reason, a pass's notes, a crewmate's logbook) safe to print: no control
// character reaches a terminal, a one-line field stays one line.
//
// It does not escape for HTML or CSV: html/template and internal/csvtext do.
package printable

import (
	"fmt"
	"strings"
	"unicode/utf8"
)

// Line is s with every control character made visible: a line break or a
// tab becomes a space (the text is one line on the card), anything else
// (ESC, BEL, backspace, DEL, the C1 controls, a broken UTF-8 byte) its
// escape, \x1b. Text without one is returned as it is.
func Line(s string) string {
	if !needs(s) {
		return s
	}
	var b strings.Builder
	b.Grow(len(s) + 8)
	for i, w := 0, 0; i < len(s); i += w {
		r, size := utf8.DecodeRuneInString(s[i:])
		w = size
		switch {
		case r == utf8.RuneError && size == 1:
			fmt.Fprintf(&b, `\x%02x`, s[i])
		case r == '\n' || r == '\r' || r == '\t':
			b.WriteByte(' ')
		case control(r):
			if r < 0x100 {
				fmt.Fprintf(&b, `\x%02x`, r)
			} else {
				fmt.Fprintf(&b, `\u%04x`, r)
			}
		default:
			b.WriteString(s[i : i+size])
		}
	}
	return b.String()
}

func needs(s string) bool {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c < 0x20 || c == 0x7f || c >= 0x80 {
			if c >= 0x80 { // look closer only at multi-byte text
				return !utf8.ValidString(s) || strings.IndexFunc(s, control) >= 0
			}
			return true
		}
	}
	return false
}

// control: C0, DEL, C1, and the bidirectional overrides that reorder what a
// terminal shows (U+202A..U+202E, U+2066..U+2069).
func control(r rune) bool {
	return r < 0x20 || r == 0x7f || (r >= 0x80 && r < 0xa0) || (r >= 0x202a && r <= 0x202e) || (r >= 0x2066 && r <= 0x2069)
}
