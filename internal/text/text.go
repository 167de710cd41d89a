// Package text is pitcard's few helpers for words in messages that know
// nothing of racing: a count with its noun, a phrase made a sentence, a
// blank shown as a dash, prose wrapped to a width.
//
// It holds no racing words: those stay with their packages.
package text

import (
	"fmt"
	"strings"
)

// Plural is "1 clean pass" or "2 clean passes": a count in words, for
// messages. The noun is English and singular: one ending in s takes -es
// ("passes"), a consonant and y takes -ies ("entries", but "days"), any
// other -s.
func Plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	if strings.HasSuffix(noun, "s") {
		return fmt.Sprintf("%d %ses", n, noun)
	}
	if consonantY(noun) {
		return fmt.Sprintf("%d %sies", n, noun[:len(noun)-1])
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

// consonantY reports whether noun ends in a y after a consonant ("entry",
// not "day"): the ending English spells -ies in the plural.
func consonantY(noun string) bool {
	if len(noun) < 2 || noun[len(noun)-1] != 'y' {
		return false
	}
	before := noun[len(noun)-2]
	return before >= 'a' && before <= 'z' && !strings.ContainsRune("aeiou", rune(before))
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
