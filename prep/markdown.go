package prep

import (
	"fmt"
	"io"
	"strings"
)

// RenderMarkdown writes the card as Markdown.
func RenderMarkdown(w io.Writer, c Card) error {
	v := newView(c)
	var b strings.Builder
	fmt.Fprintf(&b, "# %s\n\n%s\n\n", v.Title, strings.Join(v.Subtitle, " · "))
	mdDialBox(&b, v)
	for _, p := range v.Problems {
		fmt.Fprintf(&b, "> **Problem:** %s\n\n", p)
	}
	mdTables(&b, v)
	mdLists(&b, v)
	if len(v.Record.Rows) > 0 {
		mdTable(&b, v.Record)
		if note := strings.TrimSpace(v.RecordNote + "\n" + v.RecordHint); note != "" {
			fmt.Fprintf(&b, "%s\n\n", note)
		}
	}
	b.WriteString("### Cautions\n\n")
	for _, c := range v.Cautions {
		fmt.Fprintf(&b, "- **%s**\n", c)
	}
	// No raw HTML: a Markdown viewer would run a rule's or a note's
	// "<script>"; pitcard's own words use no "<".
	_, err := io.WriteString(w, strings.ReplaceAll(b.String(), "<", "&lt;"))
	return err
}

// mdDialBox writes the dial's section: STOP when a check failed, the dial
// with how it was reached, or why there is no dial.
func mdDialBox(b *strings.Builder, v view) {
	if v.Stop != "" {
		fmt.Fprintf(b, "## STOP: %s\n\n", v.Stop)
	}
	if v.Dial != "" {
		if v.Stop != "" {
			fmt.Fprintf(b, "## The dial once the failed checks are cleared: **%s**\n\n", v.Dial)
		} else {
			fmt.Fprintf(b, "## Post this dial-in: **%s**\n\n", v.Dial)
		}
		for _, l := range v.DialLines {
			fmt.Fprintf(b, "- %s\n", l)
		}
		if v.DialAlert != "" {
			fmt.Fprintf(b, "- **Check:** %s\n", v.DialAlert)
		}
		b.WriteString("\n")
	} else if v.NoDial != "" {
		fmt.Fprintf(b, "## No dial yet\n\n%s\n\n", v.NoDial)
		if v.Guide != "" {
			fmt.Fprintf(b, "%s\n\n", v.Guide)
		}
	} else {
		b.WriteString("## No dial: see the problems below\n\n")
	}
}

// mdTables writes the air, the prediction, the dial options and the
// rules, each with its notes; a table without rows is left out (the air's
// never is).
func mdTables(b *strings.Builder, v view) {
	mdTable(b, v.Air)
	fmt.Fprintf(b, "%s\n\n", v.AirNote)
	if len(v.Prediction.Rows) > 0 {
		mdTable(b, v.Prediction)
		for _, l := range v.Basis {
			fmt.Fprintf(b, "- %s\n", l)
		}
		b.WriteString("\n")
	}
	if len(v.Options.Rows) > 0 {
		mdTable(b, v.Options)
		if v.OptionsNote != "" {
			fmt.Fprintf(b, "%s\n\n", v.OptionsNote)
		}
	}
	if len(v.Rules.Rows) > 0 {
		mdTable(b, v.Rules)
	}
}

// mdLists writes the checklist and the setup notes, each when there is
// one.
func mdLists(b *strings.Builder, v view) {
	if len(v.Checks) > 0 {
		b.WriteString("### Checklist\n\n")
		for _, ch := range v.Checks {
			box := "- " + ch.word() + " "
			if ch.Status != "confirm" {
				box = "- **" + statusWord(ch.Status) + "** "
			}
			b.WriteString(box + mdEscape(ch.line()) + "\n")
		}
		b.WriteString("\n")
	}
	if len(v.Notes) > 0 {
		b.WriteString("### Setup notes\n\n")
		for _, n := range v.Notes {
			fmt.Fprintf(b, "- %s\n", mdEscape(n))
		}
		b.WriteString("\n")
	}
}

func mdTable(b *strings.Builder, t table) {
	if t.Title != "" {
		fmt.Fprintf(b, "### %s\n\n", t.Title)
	}
	cells := func(r []string, bold bool) string {
		out := make([]string, len(r))
		for i, x := range r {
			x = mdEscape(x)
			if bold && x != "" {
				x = "**" + x + "**"
			}
			out[i] = x
		}
		return "| " + strings.Join(out, " | ") + " |\n"
	}
	b.WriteString(cells(t.Header, false))
	sep := make([]string, len(t.Header))
	for i := range sep {
		sep[i] = "---"
	}
	b.WriteString("| " + strings.Join(sep, " | ") + " |\n")
	for i, r := range t.Rows {
		b.WriteString(cells(r, i == t.Marked))
	}
	b.WriteString("\n")
}

func mdEscape(s string) string { return strings.ReplaceAll(s, "|", `\|`) }
