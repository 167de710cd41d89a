package main

import (
	"encoding/json"
	gomaps "maps"
	"slices"
	"strings"
	"testing"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// oldFlagNames is the alias list of README's "Names": each old flag name,
// the command it is on and the name that replaced it.
var oldFlagNames = []struct{ cmd, old, use string }{
	{"pitcard log add", "session", "round"},
	{"pitcard dial", "last", "clean-passes"},
	{"pitcard dial", "opponent-sd", "opponent-margin-sd"},
	{"pitcard card", "opponent-sd", "opponent-margin-sd"},
	{"pitcard rules try", "opponent-sd", "opponent-margin-sd"},
	{"pitcard predict", "car", "car-file"},
	{"pitcard predict", "track", "track-file"},
	{"pitcard predict", "logbook", "logbook-file"},
	{"pitcard weather add", "note", "notes"},
}

// One name per thing on the command line: the round is --round on every
// command, the other lane's margin spread is --opponent-margin-sd (its
// setting's name), --opponent-et and --opponent-rt are lists wherever they
// are taken, and every old name is a hidden alias that names its successor.
func TestOneFlagNamePerThing(t *testing.T) {
	var s IOStreams
	deprecated := map[string]string{}
	var walk func(c *cobra.Command)
	walk = func(c *cobra.Command) {
		for _, sub := range c.Commands() {
			walk(sub)
		}
		c.LocalFlags().VisitAll(func(f *pflag.Flag) {
			path := c.CommandPath()
			if use := f.Annotations[deprecatedFlag]; use != nil {
				deprecated[path+" --"+f.Name] = use[0]
				if !f.Hidden {
					t.Errorf("%s --%s is an old name and must be hidden from help", path, f.Name)
				}
				return
			}
			switch f.Name {
			case "session", "opponent-sd":
				t.Errorf("%s has --%s: the name is --round / --opponent-margin-sd", path, f.Name)
			case "opponent-et", "opponent-rt":
				if f.Value.Type() != "stringSlice" {
					t.Errorf("%s --%s is a %s: it is a list on every command", path, f.Name, f.Value.Type())
				}
			case "last":
				if path != "pitcard log list" && path != "pitcard log stats" {
					t.Errorf("%s --last: --last is the last N passes of the logbook shown (log list, log stats)", path)
				}
			}
		})
	}
	walk(newRootCmd(&s))
	for _, a := range oldFlagNames {
		t.Run(a.cmd+" --"+a.old, func(t *testing.T) {
			use, ok := deprecated[a.cmd+" --"+a.old]
			if !ok || !strings.Contains(use, "--"+a.use) {
				t.Errorf("want --%s kept as an old name of --%s; annotation %q (present %v)", a.old, a.use, use, ok)
			}
		})
	}
	if len(deprecated) != len(oldFlagNames) {
		t.Errorf("old flag names %v: the alias list (and README's Names) has %d", slices.Sorted(gomaps.Keys(deprecated)), len(oldFlagNames))
	}
}

// An old name does what the new one does: log add --session T9 logs T9
// (with a warning on standard error), and --opponent-sd moves the chance to
// win as --opponent-margin-sd does.
func TestOldFlagNamesStillWork(t *testing.T) {
	dir := demoCopy(t)
	out, errs, code := pitcard(t, "log", "add", "--dir", dir, "--session", "T9", "--lane", "left", "--et1320", "11.512", "--date", "2026-06-13", "--time", "21:59")
	if code != 0 || !strings.Contains(out, "time trial 9") || !strings.Contains(errs, "--session is deprecated: use --round") {
		t.Errorf("log add --session: exit %d\nout %s\nerr %s", code, out, errs)
	}
	dialJSON := func(args ...string) string {
		out, _, code := pitcard(t, append([]string{"dial", "--demo", "--opponent-dial", "11.45", "--format", "json"}, args...)...)
		if code != 0 {
			t.Fatalf("dial %v: exit %d", args, code)
		}
		return out
	}
	oldName, newName, none := dialJSON("--opponent-sd", "0.1"), dialJSON("--opponent-margin-sd", "0.1"), dialJSON()
	if oldName != newName || oldName == none {
		t.Errorf("--opponent-sd must act as --opponent-margin-sd (and change the chance to win)")
	}
	// log add reads one slip: a list of two is refused with the flag's name
	_, errs, code = pitcard(t, "log", "add", "--dir", dir, "--round", "E5", "--lane", "left", "--dial", "11.40", "--rt", ".02",
		"--et1320", "11.5", "--opponent-dial", "11.5", "--opponent-rt", ".03", "--opponent-et", "11.6,11.7", "--date", "2026-06-13", "--time", "22:30")
	if code != 2 || !strings.Contains(errs, `--opponent-et "11.6,11.7" is one value on log add`) {
		t.Errorf("two ETs for one slip: exit %d %s", code, errs)
	}
}

// A pass's timers have one shape in every command's JSON: an array of
// {distance_ft, et} (a prediction adds low, high, sd), never an object keyed
// by the distance as text; the prediction is the same object in predict and
// card; a figure that is a file's column has that column's name.
func TestOneJSONShapePerThing(t *testing.T) {
	timers := func(t *testing.T, what string, v any) {
		t.Helper()
		list, ok := v.([]any)
		if !ok || len(list) == 0 {
			t.Fatalf("%s timers: %T %v, want a non-empty array", what, v, v)
		}
		for _, x := range list {
			m, _ := x.(map[string]any)
			_, dOK := m["distance_ft"].(float64)
			_, eOK := m["et"].(float64)
			if !dOK || !eOK {
				t.Errorf("%s timer %v: want numbers distance_ft and et", what, x)
			}
		}
	}
	var passes []map[string]any
	if err := json.Unmarshal([]byte(mustRun(t, "log", "list", "--demo", "--format", "json")), &passes); err != nil || len(passes) == 0 {
		t.Fatalf("log list: %v", err)
	}
	timers(t, "log list", passes[0]["timers"])
	if _, ok := passes[0]["traps"].([]any); !ok {
		t.Errorf("log list traps: %v", passes[0]["traps"])
	}
	var predict, card map[string]any
	if err := json.Unmarshal([]byte(mustRun(t, "predict", "--demo", "--latest", "--format", "json")), &predict); err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal([]byte(mustRun(t, "card", "--demo", "--format", "json")), &card); err != nil {
		t.Fatal(err)
	}
	pp, _ := predict["prediction"].(map[string]any)
	cp, _ := card["prediction"].(map[string]any)
	timers(t, "predict", pp["timers"])
	timers(t, "card", cp["timers"])
	if a, b := slices.Sorted(gomaps.Keys(pp)), slices.Sorted(gomaps.Keys(cp)); !slices.Equal(a, b) {
		t.Errorf("predict's prediction keys %v differ from the card's %v", a, b)
	}
	var air map[string]any
	if err := json.Unmarshal([]byte(mustRun(t, "air", "--demo", "--latest", "--format", "json")), &air); err != nil {
		t.Fatal(err)
	}
	for name, old := range map[string]string{"dewpoint_f": "dew_point_f", "baro_inhg": "station_pressure_inhg"} {
		if v, ok := air[name].(float64); !ok || air[old] != v {
			t.Errorf("air %s = %v, its old name %s = %v: want the weather log's column name, the old one an alias", name, air[name], old, air[old])
		}
	}
}

// One header for the chance to win, and the other car is the other lane
// in words.
func TestOneWordPerThing(t *testing.T) {
	dial := mustRun(t, "dial", "--demo", "--opponent-dial", "11.45")
	card := mustRun(t, "card", "--demo", "--round", "E3", "--opponent-dial", "11.45")
	for name, out := range map[string]string{"dial": dial, "card": card} {
		if !strings.Contains(out, "To win") || strings.Contains(out, "Chance to win") {
			t.Errorf("%s: the column is 'To win':\n%s", name, out)
		}
		if strings.Contains(strings.ToLower(out), "opponent dials") || strings.Contains(out, "opponent's") {
			t.Errorf("%s says opponent: the other lane is the word:\n%s", name, out)
		}
	}
}
