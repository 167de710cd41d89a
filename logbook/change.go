package logbook

import (
	"fmt"
	"strings"

	"pitcard/internal/printable"
	"pitcard/weather"
)

// MaxChangeLen is the longest a pass's change may be, in bytes: what was
// done to the car in a few words ("4.10 rear gear", "+2 psi boost"); the
// story goes in the notes.
const MaxChangeLen = 200

// ChangeColumn is the logbook's column of a pass's change. It is written
// only where a pass has one: a logbook whose car never changed keeps the
// columns it had, byte for byte.
const ChangeColumn = "change"

// AnyChange reports whether a pass of passes has a change to write.
func AnyChange(passes []Pass) bool {
	for _, p := range passes {
		if p.Change != "" {
			return true
		}
	}
	return false
}

// writtenColumns are the columns WriteLogbook writes for passes: every
// column of Columns, the change last and only when one is there.
func writtenColumns(passes []Pass) []string {
	if AnyChange(passes) {
		return Columns
	}
	return Columns[:len(Columns)-1]
}

// ParseChange reads a pass's change (the crew's words for what changed on
// the car before it; "" for nothing): one line of printable text of at most
// MaxChangeLen bytes. field names it in messages (the change column, the
// --change flag, the form's field).
func ParseChange(field, s string) (string, error) {
	s = strings.TrimSpace(s)
	if len(s) > MaxChangeLen {
		return "", &weather.InputError{Field: field, Value: s,
			Reason: fmt.Sprintf("is %d bytes long (at most %d): say what changed in a few words, the rest goes in the notes", len(s), MaxChangeLen)}
	}
	if printable.Line(s) != s {
		// A line break would split the logbook's row in a spreadsheet, an
		// escape would reach the terminal of whoever lists the logbook.
		return "", &weather.InputError{Field: field, Value: s, // quoted with its control characters escaped
			Reason: "holds a control character (a line break, a tab, an escape ...): write it on one line of plain text"}
	}
	return s, nil
}

// ChangeWords are the phrases in a pass's notes that say, by themselves,
// that the car was changed before it ("retuned", "jetted down 2"). They
// match as abort words do: at the start of a word of the notes, in any
// case, a phrase's words in order; right after a negation ("not retuned",
// "didn't rejet") they do not count. The crew adds its own with the setting
// change_words; nil is DefaultChangeWords.
//
// Beside the list, notes say the car changed when a word of change (changed,
// swapped, installed, new, more, less, a signed number "+2" ...) comes
// shortly before one of the car's parts (converter, stall, gear, jet, tune,
// timing, boost, psi, tire ...), or a part shortly before a word of change
// ("timing pulled 2", "boost up"), in one clause and not negated. A word of
// change alone ("changed lanes", "new PB") and a part alone ("boost came in
// late", "missed second gear") are not a change.
type ChangeWords []string

// DefaultChangeWords is pitcard's list (common practice, no source): the
// words a crew writes for a change that name no part.
var DefaultChangeWords = ChangeWords{"retune", "re-tune", "rejet", "re-jet", "jetted", "regear", "re-gear"}

// changeVerb is a word of change and how many words after it (or, for a
// word that follows its part, before it) the part may be.
type changeVerb struct {
	word string
	gap  int
}

// changeBefore are words of change that come before their part: "changed
// rear gear", "swapped to the 5400 stall", "new converter" (an adjective
// reaches less far: "new PB in high gear" is no change). "Dropped" is not
// one: "fuel pressure dropped" is a fault, not a change.
var changeBefore = []changeVerb{
	{"changed", 4}, {"change", 4}, {"changing", 4}, {"swapped", 4}, {"swap", 4}, {"installed", 4}, {"install", 4},
	{"replaced", 4}, {"replace", 4}, {"put in", 4}, {"went to", 4}, {"switched", 4}, {"switch", 4},
	{"added", 3}, {"add", 3}, {"pulled", 3}, {"took out", 3}, {"removed", 3}, {"raised", 3}, {"lowered", 3},
	{"bumped", 3}, {"upped", 3}, {"more", 2}, {"less", 2}, {"richer", 2}, {"leaner", 2},
	{"new", 2}, {"different", 2}, {"bigger", 2}, {"smaller", 2},
}

// changeAfter are words of change that follow their part: "gear changed to
// 4.10", "timing pulled 2", "boost up 2" (up and down only right after it:
// "boost came up slow" is no change).
var changeAfter = []changeVerb{
	{"changed", 2}, {"change", 2}, {"swapped", 2}, {"installed", 2}, {"replaced", 2}, {"pulled", 2}, {"added", 2},
	{"raised", 2}, {"lowered", 2}, {"bumped", 2}, {"upped", 2}, {"advanced", 2}, {"retarded", 2},
	{"richer", 2}, {"leaner", 2}, {"up", 1}, {"down", 1},
}

// signedGap is how far after a signed number ("+2", "-1") its part may be:
// "+2 psi boost", "-2 degrees timing".
const signedGap = 3

// carParts are the parts whose change moves a car's ET (common practice, no
// source). A part matches a word exactly or with a plural s/es: "gear"
// finds "gears", never "geared"; "cam" never "came".
var carParts = []string{
	"converter", "torque converter", "stall", "gear", "gearing", "ratio", "rear end", "jet", "carb", "carburetor",
	"tune", "tuning", "timing", "boost", "psi", "wastegate", "nitrous", "cam", "injector", "fuel", "plug",
	"tire", "slick", "shock", "spring", "strut", "wheelie bar", "ballast", "weight", "transmission", "trans",
	"clutch", "intake", "header", "exhaust",
}

// changeNegations turn the word of change after them around ("didn't
// change the converter", "no new tune"); a copy of the abort words'
// negations with a few more.
var changeNegations = []string{"no", "not", "never", "without", "didn't", "didnt", "did not", "wasn't", "wasnt",
	"haven't", "havent", "hasn't", "hasnt", "don't", "dont"}

// nothingChanged are the crew's words in the change field for no change.
var nothingChanged = map[string]bool{"none": true, "no": true, "nothing": true, "n/a": true, "na": true, "-": true,
	"no change": true, "no changes": true, "nothing changed": true, "same": true, "same car": true}

// ChangeNotesScanned is how much of a pass's notes, in bytes, is read for a
// change: the change is said in a note's first words, and a pasted
// megabyte must not be split into words on every read.
const ChangeNotesScanned = 2000

// With is the list with the crew's own words added.
func (c ChangeWords) With(extra []string) ChangeWords {
	out := append(ChangeWords(nil), c.orDefault()...)
	for _, w := range extra {
		if w = strings.ToLower(strings.TrimSpace(w)); w != "" {
			out = append(out, w)
		}
	}
	return out
}

func (c ChangeWords) orDefault() ChangeWords {
	if c == nil {
		return DefaultChangeWords
	}
	return c
}

// ChangeNoted reports whether the car changed before pass p, and what the
// crew said of it: its change field when that says something, else the
// clause of its notes that says so (see ChangeWords; nil words is
// DefaultChangeWords).
func ChangeNoted(p Pass, words ChangeWords) (what string, ok bool) {
	return words.Noted(p.Change, p.Notes)
}

// Noted is ChangeNoted on a pass's change field and notes.
func (c ChangeWords) Noted(change, notes string) (string, bool) {
	if t := strings.TrimSpace(change); t != "" && !nothingChanged[strings.ToLower(strings.Join(strings.Fields(t), " "))] {
		return t, true
	}
	if len(notes) > ChangeNotesScanned {
		notes = notes[:ChangeNotesScanned]
	}
	words := changeNoteWords(notes)
	lower := make([]string, len(words))
	for i, w := range words {
		lower[i] = w.word
	}
	for i := range lower {
		if changeAt(lower, i, c.orDefault()) {
			return clauseOf(words, i), true
		}
	}
	return "", false
}

// changeAt: a change is said starting at word i, not negated.
func changeAt(words []string, i int, phrases ChangeWords) bool {
	if negatedChange(words[:i]) {
		return false
	}
	for _, w := range phrases {
		if p := strings.Fields(strings.ToLower(w)); len(p) > 0 && prefixPhrase(words[i:], p) {
			return true
		}
	}
	signed := len(words[i]) > 1 && (words[i][0] == '+' || words[i][0] == '-') && (words[i][1] == '.' || words[i][1] >= '0' && words[i][1] <= '9')
	if signed && partWithin(words, i+1, signedGap) {
		return true
	}
	for _, v := range changeBefore {
		if p := strings.Fields(v.word); exactPhrase(words[i:], p) && partWithin(words, i+len(p), v.gap) {
			return true
		}
	}
	if n := partAt(words, i); n > 0 {
		for _, v := range changeAfter {
			p := strings.Fields(v.word)
			for k := i + n; k < len(words) && k < i+n+v.gap && words[k] != "|"; k++ {
				if exactPhrase(words[k:], p) && !negatedChange(words[i+n:k]) {
					return true
				}
			}
		}
	}
	return false
}

// partWithin: one of the car's parts starts within gap words from i, in
// the same clause.
func partWithin(words []string, i, gap int) bool {
	for k := i; k < len(words) && k < i+gap; k++ {
		if words[k] == "|" {
			return false
		}
		if partAt(words, k) > 0 {
			return true
		}
	}
	return false
}

// partAt is the length in words of the car's part at word i, or 0.
func partAt(words []string, i int) int {
	for _, part := range carParts {
		p := strings.Fields(part)
		if len(words)-i < len(p) {
			continue
		}
		ok := true
		for j, w := range p {
			if x := words[i+j]; x != w && x != w+"s" && x != w+"es" {
				ok = false
				break
			}
		}
		if ok {
			return len(p)
		}
	}
	return 0
}

// exactPhrase: the words start with the phrase, word for word.
func exactPhrase(words, phrase []string) bool {
	if len(words) < len(phrase) {
		return false
	}
	for j, p := range phrase {
		if words[j] != p {
			return false
		}
	}
	return true
}

// prefixPhrase: the words start with the phrase, each word by its prefix
// ("retune" finds "retuned"), as abort words match.
func prefixPhrase(words, phrase []string) bool {
	if len(words) < len(phrase) {
		return false
	}
	for j, p := range phrase {
		if !strings.HasPrefix(words[j], p) {
			return false
		}
	}
	return true
}

// negatedChange: one of the two words before (in the same clause) is a
// negation, as for abort words.
func negatedChange(before []string) bool {
	for k := len(before) - 1; k >= 0 && k >= len(before)-2; k-- {
		if before[k] == "|" {
			return false
		}
		for _, n := range changeNegations {
			p := strings.Fields(n)
			if exactPhrase(before[k:], p) || (len(p) > 1 && k > 0 && exactPhrase(before[k-1:], p)) {
				return true
			}
		}
	}
	return false
}

// noteWord is a word of the notes: lower case to match, as typed to quote.
type noteWord struct{ word, typed string }

// changeNoteWords are notes as words, a clause's end (, ; . ! ? :) a word
// "|" of its own so a change or a negation never reaches past it. A copy of
// the abort words' tokenizer (dial.go's noteWords) that keeps a number's
// sign ("+2", "-1") and each word as typed; the two are to become one.
func changeNoteWords(notes string) []noteWord {
	var out []noteWord
	for _, f := range strings.Fields(notes) {
		end := false
		if t := strings.TrimRight(f, ",;.!?:"); t != f {
			f, end = t, true
		}
		f = strings.Trim(f, "\"'()[]/")
		f = strings.TrimRight(f, "-")
		if strings.HasPrefix(f, "-") && !(len(f) > 1 && f[1] >= '0' && f[1] <= '9') {
			f = strings.TrimLeft(f, "-")
		}
		if f != "" {
			out = append(out, noteWord{strings.ToLower(f), f})
		}
		if end {
			out = append(out, noteWord{"|", ""})
		}
	}
	return out
}

// clauseOf is the clause of the notes that holds word i, as typed.
func clauseOf(words []noteWord, i int) string {
	from, to := i, i
	for from > 0 && words[from-1].word != "|" {
		from--
	}
	for to < len(words) && words[to].word != "|" {
		to++
	}
	var typed []string
	for _, w := range words[from:to] {
		typed = append(typed, w.typed)
	}
	return strings.Join(typed, " ")
}

// SinceChange is passes from the latest that notes a change of the car on
// (all of them when none does): what the changed car has run. words nil is
// DefaultChangeWords.
func SinceChange(passes []Pass, words ChangeWords) []Pass {
	for i := len(passes) - 1; i >= 0; i-- {
		if _, ok := ChangeNoted(passes[i], words); ok {
			return passes[i:]
		}
	}
	return passes
}
