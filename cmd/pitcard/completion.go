package main

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"time"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"pitcard/event"
	"pitcard/prep"
	"pitcard/weather"
)

// fixedChoices are the flags whose values are a short list, for the shell's
// completion ('pitcard completion bash|zsh|fish|powershell').
var fixedChoices = map[string][]string{
	"lane":      {"left", "right"},
	"baro-kind": {"station", "altimeter"},
	"prep":      {"none", "light", "full"},
	"units":     {"imperial", "metric"},
	"tree":      {"full", "pro"},
	"rt-zero":   {"green", "amber"},
}

var formatList = regexp.MustCompile(`^([a-z]+(?:, [a-z]+)*(?: or [a-z]+)?)`)

// registerCompletions gives every enumerated flag of every command its
// values: the fixed lists, --format from its own help ("text, markdown or
// json"), --round from the folder's schedule.yaml, files and folders where a
// flag names one.
func registerCompletions(cmd *cobra.Command) {
	seen := map[string]bool{}
	add := func(fs *pflag.FlagSet) {
		fs.VisitAll(func(f *pflag.Flag) {
			if seen[f.Name] {
				return
			}
			switch {
			case fixedChoices[f.Name] != nil:
				values := fixedChoices[f.Name]
				_ = cmd.RegisterFlagCompletionFunc(f.Name, func(*cobra.Command, []string, string) ([]string, cobra.ShellCompDirective) {
					return values, cobra.ShellCompDirectiveNoFileComp
				})
			case f.Name == "format":
				values := strings.FieldsFunc(formatList.FindString(f.Usage), func(r rune) bool { return r == ',' || r == ' ' })
				var out []string
				for _, v := range values {
					if v != "or" {
						out = append(out, v)
					}
				}
				_ = cmd.RegisterFlagCompletionFunc(f.Name, func(*cobra.Command, []string, string) ([]string, cobra.ShellCompDirective) {
					return out, cobra.ShellCompDirectiveNoFileComp
				})
			case f.Name == "round":
				_ = cmd.RegisterFlagCompletionFunc(f.Name, func(c *cobra.Command, _ []string, _ string) ([]string, cobra.ShellCompDirective) {
					return scheduleSessions(c), cobra.ShellCompDirectiveNoFileComp
				})
			case f.Name == "out" || strings.HasSuffix(f.Name, "-file"):
				_ = cmd.MarkFlagFilename(f.Name)
			}
			seen[f.Name] = true
		})
	}
	add(cmd.LocalNonPersistentFlags())
	add(cmd.PersistentFlags())
	for _, c := range cmd.Commands() {
		registerCompletions(c)
	}
}

// scheduleSessions are the sessions of the folder's schedule.yaml (given by
// --dir on the line being completed), or the usual first ones.
func scheduleSessions(c *cobra.Command) []string {
	dir := "."
	if f := c.Flag("dir"); f != nil && f.Value.String() != "" {
		dir = f.Value.String()
	}
	if fh, err := os.Open(filepath.Join(dir, event.ScheduleFile)); err == nil {
		defer fh.Close()
		if s, err := prep.ReadSchedule(fh, event.ScheduleFile, time.Local, weather.DefaultDayStart); err == nil && len(s.Sessions) > 0 {
			var out []string
			for _, sl := range s.Sessions {
				out = append(out, sl.Session.String()+"\t"+sl.Session.Long()+", called "+sl.Call.Format("15:04"))
			}
			return out
		}
	}
	return []string{"T1", "T2", "T3", "E1", "E2", "E3", "E4", "E5"}
}
