// Package text is pitcard's few helpers for words in messages that know
// nothing of racing: a count with its noun, a phrase made a sentence, a
// blank shown as a dash.
package text

import (
	"fmt"
	"strings"
)

// Plural is "1 clean pass" or "2 clean passes": a count in words, for
// messages.
func Plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	if strings.HasSuffix(noun, "s") {
		return fmt.Sprintf("%d %ses", n, noun)
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

// UpperFirst is s with its first letter a capital: a phrase made a sentence.
func UpperFirst(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

// OrDash is s, or a dash where it is blank (a table cell with nothing known).
func OrDash(s string) string {
	if strings.TrimSpace(s) == "" {
		return "–"
	}
	return s
}
