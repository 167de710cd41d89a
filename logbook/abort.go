package logbook

import (
	"slices"
	"strings"
)

// AbortWords are the words in a pass's notes that say it was not the car's
// time (lifted, pedaled, spun the tires ...). A word matches at the start of
// a word of the notes, in any case ("lift" finds "Lifted", never "shift");
// a phrase ("tire shake") matches its words in order. An occurrence right
// after a negation ("no shake", "didn't spin") does not count. The crew adds
// its own with the setting abort_words; nil is DefaultAbortWords.
type AbortWords []string

// DefaultAbortWords is pitcard's list (common practice, no source): what a
// crew writes on the slip of a run that did not show the car's pace. A
// mild shake ("shook a little") is no reason to drop a pass: only a tire
// shake or a hard one is.
var DefaultAbortWords = AbortWords{
	"lift", "pedal", "abort", "shut off", "shutoff", "broke", "spun", "spin", "smoked",
	"tire shake", "tires shook", "shook hard", "hard shake", "bad shake", "shook bad",
	"coast", "bog", "wheelie", "no good", "ng run",
}

// negations turn the abort word after them around ("no shake").
var negations = []string{"no", "not", "never", "without", "didn't", "didnt", "did not", "wasn't", "wasnt"}

// notAborts are phrases that hold an abort word but describe a full run:
// a breakout is running quicker than the dial, the fullest run there is.
var notAborts = []string{"broke out", "breakout", "brokeout"}

// With is the list with the crew's own words added.
func (a AbortWords) With(extra []string) AbortWords {
	out := append(AbortWords(nil), a.orDefault()...)
	for _, w := range extra {
		if w = strings.ToLower(strings.TrimSpace(w)); w != "" {
			out = append(out, w)
		}
	}
	return out
}

func (a AbortWords) orDefault() AbortWords {
	if a == nil {
		return DefaultAbortWords
	}
	return a
}

// AbortNotesScanned is how much of a pass's notes, in bytes, is read for an
// abort word: a slip's note says why a run was aborted in its first words,
// and a fit reads every pass's notes many times over, so a pasted megabyte
// must not be split into words each time.
const AbortNotesScanned = 2000

// Aborted reports whether notes say the pass was not a full-effort run: an
// abort word not negated.
func (a AbortWords) Aborted(notes string) bool {
	if len(notes) > AbortNotesScanned {
		notes = notes[:AbortNotesScanned]
	}
	words := noteWords(notes)
	for _, w := range a.orDefault() {
		phrase := strings.Fields(strings.ToLower(w))
		if len(phrase) == 0 {
			continue
		}
		for i := range words {
			if matchPhrase(words[i:], phrase) && !negated(words[:i]) && !inNotAbort(words, i) {
				return true
			}
		}
	}
	return false
}

// noteWords are notes in lower case as words; a clause's end (, ; . !) is
// kept as a word of its own so a negation never reaches past it.
func noteWords(notes string) []string {
	var out []string
	for _, f := range strings.Fields(strings.ToLower(notes)) {
		end := ""
		if t := strings.TrimRight(f, ",;.!?:"); t != f {
			f, end = t, "|"
		}
		f = strings.Trim(f, "\"'()[]-/")
		if f != "" {
			out = append(out, f)
		}
		if end != "" {
			out = append(out, end)
		}
	}
	return out
}

// matchPhrase: the words start with the phrase, each word by its prefix
// ("spin" finds "spinning"), the last one too ("lift" finds "lifted").
func matchPhrase(words, phrase []string) bool {
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

// negated: one of the two words before (in the same clause) is a negation.
func negated(before []string) bool {
	for k := len(before) - 1; k >= 0 && k >= len(before)-2; k-- {
		if before[k] == "|" {
			return false
		}
		for _, n := range negations {
			if matchPhrase(before[k:], strings.Fields(n)) || (strings.Contains(n, " ") && k > 0 && matchPhrase(before[k-1:], strings.Fields(n))) {
				return true
			}
		}
	}
	return false
}

// inNotAbort: the word at i is part of a phrase that is a full run.
func inNotAbort(words []string, i int) bool {
	for _, na := range notAborts {
		p := strings.Fields(na)
		for k := max(0, i-len(p)+1); k <= i; k++ {
			if k+len(p) <= len(words) && slices.Equal(words[k:k+len(p)], p) {
				return true
			}
		}
	}
	return false
}

// Aborted reports whether notes say the pass was not a full-effort run, by
// DefaultAbortWords; where the crew's settings are at hand, use theirs.
func Aborted(notes string) bool { return DefaultAbortWords.Aborted(notes) }
