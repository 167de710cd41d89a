package prep

import (
	"fmt"
	"io"
	"strings"

	ptable "github.com/jedib0t/go-pretty/v6/table"
	"github.com/jedib0t/go-pretty/v6/text"

	words "pitcard/internal/text"
	"pitcard/scripts"
)

// Width is the widest line the Markdown card prints, and the terminal card's
// when the terminal's width is not known (piped).
const Width = 100

// RenderText writes the card for a terminal: go-pretty tables, color when
// color is set (a terminal), plain when piped; no line wider than Width; the
// dial to post in block digits, the most prominent thing on the page.
func RenderText(w io.Writer, c Card, color bool) error {
	return RenderTextWidth(w, c, color, Width)
}

// RenderTextWidth is RenderText for a terminal width columns wide (at
// least 60).
func RenderTextWidth(w io.Writer, c Card, color bool, width int) error {
	v := newView(c)
	t := &termCard{color: color, width: max(width, 60)}
	t.head(v)
	t.dialBox(v)
	t.problems(v)
	t.tables(v)
	t.checklist(v)
	t.notes(v)
	t.record(v)
	t.cautions(v)
	_, err := io.WriteString(w, t.b.String())
	return err
}

// termCard is the terminal card being written: its text so far, whether
// it is in color and how wide a line may be.
type termCard struct {
	b     strings.Builder
	color bool
	width int
}

// paint is s in colors when the card is in color, else s as it is.
func (t *termCard) paint(s string, colors ...text.Color) string {
	if !t.color {
		return s
	}
	return text.Colors(colors).Sprint(s)
}

// head writes the title and the subtitle, which breaks between its parts,
// never inside one.
func (t *termCard) head(v view) {
	b := &t.b
	b.WriteString(t.paint("PITCARD  "+v.Title, text.Bold) + "\n")
	line := ""
	for _, part := range v.Subtitle {
		switch {
		case line == "":
			line = part
		case text.RuneWidthWithoutEscSequences(line+" · "+part) > t.width:
			b.WriteString(line + "\n")
			line = part
		default:
			line += " · " + part
		}
	}
	b.WriteString(line + "\n\n")
}

// dialBox writes the dial box: STOP when a check failed, the dial in
// block digits with how it was reached, or why there is no dial. Bold in
// the terminal's own foreground (or reversed), never a fixed color that a
// light or dark background can swallow.
func (t *termCard) dialBox(v view) {
	b, paint, width := &t.b, t.paint, t.width
	if v.Stop != "" {
		writeBlock(b, blockDigits("STOP"), [5]string{1: "  DO NOT    ", 2: "  POST THE  ", 3: "  DIAL      "}, paint, text.Bold, text.ReverseVideo)
		b.WriteString(paint(words.Wrap("  "+v.Stop, width, "    "), text.Bold) + "\n\n")
	}
	if v.Dial != "" {
		labels := [5]string{1: "  POST THIS ", 2: "  DIAL-IN   "}
		if v.Stop != "" {
			labels = [5]string{1: "  THE DIAL  ", 2: "  ONCE      ", 3: "  CLEARED   "}
		}
		writeBlock(b, blockDigits(v.Dial), labels, paint, text.Bold)
		b.WriteString("\n")
		for _, l := range v.DialLines {
			b.WriteString(words.Wrap("  "+l, width, "    ") + "\n")
		}
		if v.DialAlert != "" {
			b.WriteString(paint(words.Wrap("  CHECK: "+v.DialAlert, width, "    "), text.Bold) + "\n")
		}
		b.WriteString("\n")
	} else if v.NoDial != "" {
		b.WriteString(paint("  NO DIAL YET", text.Bold, text.ReverseVideo) + "\n")
		b.WriteString(words.Wrap("  "+v.NoDial, width, "  ") + "\n")
		if v.Guide != "" {
			b.WriteString(words.Wrap("  "+v.Guide, width, "  ") + "\n")
		}
		b.WriteString("\n")
	} else {
		b.WriteString(paint("  NO DIAL: see the problems below", text.Bold, text.ReverseVideo) + "\n\n")
	}
}

// problems writes the problems, in red, each on its own.
func (t *termCard) problems(v view) {
	for _, p := range v.Problems {
		t.b.WriteString(t.paint(words.Wrap("  PROBLEM: "+p, t.width, "    "), text.FgRed) + "\n")
	}
	if len(v.Problems) > 0 {
		t.b.WriteString("\n")
	}
}

// tables writes the air, the prediction, the dial options and the rules,
// each with its notes; a table without rows is left out (the air's never
// is).
func (t *termCard) tables(v view) {
	b, width := &t.b, t.width
	writeTable(b, v.Air, t.color, width)
	b.WriteString(words.Wrap(v.AirNote, width, "") + "\n\n")
	if len(v.Prediction.Rows) > 0 {
		writeTable(b, v.Prediction, t.color, width)
		for _, l := range v.Basis {
			b.WriteString(words.Wrap(l, width, "  ") + "\n")
		}
		b.WriteString("\n")
	}
	if len(v.Options.Rows) > 0 {
		writeTable(b, v.Options, t.color, width)
		if v.OptionsNote != "" {
			b.WriteString(words.Wrap(v.OptionsNote, width, "  ") + "\n")
		}
		b.WriteString("\n")
	}
	if len(v.Rules.Rows) > 0 {
		writeTable(b, v.Rules, t.color, width)
		b.WriteString("\n")
	}
}

// checklist writes the checklist, each item's status colored by what it
// says.
func (t *termCard) checklist(v view) {
	if len(v.Checks) == 0 {
		return
	}
	b, paint := &t.b, t.paint
	b.WriteString(paint("Checklist", text.Bold) + "\n")
	for _, ch := range v.Checks {
		word := ch.word()
		switch ch.Status {
		case scripts.Fail:
			word = paint(word, text.FgRed, text.Bold)
		case scripts.Warn:
			word = paint(word, text.FgYellow, text.Bold)
		case scripts.Pass:
			word = paint(word, text.FgGreen)
		}
		b.WriteString(fmt.Sprintf("  %s %s\n", word, words.Wrap(ch.line(), t.width-8, "       ")))
	}
	b.WriteString("\n")
}

// notes writes the rules' setup notes.
func (t *termCard) notes(v view) {
	if len(v.Notes) == 0 {
		return
	}
	t.b.WriteString(t.paint("Setup notes", text.Bold) + "\n")
	for _, n := range v.Notes {
		t.b.WriteString(words.Wrap("  - "+n, t.width, "    ") + "\n")
	}
	t.b.WriteString("\n")
}

// record writes today's record with its mean miss and the pointer to the
// segment comparison.
func (t *termCard) record(v view) {
	if len(v.Record.Rows) == 0 {
		return
	}
	writeTable(&t.b, v.Record, t.color, t.width)
	for _, n := range []string{v.RecordNote, v.RecordHint} {
		if n != "" {
			t.b.WriteString(n + "\n")
		}
	}
	t.b.WriteString("\n")
}

// cautions writes the cautions, the card's last section.
func (t *termCard) cautions(v view) {
	t.b.WriteString(t.paint("Cautions", text.Bold) + "\n")
	for _, c := range v.Cautions {
		t.b.WriteString(words.Wrap("  ! "+c, t.width, "    ") + "\n")
	}
}

func writeTable(b *strings.Builder, t table, color bool, width int) {
	tw := ptable.NewWriter()
	style := ptable.StyleLight
	style.Format.Header = text.FormatDefault
	style.Title.Align = text.AlignLeft
	if !color {
		style.Color = ptable.ColorOptions{}
	} else {
		style.Title.Colors = text.Colors{text.Bold}
	}
	tw.SetStyle(style)
	if t.Title != "" {
		tw.SetTitle("%s", t.Title)
	}
	if len(t.Header) > 0 {
		h := ptable.Row{}
		for _, x := range t.Header {
			h = append(h, x)
		}
		tw.AppendHeader(h)
	}
	for i, r := range t.Rows {
		row := ptable.Row{}
		for _, x := range r {
			if i == t.Marked && color {
				x = text.Colors{text.Bold}.Sprint(x)
			}
			row = append(row, x)
		}
		tw.AppendRow(row)
	}
	b.WriteString(FitRender(tw, width, nil) + "\n")
}

// writeBlock writes block-type lines with a label beside each.
func writeBlock(b *strings.Builder, big []string, labels [5]string, paint func(string, ...text.Color) string, colors ...text.Color) {
	for i, line := range big {
		label := labels[i]
		if label == "" {
			label = "            "
		}
		b.WriteString(paint(label, text.Bold) + paint(line, colors...) + "\n")
	}
}

// blockDigits draws a dial in digits five lines tall.
func blockDigits(s string) []string {
	font := map[rune][5]string{
		'0': {"███", "█ █", "█ █", "█ █", "███"}, '1': {" █ ", "██ ", " █ ", " █ ", "███"},
		'2': {"███", "  █", "███", "█  ", "███"}, '3': {"███", "  █", " ██", "  █", "███"},
		'4': {"█ █", "█ █", "███", "  █", "  █"}, '5': {"███", "█  ", "███", "  █", "███"},
		'6': {"███", "█  ", "███", "█ █", "███"}, '7': {"███", "  █", "  █", "  █", "  █"},
		'8': {"███", "█ █", "███", "█ █", "███"}, '9': {"███", "█ █", "███", "  █", "███"},
		'.': {" ", " ", " ", " ", "█"}, '-': {"   ", "   ", "███", "   ", "   "},
		// The letters of STOP, for a failed check in the dial's own type.
		'S': {"███", "█  ", "███", "  █", "███"}, 'T': {"███", " █ ", " █ ", " █ ", " █ "},
		'O': {"███", "█ █", "█ █", "█ █", "███"}, 'P': {"███", "█ █", "███", "█  ", "█  "},
	}
	var rows [5]strings.Builder
	for _, r := range s {
		g, ok := font[r]
		if !ok {
			continue
		}
		for i := range rows {
			for _, c := range g[i] {
				rows[i].WriteString(strings.Repeat(string(c), 2)) // twice as wide: squarer digits
			}
			rows[i].WriteString("  ")
		}
	}
	out := make([]string, 5)
	for i := range rows {
		out[i] = strings.TrimRight(rows[i].String(), " ")
	}
	return out
}
