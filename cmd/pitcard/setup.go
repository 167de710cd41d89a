package main

import (
	"fmt"
	"pitcard/internal/text"
	"strings"

	"github.com/spf13/cobra"

	"pitcard/engine"
	"pitcard/event"
	"pitcard/logbook"
)

// setupLine says the setup a pass was logged with, each item given by
// --set or kept from the last pass: "Setup: rear_psi 15.5 psi, converter
// stock (kept)"; "" when car.yaml names none.
func setupLine(e *event.Folder, p logbook.Pass, set []string) string {
	car, err := e.Car()
	if err != nil || len(car.Setup) == 0 {
		return ""
	}
	given := map[string]bool{}
	for _, s := range set {
		n, _, _ := strings.Cut(s, "=")
		given[strings.TrimSpace(n)] = true
	}
	var parts []string
	for _, it := range car.Setup {
		v := p.Extra[it.Name]
		if v == "" {
			parts = append(parts, it.Name+" not recorded")
			continue
		}
		part := it.Name + " " + v
		if it.Unit != "" {
			part += " " + it.Unit
		}
		if !given[it.Name] {
			part += " (kept from the last pass)"
		}
		parts = append(parts, part)
	}
	return "Setup: " + strings.Join(parts, ", ") + "."
}

// setupColumns are the names of car.yaml's setup items: the logbook
// columns an export carries beside pitcard's own.
func setupColumns(e *event.Folder) []string {
	car, err := e.Car()
	if err != nil {
		return nil
	}
	var cols []string
	for _, it := range car.Setup {
		cols = append(cols, it.Name)
	}
	return cols
}

type logSetupOptions struct {
	g      *globalOptions
	s      *IOStreams
	Format string
}

func newLogSetupCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &logSetupOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "setup",
		Short: "What each setup item of car.yaml is worth for this car, from the logbook's passes",
		Long: `For each numeric setup item of car.yaml (setup:), the effect of one unit on the
60 ft and on the finish ET, learned from the logbook's passes with the air and
the track taken out (each time less the calibrated model's in that pass's
conditions), shrunk toward the crew's expect (or no effect): the estimate ±
its standard error, how many passes recorded it and the values they held.
Too few distinct values, or too little spread, is "not enough variation to
say". A choice item (converter, tire set) changed between passes is a change
of the car: the passes it changed on are listed.`,
		Example: "  pitcard log setup\n  pitcard log setup --format json",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, _ []string) error { return logSetupRun(cmd, o) },
	}
	cmd.Flags().StringVar(&o.Format, "format", "text", "text or json")
	withOut(cmd, s)
	return cmd
}

// setupEffectJSON is one item of 'log setup --format json'.
type setupEffectJSON struct {
	Name       string   `json:"name"`
	Unit       string   `json:"unit"`
	Passes     int      `json:"passes"`
	Distinct   int      `json:"distinct"`
	Low        *float64 `json:"low"`
	High       *float64 `json:"high"`
	Enough     bool     `json:"enough"`
	Effect60   float64  `json:"et60_per_unit"`
	SE60       float64  `json:"et60_se"`
	EffectET   float64  `json:"et_per_unit"`
	SEET       float64  `json:"et_se"`
	PriorFrom  string   `json:"prior"`
	ChangedOn  []string `json:"changed_on,omitempty"`
	ChoiceItem bool     `json:"choice,omitempty"`
}

func logSetupRun(cmd *cobra.Command, o *logSetupOptions) error {
	if err := checkFormat(o.Format, "text", "json"); err != nil {
		return err
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	car, err := e.Car()
	if err != nil {
		return err
	}
	if len(car.Setup) == 0 {
		return userErrf("%s names no setup items: list them under setup: (e.g. - {name: rear_psi, unit: psi, range: [6, 40]})", e.Name(event.CarFile))
	}
	passes, leftOut := e.RecentLogbook()
	if !event.OnlyLeftOut(leftOut) {
		return leftOut
	}
	effs, changes, err := setupEffects(e, car, passes)
	if err != nil {
		return err
	}
	if o.Format == "json" {
		var out []setupEffectJSON
		for _, x := range effs {
			j := setupEffectJSON{Name: x.Item.Name, Unit: x.Item.Unit, Passes: x.Passes, Distinct: x.Distinct, Enough: x.Enough,
				Effect60: x.Effect[0], SE60: x.SE[0], EffectET: x.Effect[1], SEET: x.SE[1], PriorFrom: "none"}
			if x.Passes > 0 {
				j.Low, j.High = event.OptFloat(x.Lo, true, 4), event.OptFloat(x.Hi, true, 4)
			}
			if x.Prior != [2]float64{} {
				j.PriorFrom = "expect"
			}
			out = append(out, j)
		}
		for _, it := range car.Setup {
			if !it.Numeric() {
				out = append(out, setupEffectJSON{Name: it.Name, ChoiceItem: true, ChangedOn: changes[it.Name], PriorFrom: "none"})
			}
		}
		if err := writeJSON(o.s.Out, out); err != nil {
			return err
		}
		return leftOut
	}
	fmt.Fprintf(o.s.Out, "Setup of %s: what one unit of each item is worth (the air and track taken out; ± one standard error)\n", car.Name)
	for _, x := range effs {
		fmt.Fprintln(o.s.Out, text.Wrap("  "+x.Text(), o.s.width(), "    "))
	}
	for _, it := range car.Setup {
		if it.Numeric() {
			continue
		}
		line := "  " + it.Name + ": a choice; never changed among the passes"
		if logbook.LastSetup(passes, logbook.Setup{it})[it.Name] == "" {
			line = "  " + it.Name + ": a choice; no pass recorded it yet"
		}
		if c := changes[it.Name]; len(c) > 0 {
			line = fmt.Sprintf("  %s: a choice, changed on %s (each a change of the car: the model carries the passes before it across)", it.Name, strings.Join(c, "; "))
		}
		fmt.Fprintln(o.s.Out, text.Wrap(line, o.s.width(), "    "))
	}
	fmt.Fprintln(o.s.Out, text.Wrap(fmt.Sprintf("Effects are in s per unit (+: slower as the value rises), from the calibrated model's latest %d clean passes, shrunk toward the crew's expect in car.yaml (or none); an item changed together with another is credited with both.", engine.FitWindow), o.s.width(), ""))
	return leftOut
}

// setupEffects calibrates the model on passes and fits the car's setup
// items; changes are, per choice item, the passes it changed on.
func setupEffects(e *event.Folder, car engine.Car, passes []logbook.Pass) ([]engine.SetupEffect, map[string][]string, error) {
	changes := map[string][]string{}
	marked := engine.MarkSetupChanges(passes, car.Setup)
	for i := range marked {
		if marked[i].Change != passes[i].Change {
			name, _, _ := strings.Cut(marked[i].Change, ":")
			changes[name] = append(changes[name], marked[i].Time.Format("2006-01-02 15:04")+" ("+strings.TrimSpace(strings.TrimPrefix(marked[i].Change, name+":"))+")")
		}
	}
	trk, _ := e.Track()
	if len(passes) == 0 {
		// No pass: the crew's beliefs alone, the 60 ft's carried to the
		// finish by car.yaml's physics when it gives the power.
		fit, err := engine.Calibrate(engine.CalibrateInput{Car: car, Track: trk, DayStart: e.Settings.DayStart})
		if err != nil {
			fit = engine.Fit{Car: car}
		}
		return engine.SetupEffects(fit), changes, nil
	}
	tracks, _ := e.OtherTracks()
	fit, err := engine.Calibrate(engine.CalibrateInput{Car: car, Track: trk, Tracks: tracks, Passes: passes, Now: passes[len(passes)-1].Time,
		DayStart: e.Settings.DayStart, Aborts: e.Settings.AbortWords, Changes: e.Settings.ChangeWords})
	if err != nil {
		return nil, nil, err
	}
	return engine.SetupEffects(fit), changes, nil
}
