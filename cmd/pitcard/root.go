package main

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"slices"
	"sort"
	"strings"
	"time"

	"github.com/shopspring/decimal"
	"github.com/spf13/cobra"
	"github.com/spf13/viper"
	"go.yaml.in/yaml/v3"

	"pitcard/engine"
	"pitcard/event"
	"pitcard/internal/yamlfile"
	"pitcard/scripts"
	"pitcard/weather"
)

// globalOptions are the flags every command has.
type globalOptions struct {
	Dir   string // the event folder
	Demo  bool   // read the built-in demo event instead
	Units string // imperial or metric; overrides pitcard.yaml
	// Files in place of the folder's car.yaml, track.yaml and logbook.csv,
	// for every command that reads them.
	CarFile, TrackFile, LogbookFile string
}

func newRootCmd(s *IOStreams) *cobra.Command {
	g := &globalOptions{}
	root := &cobra.Command{
		Use:   "pitcard",
		Short: "Race-day prep for bracket drag racers: the air, the logbook, the prediction, the dial-in, the card",
		Long: `pitcard turns fresh weather and track readings into a prediction for your car,
helps pick the dial-in, runs your crew's rules and prints a prep card per round.

Run it inside an event folder (see 'pitcard init'), or point --dir at one.
Try it on the built-in demo event first: pitcard card --demo`,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.SetIn(s.In)
	root.SetOut(s.Out)
	root.SetErr(s.Err)
	dir := os.Getenv("PITCARD_DIR")
	if dir == "" {
		dir = "."
	}
	root.PersistentFlags().StringVar(&g.Dir, "dir", dir, "event folder (env PITCARD_DIR)")
	root.PersistentFlags().BoolVar(&g.Demo, "demo", false, "use the built-in demo event (read-only)")
	root.PersistentFlags().StringVar(&g.Units, "units", "", "imperial or metric: how bare numbers are read and results shown (setting units)")
	root.PersistentFlags().StringVar(&g.CarFile, "car-file", "", "read this file in place of the folder's car.yaml")
	root.PersistentFlags().StringVar(&g.TrackFile, "track-file", "", "read this file in place of the folder's track.yaml")
	root.PersistentFlags().StringVar(&g.LogbookFile, "logbook-file", "", "read (and write) this file in place of the folder's logbook.csv")
	_ = root.MarkPersistentFlagDirname("dir")
	root.Version = versionString()
	root.SetVersionTemplate("pitcard {{.Version}}\n")
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return userErrf("%v (see '%s --help')", err, c.CommandPath())
	})
	root.AddCommand(
		newVersionCmd(s),
		newInitCmd(s, g),
		newAirCmd(s, g),
		newWeatherCmd(s, g),
		newLogCmd(s, g),
		newRaceCmd(s, g),
		newDialCmd(s, g),
		newPredictCmd(s, g),
		newRulesCmd(s, g),
		newCardCmd(s, g),
		newRoundCmd(s, g),
	)
	registerCompletions(root)
	return root
}

// settings and eventFolder are the event package's: the folder and its
// settings live there, so every front end reads and writes them the same way.
type (
	settings    = event.Settings
	eventFolder = event.Folder
)

// settingKeys are the keys pitcard.yaml may hold, with their defaults.
var settingKeys = map[string]any{
	"units":           "imperial",
	"dial_step":       "0.01",
	"breakout_risk":   0.10,
	"tree":            "full",
	"rt_zero":         "green",
	"max_rule_adjust": "0.05",
	"rule_time_ms":    200,
	"rule_memory_mib": 64,
	// A weather reading older than this at the card's clock is flagged.
	"reading_max_age_min": 45,
	// The other lane, when nothing better is known of it, and our driver's
	// reaction time when the logbook has too few.
	"opponent_margin":    0.02,
	"opponent_margin_sd": 0.03,
	"opponent_rt_mean":   0.04,
	"opponent_rt_sd":     0.025,
	"rt_mean":            0.04,
	"rt_sd":              0.025,
	// breakout-rule (the slowest dial within breakout_risk) or best-for-win
	"post_dial": "breakout-rule",
}

// open opens the event folder and loads its settings with viper: flags >
// PITCARD_* environment > pitcard.yaml > defaults.
func (g *globalOptions) open(cmd *cobra.Command) (*eventFolder, error) {
	e := &eventFolder{Demo: g.Demo, CarPath: g.CarFile, TrackPath: g.TrackFile, LogbookPath: g.LogbookFile}
	if g.Demo {
		e.FS = event.Demo(scripts.Shipped())
	} else {
		st, err := os.Stat(g.Dir)
		switch {
		case err == nil && !st.IsDir():
			return nil, userErrf("--dir %q is a file, not an event folder: give the folder that holds car.yaml and track.yaml", g.Dir)
		case errors.Is(err, fs.ErrNotExist):
			return nil, userErrf("event folder %q does not exist (create one with 'pitcard init %s', or pass --dir)", g.Dir, g.Dir)
		case err != nil:
			return nil, fmt.Errorf("event folder %q: %w", g.Dir, err)
		}
		e.Dir, e.FS = g.Dir, os.DirFS(g.Dir)
	}
	v := viper.New()
	for k, d := range settingKeys {
		v.SetDefault(k, d)
	}
	v.SetEnvPrefix("PITCARD")
	v.SetEnvKeyReplacer(strings.NewReplacer("-", "_", ".", "_"))
	v.AutomaticEnv()
	var settingsDoc *yamlfile.Doc
	if data, err := fs.ReadFile(e.FS, event.SettingsFile); err == nil {
		if err := checkSettingsKeys(data, e.Name(event.SettingsFile)); err != nil {
			return nil, err
		}
		settingsDoc, _ = yamlfile.Parse(data, e.Name(event.SettingsFile))
		v.SetConfigType("yaml")
		if err := v.ReadConfig(bytes.NewReader(data)); err != nil {
			return nil, userErrf("%s: %v", e.Name(event.SettingsFile), err)
		}
	} else if !errors.Is(err, fs.ErrNotExist) {
		return nil, err
	}
	if f := cmd.Flag("units"); f != nil && f.Changed {
		_ = v.BindPFlag("units", f)
	}
	// settingErr names a bad setting where it came from: the flag, the
	// PITCARD_ variable, or pitcard.yaml's line.
	settingErr := func(key string, err error) error {
		var ie *weather.InputError
		if !errors.As(err, &ie) {
			return err
		}
		c := *ie
		if f := cmd.Flag(strings.ReplaceAll(key, "_", "-")); f != nil && f.Changed {
			c.Field = "--" + f.Name
		} else if env := "PITCARD_" + strings.ToUpper(key); os.Getenv(env) != "" {
			c.Field = env + " (setting " + key + ")"
		} else if settingsDoc != nil && settingsDoc.Line(key) > 0 {
			c.Field, c.File, c.Line = key, e.Name(event.SettingsFile), settingsDoc.Line(key)
		}
		return &c
	}
	var err error
	if e.Settings.Units, err = weather.ParseUnits(v.GetString("units")); err != nil {
		return nil, settingErr("units", err)
	}
	for _, key := range []string{"dial_step", "breakout_risk", "tree", "rt_zero"} {
		if f := cmd.Flag(strings.ReplaceAll(key, "_", "-")); f != nil && f.Changed {
			_ = v.BindPFlag(key, f)
		}
	}
	step, err := engine.ParseSeconds("dial_step", v.GetString("dial_step"))
	if err != nil || step.LessThan(decimal.New(1, -3)) || step.GreaterThan(decimal.New(1, -1)) {
		return nil, settingErr("dial_step", &weather.InputError{Field: "dial_step", Value: v.GetString("dial_step"), Reason: "is outside 0.001..0.1 s"})
	}
	e.Settings.DialStep = step
	e.Settings.BreakoutRisk = v.GetFloat64("breakout_risk")
	if r := e.Settings.BreakoutRisk; !(r >= engine.RiskRange[0] && r <= engine.RiskRange[1]) {
		return nil, settingErr("breakout_risk", &weather.InputError{Field: "breakout_risk", Value: v.GetString("breakout_risk"),
			Reason: fmt.Sprintf("is outside %g..%g (a fraction: 0.10 accepts a 10 %% breakout chance)", engine.RiskRange[0], engine.RiskRange[1])})
	}
	if e.Settings.Tree, err = engine.ParseTree(v.GetString("tree")); err != nil {
		return nil, settingErr("tree", err)
	}
	if e.Settings.RTZero, err = engine.ParseRTZero(v.GetString("rt_zero")); err != nil {
		return nil, settingErr("rt_zero", err)
	}
	adj, err := engine.ParseSeconds("max_rule_adjust", v.GetString("max_rule_adjust"))
	if err != nil || adj.IsNegative() || adj.GreaterThan(decimal.NewFromInt(1)) {
		return nil, settingErr("max_rule_adjust", &weather.InputError{Field: "max_rule_adjust", Value: v.GetString("max_rule_adjust"), Reason: "is outside 0..1 s"})
	}
	e.Settings.MaxAdjust = adj
	lim := scripts.DefaultLimits
	lim.DialStep = step
	ms, mib := v.GetInt("rule_time_ms"), v.GetInt("rule_memory_mib")
	if ms < 10 || ms > 10000 {
		return nil, settingErr("rule_time_ms", &weather.InputError{Field: "rule_time_ms", Value: v.GetString("rule_time_ms"), Reason: "is outside 10..10000 ms"})
	}
	if mib < 4 || mib > 256 {
		return nil, settingErr("rule_memory_mib", &weather.InputError{Field: "rule_memory_mib", Value: v.GetString("rule_memory_mib"), Reason: "is outside 4..256 MiB"})
	}
	lim.Time, lim.Memory = time.Duration(ms)*time.Millisecond, int64(mib)<<20
	e.Settings.RuleLimits = lim
	age := v.GetInt("reading_max_age_min")
	if age < 5 || age > 24*60 {
		return nil, settingErr("reading_max_age_min", &weather.InputError{Field: "reading_max_age_min", Value: v.GetString("reading_max_age_min"), Reason: "is outside 5..1440 minutes"})
	}
	e.Settings.MaxReadingAge = time.Duration(age) * time.Minute
	for _, x := range []struct {
		key    string
		dst    *float64
		lo, hi float64
	}{{"opponent_margin", &e.Settings.OppMargin, -1, 2}, {"opponent_margin_sd", &e.Settings.OppMarginSD, 0.001, 1},
		{"opponent_rt_mean", &e.Settings.OppRTMean, -1, 2}, {"opponent_rt_sd", &e.Settings.OppRTSD, 0.001, 1},
		{"rt_mean", &e.Settings.RTMean, -1, 2}, {"rt_sd", &e.Settings.RTSD, 0.001, 1}} {
		*x.dst = v.GetFloat64(x.key)
		if !(*x.dst >= x.lo && *x.dst <= x.hi) {
			return nil, settingErr(x.key, &weather.InputError{Field: x.key, Value: v.GetString(x.key), Reason: fmt.Sprintf("is outside %g..%g s", x.lo, x.hi)})
		}
	}
	switch pd := v.GetString("post_dial"); pd {
	case "breakout-rule":
	case "best-for-win":
		e.Settings.PostBestForWin = true
	default:
		return nil, settingErr("post_dial", &weather.InputError{Field: "post_dial", Value: pd, Reason: "is not breakout-rule or best-for-win"})
	}
	return e, nil
}

// checkSettingsKeys refuses keys pitcard.yaml does not know: a misspelt
// setting would otherwise be silently ignored.
func checkSettingsKeys(data []byte, name string) error {
	if _, err := yamlfile.Parse(data, name); err != nil {
		return err
	}
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		return userErrf("%s: %v", name, strings.TrimPrefix(err.Error(), "yaml: "))
	}
	if len(doc.Content) == 0 || doc.Content[0].Kind != yaml.MappingNode {
		return nil
	}
	m := doc.Content[0]
	for i := 0; i+1 < len(m.Content); i += 2 {
		k := m.Content[i]
		if _, ok := settingKeys[k.Value]; !ok {
			known := make([]string, 0, len(settingKeys))
			for key := range settingKeys {
				known = append(known, key)
			}
			sort.Strings(known)
			return &weather.InputError{File: name, Line: k.Line, Field: "setting", Value: k.Value,
				Reason: "is not a pitcard setting (settings: " + strings.Join(known, ", ") + ")"}
		}
	}
	return nil
}

// checkFormat refuses a --format the command does not print.
func checkFormat(format string, allowed ...string) error {
	if slices.Contains(allowed, format) {
		return nil
	}
	return &weather.InputError{Field: "--format", Value: format, Reason: "is not a format of this command (use " + strings.Join(allowed, ", ") + ")"}
}
