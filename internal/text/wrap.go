package text

import (
	"strings"

	pretty "github.com/jedib0t/go-pretty/v6/text"
)

// Wrap breaks s into lines of at most width display columns, continuing
// with indent: each line of a message wrapped on its own, a figure never
// parted from its unit, a word wider than the line cut. Colour codes take
// no width.
func Wrap(s string, width int, indent string) string {
	if strings.Contains(s, "\n") { // each line of a message wrapped on its own
		parts := strings.Split(s, "\n")
		for i, p := range parts {
			if i > 0 {
				p = indent + strings.TrimLeft(p, " ")
			}
			parts[i] = Wrap(p, width, indent+"  ")
		}
		return strings.Join(parts, "\n")
	}
	words := keepUnits(strings.Fields(s))
	if len(words) == 0 {
		return s
	}
	lead := s[:len(s)-len(strings.TrimLeft(s, " "))]
	words = splitLong(words, width-max(len(indent), len(lead)))
	var lines []string
	cur := lead + words[0]
	for _, wd := range words[1:] {
		if pretty.RuneWidthWithoutEscSequences(cur)+1+pretty.RuneWidthWithoutEscSequences(wd) > width {
			lines = append(lines, cur)
			cur = indent + wd
			continue
		}
		cur += " " + wd
	}
	return strings.Join(append(lines, cur), "\n")
}

// units are the words a figure is never parted from at a line's end (with
// any punctuation that follows them: "s;", "%)").
var units = map[string]bool{"%": true, "s": true, "°F": true, "°C": true, "mph": true, "ft": true, "lb": true, "inHg": true}

// keepUnits makes a unit and the figure before it ("22 %", "0.018 s") one
// word to the wrapping, so a wrapped line never ends on a bare number.
func keepUnits(words []string) []string {
	out := words[:0:0]
	for _, w := range words {
		if n := len(out); n > 0 && units[strings.TrimRight(w, ",;.)")] && endsInDigit(out[n-1]) {
			out[n-1] += " " + w
			continue
		}
		out = append(out, w)
	}
	return out
}

func endsInDigit(w string) bool { return w != "" && w[len(w)-1] >= '0' && w[len(w)-1] <= '9' }

// splitLong breaks a word wider than room (a pasted note with no spaces)
// into pieces that fit, so no line runs past the width.
func splitLong(words []string, room int) []string {
	room = max(room, 20)
	var out []string
	for _, w := range words {
		for pretty.RuneWidthWithoutEscSequences(w) > room {
			r := []rune(w)
			n := min(room, len(r))
			out, w = append(out, string(r[:n])), string(r[n:])
		}
		out = append(out, w)
	}
	return out
}
