package main

import (
	"encoding/csv"
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// Every old flag name still works and says so on standard error, never on
// standard output: a script reading `predict --car x.yaml --format json`
// got "Flag --car has been deprecated" before its JSON.
func TestDeprecatedFlagsKeepStdoutClean(t *testing.T) {
	dir := demoCopy(t)
	// what each command needs besides the flag, and a value for each old flag
	base := map[string][]string{
		"pitcard predict":     {"--latest"},
		"pitcard weather add": {"--temp", "85F", "--baro", "27.6inHg", "--humidity", "35%", "--time", "19:59"},
		"pitcard card":        {"--round", "E3", "--opponent-dial", "11.50"},
		"pitcard rules try":   {"--round", "E3", "--opponent-dial", "11.50"},
		"pitcard dial":        {"--opponent-dial", "11.50"},
		"pitcard log add":     {"--lane", "left", "--et1320", "11.512", "--date", "2026-06-13", "--time", "21:59"},
	}
	values := map[string]string{"car": filepath.Join(dir, "car.yaml"), "track": filepath.Join(dir, "track.yaml"),
		"logbook": filepath.Join(dir, "logbook.csv"), "note": "old flag",
		"session": "T9", "opponent-sd": "0.02", "last": "8"}
	var s IOStreams
	found := 0
	var walk func(c *cobra.Command)
	walk = func(c *cobra.Command) {
		for _, sub := range c.Commands() {
			walk(sub)
		}
		c.Flags().VisitAll(func(f *pflag.Flag) {
			if f.Deprecated == "" && f.Annotations[deprecatedFlag] == nil {
				return
			}
			found++
			path := c.CommandPath()
			args, ok := base[path]
			v, ok2 := values[f.Name]
			if !ok || !ok2 {
				t.Fatalf("%s --%s is deprecated: give the test its arguments and a value", path, f.Name)
			}
			formats := []string{""}
			if ff := c.Flags().Lookup("format"); ff != nil {
				formats = nil
				for _, fm := range []string{"json", "csv"} {
					if strings.Contains(ff.Usage, fm) {
						formats = append(formats, fm)
					}
				}
			}
			for _, fm := range formats {
				t.Run(path+" --"+f.Name+" "+fm, func(t *testing.T) {
					a := append(strings.Fields(strings.TrimPrefix(path, "pitcard ")), "--dir", dir, "--"+f.Name, v)
					a = append(a, args...)
					if fm != "" {
						a = append(a, "--format", fm)
					}
					out, errs, code := pitcard(t, a...)
					if code != 0 {
						t.Fatalf("exit %d: %s", code, errs)
					}
					if strings.Contains(out, "deprecated") || !strings.Contains(errs, "--"+f.Name) || !strings.Contains(errs, "deprecated") {
						t.Errorf("the warning must be on standard error only:\nout %.300s\nerr %s", out, errs)
					}
					switch fm {
					case "json":
						var v any
						if err := json.Unmarshal([]byte(out), &v); err != nil {
							t.Errorf("stdout is not JSON: %v\n%.300s", err, out)
						}
					case "csv":
						if _, err := csv.NewReader(strings.NewReader(out)).ReadAll(); err != nil || strings.Contains(out, "Flag") {
							t.Errorf("stdout is not CSV: %v\n%.300s", err, out)
						}
					}
				})
			}
		})
	}
	walk(newRootCmd(&s))
	if found < 4 {
		t.Errorf("found %d deprecated flags, want predict's three and weather add's --note", found)
	}
}

// Help still goes to standard output.
func TestHelpOnStdout(t *testing.T) {
	out, errs, code := pitcard(t, "predict", "--help")
	if code != 0 || !strings.Contains(out, "Calibrates the pass model") || errs != "" {
		t.Errorf("exit %d\nout %.200s\nerr %s", code, out, errs)
	}
}
