package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	words "pitcard/internal/text"

	"github.com/jedib0t/go-pretty/v6/table"
	"github.com/jedib0t/go-pretty/v6/text"
	"github.com/spf13/cobra"

	"pitcard/internal/safefile"
	"pitcard/prep"
)

// newTable is a go-pretty table in pitcard's style: light rules, color only
// on a terminal.
func newTable(s *IOStreams, title string) table.Writer {
	t := table.NewWriter()
	style := table.StyleLight
	if !s.Terminal {
		style.Color = table.ColorOptions{}
	} else {
		style.Title.Colors = text.Colors{text.Bold}
	}
	style.Title.Align = text.AlignLeft
	style.Format.Header = text.FormatDefault // keep units as written: "σ" must not become "Σ"
	t.SetStyle(style)
	if title != "" {
		t.SetTitle("%s", title) // SetTitle formats: a bare "%" in a title would be a verb
	}
	return t
}

// render prints a table as text or Markdown; text no wider than the
// terminal (its widest columns wrap), configs being the table's columns.
func render(s *IOStreams, t table.Writer, format string, configs ...table.ColumnConfig) {
	if format == "markdown" {
		t.SetColumnConfigs(configs)
		io.WriteString(s.Out, t.RenderMarkdown()+"\n")
		return
	}
	io.WriteString(s.Out, prep.FitRender(t, s.width(), configs)+"\n")
}

// width is the terminal's width, or prep.Width when it is not known.
func (s *IOStreams) width() int {
	if s.Width >= 40 {
		return s.Width
	}
	return prep.Width
}

// writeCSV prints rows (the first the header) as CSV, for a spreadsheet.
func writeCSV(w io.Writer, rows [][]string) error {
	cw := csv.NewWriter(w)
	if err := cw.WriteAll(rows); err != nil {
		return err
	}
	return cw.Error()
}

// writeJSON prints v as indented JSON.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// round rounds v to d decimals for JSON, so files hold what the figure is
// worth and not float noise.
func round(v float64, d int) float64 {
	p := math.Pow(10, float64(d))
	return math.Round(v*p) / p
}

// groupCmd makes a command that only groups others refuse an unknown
// subcommand (exit 2) instead of printing its help and exiting 0.
func groupCmd(cmd *cobra.Command) {
	cmd.Args = cobra.NoArgs
	cmd.RunE = func(c *cobra.Command, _ []string) error { return c.Help() }
}

// compact drops the rules between columns of a wide list table.
func compact(t table.Writer) {
	t.Style().Options.SeparateColumns = false
	t.Style().Box.PaddingRight = "" // one space between columns: wide lists fit 100
}

// bindSettingFlags gives a command the flags of the settings that shape a
// dial (read by globalOptions.open): --breakout-risk and --dial-step.
func bindSettingFlags(cmd *cobra.Command) {
	cmd.Flags().String("breakout-risk", "", "largest breakout chance to accept, a fraction (setting breakout_risk)")
	cmd.Flags().String("dial-step", "", "dial-in step, s (setting dial_step)")
}

// withOut gives a command that prints a document --out FILE: what it would
// print is written to FILE instead (atomically, no color), and the screen
// gets one line saying so. What the command prints on standard error stays
// there.
func withOut(cmd *cobra.Command, s *IOStreams) {
	var path string
	cmd.Flags().StringVar(&path, "out", "", "write the output to this file instead of the screen")
	runE := cmd.RunE
	cmd.RunE = func(c *cobra.Command, args []string) error {
		if path == "" {
			return runE(c, args)
		}
		var buf bytes.Buffer
		out, terminal := s.Out, s.Terminal
		s.Out, s.Terminal = &buf, false
		err := runE(c, args)
		s.Out, s.Terminal = out, terminal
		if buf.Len() == 0 {
			return err
		}
		if werr := safefile.WriteNoBackup(path, buf.Bytes()); werr != nil {
			return fmt.Errorf("writing %s: %w", path, werr)
		}
		fmt.Fprintf(s.Out, "Wrote %s.\n", path)
		return err
	}
}

// warn writes a warning to standard error, wrapped to the screen's width
// like everything else pitcard prints.
func (s *IOStreams) warn(msg string) {
	fmt.Fprintln(s.Err, words.Wrap("pitcard: warning: "+msg, s.width(), "  "))
}
