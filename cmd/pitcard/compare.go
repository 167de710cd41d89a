package main

import (
	"fmt"
	"math"
	"pitcard/internal/text"
	"strings"

	"github.com/jedib0t/go-pretty/v6/table"
	"github.com/spf13/cobra"

	"pitcard/event"
	"pitcard/logbook"
	"pitcard/weather"
)

type logCompareOptions struct {
	g      *globalOptions
	s      *IOStreams
	With   string
	Format string
}

func newLogCompareCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &logCompareOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "compare [PASS]",
		Short: "Where a pass gained or lost time against another, segment by segment",
		Long: `Cuts two passes into their segments between the timers (0–60, 60–330,
330–660, 660–1000, 1000–1320 ft, up to the car's distance) and sets them
side by side: each segment's time, the difference (+ slower, − quicker), the
average speeds and average accelerations, and the launch's average g over
the first 60 ft from rest (2·60 ft / t²).

PASS is the latest pass by default; name another by its round (T1, E2,
test), its date and/or its time as 'log list' shows them ("E2",
"2026-06-13 E2", "E2 20:13"): the latest that matches. --with is best (the
quickest other clean pass at the car's distance), last (the pass logged
before PASS) or a pass named the same way. With both passes' weather, the
difference is shown again with the other pass carried to this pass's air by
the cube root of the SAE J1349 factors' ratio; the track is not taken out.`,
		Example: `  pitcard log compare
  pitcard log compare E2 --with last
  pitcard log compare "2026-06-13 E1" --with "2026-06-06 E4" --format json`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			pass := ""
			if len(args) == 1 {
				pass = args[0]
			}
			return logCompareRun(cmd, o, pass)
		},
	}
	cmd.Flags().StringVar(&o.With, "with", "best", "best, last or a pass (a round, date and/or time)")
	cmd.Flags().StringVar(&o.Format, "format", "text", "text, markdown or json")
	withOut(cmd, s)
	return cmd
}

// compareNote is said beside every comparison: an average is not a peak.
const compareNote = "Average acceleration over a segment is below the peak a data logger shows inside it; the launch is the average over the first 60 ft from rest."

func logCompareRun(cmd *cobra.Command, o *logCompareOptions, name string) error {
	if err := checkFormat(o.Format, "text", "markdown", "json"); err != nil {
		return err
	}
	e, passes, leftOut, err := o.g.openLogbook(cmd)
	if err != nil {
		return err
	}
	i, err := event.PassNamed(passes, name, "PASS")
	if err != nil {
		return err
	}
	distance, distNote := 1320.0, ""
	if car, err := e.Car(); err == nil {
		distance = car.DistanceFt
	} else {
		distNote = "No car.yaml to read the distance raced from: segments to 1320 ft."
	}
	j, err := event.ComparedWith(passes, i, o.With, "--with", distance, e.Settings.AbortWords)
	if err != nil {
		return err
	}
	trk, _ := e.Track()
	this, other := passes[i], passes[j]
	a, b := logbook.Segments(this, distance), logbook.Segments(other, distance)
	carry, carried := event.AirCarryBetween(this, other, trk)
	diffs := logbook.Compare(a, b, carry)
	c := comparison{this: this, other: other, a: a, b: b, diffs: diffs, carry: carry, carried: carried, with: o.With, distance: distance}
	if o.Format == "json" {
		if err := writeJSON(o.s.Out, c.json()); err != nil {
			return err
		}
		return leftOut
	}
	c.table(o.s, o.Format, e.Settings.Units.Speed)
	for _, line := range append(c.lines(), distNote, compareNote) {
		if line != "" {
			fmt.Fprintln(o.s.Out, text.Wrap(line, o.s.width(), ""))
		}
	}
	return leftOut
}

// comparison is two passes cut and set side by side.
type comparison struct {
	this, other logbook.Pass
	a, b        logbook.Profile
	diffs       []logbook.SegmentDiff
	carry       float64
	carried     bool
	with        string
	distance    float64
}

// withWords is the other pass in words: "the best other clean pass, T3 ...".
func (c comparison) withWords() string {
	switch strings.ToLower(strings.TrimSpace(c.with)) {
	case "best", "":
		return "the quickest other clean pass, " + event.PassLabel(c.other)
	case "last", "previous":
		return "the pass before, " + event.PassLabel(c.other)
	}
	return event.PassLabel(c.other)
}

func (c comparison) table(s *IOStreams, format string, speed weather.SpeedUnit) {
	if format == "text" {
		fmt.Fprintln(s.Out, text.Wrap(fmt.Sprintf("%s against %s, to %.0f ft (+ slower, - quicker):", event.PassLabel(c.this), c.withWords(), c.distance), s.width(), ""))
	}
	t := newTable(s, "Segment by segment: "+event.PassLabel(c.this)+" against "+event.PassLabel(c.other))
	spd := speed.String()
	header := table.Row{"Segment", "This\ns", "Other\ns", "Diff\ns"}
	if c.carried {
		header = append(header, "Diff,\nair out")
	}
	header = append(header, "This avg\n"+spd, "Other avg\n"+spd, "This\ng", "Other\ng")
	t.AppendHeader(header)
	f := func(v float64, ok bool, format string) string {
		if !ok || math.IsNaN(v) || math.IsInf(v, 0) {
			return "—"
		}
		return fmt.Sprintf(format, v)
	}
	inSpeed := func(x logbook.Segment) string {
		return f(weather.MPH(x.MPH()).In(speed), x.Timed, "%.2f")
	}
	for _, d := range c.diffs {
		row := table.Row{d.This.Name(), f(d.This.Time, d.This.Timed, "%.3f"), f(d.Other.Time, d.Other.Timed, "%.3f"), f(d.Diff, d.OK, "%+.3f")}
		if c.carried {
			row = append(row, f(d.Carried, d.OK, "%+.3f"))
		}
		row = append(row, inSpeed(d.This), inSpeed(d.Other), f(d.This.AccelG, d.This.HasAccel, "%.2f"), f(d.Other.AccelG, d.Other.HasAccel, "%.2f"))
		t.AppendRow(row)
	}
	if et, ok := c.this.ETAt(c.distance); ok {
		if ot, ok := c.other.ETAt(c.distance); ok {
			t.AppendSeparator()
			row := table.Row{fmt.Sprintf("ET %.0f ft", c.distance), fmt.Sprintf("%.3f", et), fmt.Sprintf("%.3f", ot), fmt.Sprintf("%+.3f", et-ot)}
			if c.carried {
				row = append(row, fmt.Sprintf("%+.3f", et-ot*c.carry))
			}
			t.AppendRow(append(row, "", "", "", ""))
		}
	}
	compact(t)
	render(s, t, format, alignRight(2, len(header))...)
}

// lines are the words under the table: the launch, the missing timers, the
// segment where the most time went, and how the air was taken out.
func (c comparison) lines() []string {
	var out []string
	g := func(p logbook.Profile) string {
		if !p.HasLaunch {
			return "no 60-ft time"
		}
		return fmt.Sprintf("%.2f g", p.LaunchG)
	}
	out = append(out, fmt.Sprintf("Launch, first 60 ft from rest (2·60 ft / t²): this pass %s, the other %s.", g(c.a), g(c.b)))
	for _, side := range []struct {
		who string
		p   logbook.Profile
	}{{"This pass", c.a}, {"The other pass", c.b}} {
		seen := map[string]bool{}
		var gaps []string
		for _, s := range side.p.Segments {
			if !s.Timed && !seen[s.Missing] {
				seen[s.Missing] = true
				gaps = append(gaps, s.Missing)
			}
		}
		if len(gaps) > 0 {
			out = append(out, side.who+": "+strings.Join(gaps, "; ")+" (those segments are not compared).")
		}
	}
	if k := logbook.Largest(c.diffs, false); k >= 0 {
		d := c.diffs[k]
		verb := "lost"
		if d.Diff < 0 {
			verb = "gained"
		}
		line := fmt.Sprintf("Most time %s: %s, %+.3f s", verb, d.This.Name(), d.Diff)
		if d.Diff == 0 {
			line = "No time gained or lost in any segment timed on both slips"
		}
		if kc := logbook.Largest(c.diffs, true); c.carried && kc >= 0 && c.diffs[kc].Carried != 0 {
			dc := c.diffs[kc]
			verb := "lost"
			if dc.Carried < 0 {
				verb = "gained"
			}
			line += fmt.Sprintf("; with the air taken out, most %s: %s, %+.3f s", verb, dc.This.Name(), dc.Carried)
		}
		out = append(out, line+".")
	} else {
		out = append(out, "No segment is timed on both slips: nothing to compare.")
	}
	if c.carried {
		out = append(out, fmt.Sprintf("Air out: the other pass's times carried to this pass's air by the cube root of the ratio of their SAE J1349 factors (×%.4f, every segment alike); the track's temperature and the wind are not taken out.", c.carry))
	} else {
		out = append(out, "Raw differences: the air is not taken out (a pass has no weather logged).")
	}
	return out
}

type compareSegmentJSON struct {
	FromFt       float64  `json:"from_ft"`
	ToFt         float64  `json:"to_ft"`
	ThisS        *float64 `json:"this_s"`
	OtherS       *float64 `json:"other_s"`
	DiffS        *float64 `json:"diff_s"`
	DiffAirOutS  *float64 `json:"diff_air_out_s"`
	ThisMPH      *float64 `json:"this_mph"`
	OtherMPH     *float64 `json:"other_mph"`
	ThisG        *float64 `json:"this_g"`
	OtherG       *float64 `json:"other_g"`
	ThisMissing  string   `json:"this_missing,omitempty"`
	OtherMissing string   `json:"other_missing,omitempty"`
}

type compareJSON struct {
	Pass        string               `json:"pass"`
	With        string               `json:"with"`
	DistanceFt  float64              `json:"distance_ft"`
	Segments    []compareSegmentJSON `json:"segments"`
	ThisLaunchG *float64             `json:"this_launch_g"`
	OtherLaunch *float64             `json:"other_launch_g"`
	AirCarry    *float64             `json:"air_carry_factor"`
	AirOut      string               `json:"air_out"`
	Note        string               `json:"note"`
}

func (c comparison) json() compareJSON {
	j := compareJSON{Pass: event.PassLabel(c.this), With: event.PassLabel(c.other), DistanceFt: c.distance,
		ThisLaunchG: event.OptFloat(c.a.LaunchG, c.a.HasLaunch, 3), OtherLaunch: event.OptFloat(c.b.LaunchG, c.b.HasLaunch, 3),
		AirCarry: event.OptFloat(c.carry, c.carried, 5), AirOut: "none: raw differences", Note: compareNote, Segments: []compareSegmentJSON{}}
	if c.carried {
		j.AirOut = "SAE J1349, cube root of the factors' ratio; track not taken out"
	}
	for _, d := range c.diffs {
		j.Segments = append(j.Segments, compareSegmentJSON{FromFt: d.This.FromFt, ToFt: d.This.ToFt,
			ThisS: event.OptFloat(d.This.Time, d.This.Timed, 3), OtherS: event.OptFloat(d.Other.Time, d.Other.Timed, 3),
			DiffS: event.OptFloat(d.Diff, d.OK, 3), DiffAirOutS: event.OptFloat(d.Carried, d.OK && c.carried, 4),
			ThisMPH: event.OptFloat(d.This.MPH(), d.This.Timed, 2), OtherMPH: event.OptFloat(d.Other.MPH(), d.Other.Timed, 2),
			ThisG: event.OptFloat(d.This.AccelG, d.This.HasAccel, 3), OtherG: event.OptFloat(d.Other.AccelG, d.Other.HasAccel, 3),
			ThisMissing: d.This.Missing, OtherMissing: d.Other.Missing})
	}
	return j
}
