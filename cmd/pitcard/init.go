package main

import (
	"bytes"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"github.com/spf13/cobra"

	"pitcard/event"
	"pitcard/scripts"
)

type initOptions struct {
	g    *globalOptions
	s    *IOStreams
	Dir  string
	Demo bool
}

func newInitCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &initOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "init DIR",
		Short: "Write a commented starter event folder (or, with --demo, a copy of the demo event)",
		Long: `Creates DIR with a commented pitcard.yaml, car.yaml and track.yaml, an empty
logbook and weather log, and the rules that ship with pitcard. Edit car.yaml
and track.yaml for your car and track, then run pitcard commands inside DIR
(or with --dir DIR). With --demo, DIR gets a copy of the built-in demo event to
change and see the results change. Existing files are never overwritten.`,
		Example: "  pitcard init my-car\n  pitcard init --demo demo-event",
		Args:    cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Dir, o.Demo = args[0], o.g.Demo
			return initRun(o)
		},
	}
	return cmd
}

func initRun(o *initOptions) error {
	src, what := event.Starter(), "starter"
	if o.Demo {
		src, what = event.Demo(scripts.Shipped()), "demo"
	}
	// The folder's files, and the rules that ship with pitcard (the demo has its own copy).
	from := map[string]fs.FS{}
	var files []string
	for _, f := range []fs.FS{scripts.Shipped(), src} {
		err := fs.WalkDir(f, ".", func(p string, d fs.DirEntry, err error) error {
			if err == nil && !d.IsDir() {
				if _, dup := from[p]; !dup {
					files = append(files, p)
				}
				from[p] = f
			}
			return err
		})
		if err != nil {
			return err
		}
	}
	sort.Strings(files)
	var exist []string
	for _, f := range files {
		if _, err := os.Stat(filepath.Join(o.Dir, f)); err == nil {
			exist = append(exist, f)
		}
	}
	if len(exist) > 0 {
		return userErrf("%s already has %s: pitcard init never overwrites; choose an empty folder", o.Dir, strings.Join(exist, ", "))
	}
	for _, f := range files {
		data, err := fs.ReadFile(from[f], f)
		if err != nil {
			return err
		}
		if f == event.ScheduleFile && !o.Demo {
			data = bytes.ReplaceAll(data, []byte("DATE"), []byte(o.s.Now().Format("2006-01-02")))
		}
		dst := filepath.Join(o.Dir, f)
		if err := os.MkdirAll(filepath.Dir(dst), 0o755); err != nil {
			return err
		}
		if err := os.WriteFile(dst, data, 0o644); err != nil {
			return err
		}
	}
	fmt.Fprintf(o.s.Out, "Wrote the %s event folder %s (%d files: %s).\n", what, o.Dir, len(files), strings.Join(files, ", "))
	fmt.Fprintf(o.s.Out, "The rules in %s are yours to change: each file says what it does.\n", filepath.Join(o.Dir, event.RulesDir))
	if o.Demo {
		fmt.Fprintf(o.s.Out, "Next: cd %s && pitcard air --latest\n", o.Dir)
	} else {
		fmt.Fprintf(o.s.Out, "Next: edit %s, %s and %s for your car, track and race day, then add a reading:\n  cd %s && pitcard weather add --temp 85F --baro 28.90inHg --humidity 40%%\nand print the card for the next round: pitcard card\n",
			filepath.Join(o.Dir, event.CarFile), filepath.Join(o.Dir, event.TrackFile), filepath.Join(o.Dir, event.ScheduleFile), o.Dir)
	}
	return nil
}
