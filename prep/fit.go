package prep

import (
	"strings"

	ptable "github.com/jedib0t/go-pretty/v6/table"
	"github.com/jedib0t/go-pretty/v6/text"
)

// FitRender renders t no wider than width by wrapping its widest columns
// (at word boundaries) rather than cutting them; configs are the table's own
// column settings, kept. A table that cannot shrink enough (columns of one
// long word) is rendered as narrow as it goes.
func FitRender(t ptable.Writer, width int, configs []ptable.ColumnConfig) string {
	t.SetColumnConfigs(configs)
	out := t.Render()
	for try := 0; try < 8 && maxLine(out) > width; try++ {
		widths := columnWidths(t)
		if len(widths) == 0 {
			break
		}
		excess := maxLine(out) - width
		// Wrap the widest column of words: not a right-aligned column of
		// figures, and not one already as narrow as a word.
		col, w := -1, 0
		for i, cw := range widths {
			if cw-2 > 12 && cw > w && !rightAligned(configs, i+1) {
				col, w = i, cw
			}
		}
		if col < 0 {
			break
		}
		target := max(12, w-2-excess)
		configs = capColumn(configs, col+1, target)
		t.SetColumnConfigs(configs)
		out = t.Render()
	}
	// Still too wide: the outer border carries nothing, and goes first.
	if maxLine(out) > width && t.Style().Options.DrawBorder {
		t.Style().Options.DrawBorder = false
		return FitRender(t, width, configs)
	}
	return out
}

func rightAligned(configs []ptable.ColumnConfig, number int) bool {
	for _, c := range configs {
		if c.Number == number && c.Align == text.AlignRight {
			return true
		}
	}
	return false
}

func capColumn(configs []ptable.ColumnConfig, number, width int) []ptable.ColumnConfig {
	out := append([]ptable.ColumnConfig(nil), configs...)
	for i := range out {
		if out[i].Number == number {
			out[i].WidthMax, out[i].WidthMaxEnforcer = width, text.WrapSoft
			return out
		}
	}
	return append(out, ptable.ColumnConfig{Number: number, WidthMax: width, WidthMaxEnforcer: text.WrapSoft})
}

// columnWidths measures each column's rendered width from a render with
// column rules and no title: the positions of the rules in the last border.
func columnWidths(t ptable.Writer) []int {
	style := *t.Style()
	defer t.SetStyle(style)
	measure := style
	measure.Options.SeparateColumns, measure.Options.DrawBorder = true, true
	measure.Box = ptable.StyleBoxLight
	t.SetStyle(measure)
	title := t.Render()
	lines := strings.Split(title, "\n")
	last := []rune(lines[len(lines)-1])
	var widths []int
	start := 1
	for i, r := range last {
		if r == '┴' || (r == '┘' && i > 0) {
			widths = append(widths, i-start)
			start = i + 1
		}
	}
	return widths
}

func maxLine(s string) int {
	m := 0
	for _, l := range strings.Split(s, "\n") {
		m = max(m, text.RuneWidthWithoutEscSequences(l))
	}
	return m
}
