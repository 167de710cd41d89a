package event

import (
	"fmt"
	"strings"

	"pitcard/internal/text"
)

// Two copies of a file disagreeing: an entry both have with different
// values (a pass, a reading, a slip of the other lane), named with both rows.

// Conflict is one entry both copies have (the same pass, or a reading in
// the same minute) with different values.
type Conflict struct {
	What                 string      // "pass 2026-06-13 20:47 left" or "reading 2026-06-13 14:30"
	Differs              [][3]string // the columns that differ: name, our value, theirs
	Ours, Theirs         string      // the two rows as pitcard writes them
	OursLine, TheirsLine int
}

// Conflicts are every conflict between two copies; nothing is written
// while there are any.
type Conflicts struct {
	List           []Conflict
	Ours, TheirsIn string // the two files
}

// Error names the two files and lists the entries they disagree on.
func (c *Conflicts) Error() string {
	return fmt.Sprintf("%s and %s disagree on %s (nothing was written; fix one copy, or leave the entry out of the import):\n%s",
		c.Ours, c.TheirsIn, text.Plural(len(c.List), "entry"), c.Entries())
}

// Entries are the conflicts, each with the columns that differ and both rows.
func (c *Conflicts) Entries() string {
	var b strings.Builder
	for i, x := range c.List {
		if i > 0 {
			b.WriteString("\n")
		}
		var d []string
		for _, f := range x.Differs {
			d = append(d, fmt.Sprintf("%s %q in %s, %q in %s", f[0], f[1], c.Ours, f[2], c.TheirsIn))
		}
		fmt.Fprintf(&b, "  %s: %s\n    %s line %d: %s\n    %s line %d: %s", x.What, strings.Join(d, "; "), c.Ours, x.OursLine, x.Ours, c.TheirsIn, x.TheirsLine, x.Theirs)
	}
	return b.String()
}

// BadInput marks the conflicts as the crew's to settle.
func (c *Conflicts) BadInput() bool { return true }

// Differs lists the columns cols where two rows, ours a and theirs b,
// differ: each column's name and both values (a Conflict's Differs).
func Differs(cols, a, b []string) [][3]string {
	var out [][3]string
	for i, c := range cols {
		if i < len(a) && i < len(b) && a[i] != b[i] {
			out = append(out, [3]string{c, a[i], b[i]})
		}
	}
	return out
}
