package event

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
	"github.com/spf13/viper"
	"go.yaml.in/yaml/v3"

	"pitcard/bracket"
	"pitcard/engine"
	"pitcard/internal/yamlfile"
	"pitcard/logbook"
	"pitcard/scripts"
	"pitcard/weather"
)

// SettingDefaults are the keys pitcard.yaml may hold, with their defaults.
var SettingDefaults = map[string]any{
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
	// When a race day begins: a night's hours before it belong to the day
	// before (weather.DefaultDayStart).
	"day_starts": weather.DefaultDayStart.String(),
	// The other lane, when nothing better is known of it, and our driver's
	// reaction time when the logbook has too few.
	"opponent_margin":    0.02,
	"opponent_margin_sd": 0.03,
	"opponent_rt_mean":   0.04,
	"opponent_rt_sd":     0.025,
	"rt_mean":            0.04,
	"rt_sd":              0.025,
	// The model's ET further than this from the plain cross-check (the
	// latest clean passes carried by the air alone) is flagged, s.
	"cross_check_max_s": engine.DefaultCrossCheckMax,
	// breakout-rule (the slowest dial within breakout_risk) or best-for-win
	"post_dial": "breakout-rule",
	// Words in a pass's notes that mark it as not the car's time, added to
	// logbook.DefaultAbortWords (a list, or one string of comma-separated words).
	"abort_words": []string{},
	// Words in a pass's notes that say the car was changed before it,
	// added to logbook.DefaultChangeWords (a list, or one string of
	// comma-separated words).
	"change_words": []string{},
}

// OpenOptions say which folder to open and what the front end sets over
// its pitcard.yaml.
type OpenOptions struct {
	Dir  string // the event folder on disk
	Demo bool   // the built-in demo instead (read-only)
	// Files in place of the folder's car.yaml, track.yaml and logbook.csv.
	CarFile, TrackFile, LogbookFile string
	// Set are settings given by the front end (a flag: "units" for
	// --units), over the environment and pitcard.yaml. A bad one is named
	// as its flag, "--" and the key with dashes.
	Set map[string]string
	// Env looks up the front end's environment (os.Getenv): PITCARD_UNITS
	// and the others, over pitcard.yaml. nil: no environment.
	Env func(string) string
	// Loc is the zone of the folder's local times (its files' dates and
	// times, a time typed); nil is time.Local. A front end passes its
	// clock's zone, so one zone serves the clock and the files.
	Loc *time.Location
	// Environ lists the environment (os.Environ), so a misspelt PITCARD_
	// variable is refused instead of silently ignored. nil: not checked.
	Environ func() []string
}

// OtherVariables are the PITCARD_ variables a crew may set that are not
// settings.
var OtherVariables = []string{"PITCARD_DIR"}

// developerVariables steer pitcard's own tests and tools (DEVELOPERS.md):
// passed over, and not offered to a crew.
var developerVariables = []string{"PITCARD_LOAD_PACE", "PITCARD_LOAD_WRITERS", "PITCARD_SHOTS", "PITCARD_TRUTH_SEED", "PITCARD_ABLATE", "PITCARD_ABLATION",
	"PITCARD_SCORE_OUT", "PITCARD_CRASH_CHILD", "PITCARD_CRASH_AT", "PITCARD_WRITER_CHILD", "PITCARD_WRITER_HOUR", "PITCARD_AXE",
	"PITCARD_FAMILY", "PITCARD_FAMILY_HELDOUT"}

// checkVariables refuses a PITCARD_ variable that names no setting: a
// misspelt one (PITCARD_DIAL_SETP) would otherwise be silently ignored.
func checkVariables(environ []string) error {
	for _, kv := range environ {
		name, _, _ := strings.Cut(kv, "=")
		if !strings.HasPrefix(name, "PITCARD_") || slices.Contains(OtherVariables, name) || slices.Contains(developerVariables, name) {
			continue
		}
		if _, ok := SettingDefaults[strings.ToLower(strings.TrimPrefix(name, "PITCARD_"))]; ok {
			continue
		}
		known := append([]string(nil), OtherVariables...)
		for key := range SettingDefaults {
			known = append(known, "PITCARD_"+strings.ToUpper(key))
		}
		sort.Strings(known)
		return userErrf("environment variable %s is not a pitcard setting (known: %s): unset it or correct its name", name, strings.Join(known, ", "))
	}
	return nil
}

// settingNumber reads a numeric setting's text, one way whatever its source
// (a flag, PITCARD_*, pitcard.yaml): "0.01", "1e-2". Text that is not a
// number is said to be so, with the range it should be in.
func settingNumber(key, text, valid string) (decimal.Decimal, error) {
	d, err := decimal.NewFromString(strings.TrimSpace(text))
	if err != nil {
		return d, &weather.InputError{Field: key, Value: text, Reason: "is not a number (" + valid + ")"}
	}
	// The same value however typed: 0.010 and 1e-2 are the step 0.01.
	return decimal.RequireFromString(d.String()), nil
}

// Open opens an event folder (or the demo) and reads its settings: the
// front end's > PITCARD_* environment > pitcard.yaml > defaults.
func Open(o OpenOptions) (*Folder, error) {
	e := &Folder{Demo: o.Demo, CarPath: o.CarFile, TrackPath: o.TrackFile, LogbookPath: o.LogbookFile, Loc: o.Loc}
	if err := e.openFS(o); err != nil {
		return nil, err
	}
	if o.Environ != nil {
		if err := checkVariables(o.Environ()); err != nil {
			return nil, err
		}
	}
	src, err := e.settingSources(o)
	if err != nil {
		return nil, err
	}
	for _, read := range []func(*Settings, settingSource) error{readPostingSettings, readRuleSettings, readRaceSettings} {
		if err := read(&e.Settings, src); err != nil {
			return nil, err
		}
	}
	return e, nil
}

// openFS opens the folder's files: the built-in demo, or the folder o.Dir,
// which must exist and be a folder.
func (e *Folder) openFS(o OpenOptions) error {
	if o.Demo {
		e.FS = Demo(scripts.Shipped())
		return nil
	}
	st, err := os.Stat(o.Dir)
	switch {
	case err == nil && !st.IsDir():
		return userErrf("--dir %q is a file, not an event folder: give the folder that holds car.yaml and track.yaml", o.Dir)
	case errors.Is(err, fs.ErrNotExist):
		return userErrf("event folder %q does not exist (create one with 'pitcard init %s', or pass --dir)", o.Dir, o.Dir)
	case err != nil:
		return fmt.Errorf("event folder %q: %w", o.Dir, err)
	}
	e.Dir, e.FS = o.Dir, os.DirFS(o.Dir)
	return nil
}

// settingSource is the settings as given, by key (the defaults, under
// pitcard.yaml, under the PITCARD_ variables, under the front end's), and
// where a bad one came from.
type settingSource struct {
	v *viper.Viper
	// bad names a bad setting where it came from: the flag, the PITCARD_
	// variable, or pitcard.yaml's line.
	bad func(key string, err error) error
}

// get is a setting's value as given.
func (src settingSource) get(key string) string { return src.v.GetString(key) }

// outside is the error of a setting's value outside its valid range.
func (src settingSource) outside(key, valid string) error {
	return src.bad(key, &weather.InputError{Field: key, Value: src.get(key), Reason: "is outside " + valid})
}

// settingSources reads pitcard.yaml (its keys checked), the environment
// and the front end's settings over the defaults.
func (e *Folder) settingSources(o OpenOptions) (settingSource, error) {
	v := viper.New()
	for k, d := range SettingDefaults {
		v.SetDefault(k, d)
	}
	env := func(key string) string {
		if o.Env == nil {
			return ""
		}
		return o.Env("PITCARD_" + strings.ToUpper(key))
	}
	var settingsDoc *yamlfile.Doc
	if data, err := fs.ReadFile(e.FS, SettingsFile); err == nil {
		if err := CheckSettingsKeys(data, e.Name(SettingsFile)); err != nil {
			return settingSource{}, err
		}
		settingsDoc, _ = yamlfile.Parse(data, e.Name(SettingsFile))
		v.SetConfigType("yaml")
		if err := v.ReadConfig(bytes.NewReader(data)); err != nil {
			return settingSource{}, userErrf("%s: %v", e.Name(SettingsFile), err)
		}
	} else if !errors.Is(err, fs.ErrNotExist) {
		return settingSource{}, err
	}
	for k := range SettingDefaults { // the environment over the file, the front end's over both
		if val := env(k); val != "" {
			v.Set(k, val)
		}
	}
	for k, val := range o.Set {
		v.Set(k, val)
	}
	bad := func(key string, err error) error {
		var ie *weather.InputError
		if !errors.As(err, &ie) {
			return err
		}
		c := *ie
		if _, ok := o.Set[key]; ok {
			c.Field = "--" + strings.ReplaceAll(key, "_", "-")
		} else if env(key) != "" {
			c.Field = "PITCARD_" + strings.ToUpper(key) + " (setting " + key + ")"
		} else if settingsDoc != nil && settingsDoc.Line(key) > 0 {
			c.Field, c.File, c.Line = key, e.Name(SettingsFile), settingsDoc.Line(key)
		}
		return &c
	}
	return settingSource{v: v, bad: bad}, nil
}

// readPostingSettings reads what posting a dial takes: the units, the dial
// step, the breakout risk, the tree and the reaction time's zero, how far
// the rules may move the dial, and which dial is posted.
func readPostingSettings(s *Settings, src settingSource) error {
	var err error
	if s.Units, err = weather.ParseUnits(src.get("units")); err != nil {
		return src.bad("units", err)
	}
	step, err := settingNumber("dial_step", src.get("dial_step"), "0.001..0.1 s")
	if err != nil {
		return src.bad("dial_step", err)
	}
	if step.LessThan(decimal.New(1, -3)) || step.GreaterThan(decimal.New(1, -1)) {
		return src.outside("dial_step", "0.001..0.1 s")
	}
	s.DialStep = step
	riskWords := fmt.Sprintf("%g..%g, a fraction: 0.10 accepts a 10 %% breakout chance", bracket.RiskRange[0], bracket.RiskRange[1])
	risk, err := settingNumber("breakout_risk", src.get("breakout_risk"), riskWords)
	if err != nil {
		return src.bad("breakout_risk", err)
	}
	s.BreakoutRisk = risk.InexactFloat64()
	if r := s.BreakoutRisk; !(r >= bracket.RiskRange[0] && r <= bracket.RiskRange[1]) {
		return src.outside("breakout_risk", strings.Replace(riskWords, ", ", " (", 1)+")")
	}
	if s.Tree, err = bracket.ParseTree(src.get("tree")); err != nil {
		return src.bad("tree", err)
	}
	if s.RTZero, err = bracket.ParseRTZero(src.get("rt_zero")); err != nil {
		return src.bad("rt_zero", err)
	}
	adj, err := settingNumber("max_rule_adjust", src.get("max_rule_adjust"), "0..1 s")
	if err != nil {
		return src.bad("max_rule_adjust", err)
	}
	if adj.IsNegative() || adj.GreaterThan(decimal.NewFromInt(1)) {
		return src.outside("max_rule_adjust", "0..1 s")
	}
	s.MaxAdjust = adj
	switch pd := src.get("post_dial"); pd {
	case "breakout-rule":
	case "best-for-win":
		s.PostBestForWin = true
	default:
		return src.bad("post_dial", &weather.InputError{Field: "post_dial", Value: pd, Reason: "is not breakout-rule or best-for-win"})
	}
	return nil
}

// readRuleSettings reads the rules' budgets (time and memory, the dial
// step they round to) and the age a reading may have before the card
// says it is stale.
func readRuleSettings(s *Settings, src settingSource) error {
	var ms, mib, age int
	for _, x := range []struct {
		key, valid string
		dst        *int
	}{{"rule_time_ms", "10..10000 ms", &ms}, {"rule_memory_mib", "4..256 MiB", &mib}, {"reading_max_age_min", "5..1440 minutes", &age}} {
		n, err := settingNumber(x.key, src.get(x.key), x.valid)
		if err != nil {
			return src.bad(x.key, err)
		}
		if !n.IsInteger() {
			return src.bad(x.key, &weather.InputError{Field: x.key, Value: src.get(x.key), Reason: "is not a whole number (" + x.valid + ")"})
		}
		*x.dst = int(n.IntPart())
	}
	if ms < 10 || ms > 10000 {
		return src.outside("rule_time_ms", "10..10000 ms")
	}
	if mib < 4 || mib > 256 {
		return src.outside("rule_memory_mib", "4..256 MiB")
	}
	lim := scripts.DefaultLimits
	lim.DialStep = s.DialStep
	lim.Time, lim.Memory = time.Duration(ms)*time.Millisecond, int64(mib)<<20
	s.RuleLimits = lim
	if age < 5 || age > 24*60 {
		return src.outside("reading_max_age_min", "5..1440 minutes")
	}
	s.MaxReadingAge = time.Duration(age) * time.Minute
	return nil
}

// readRaceSettings reads the race day's settings: the cross-check's limit,
// when a race day starts, the other lane's and our driver's figures, and
// the words of an aborted pass and of a change to the car.
func readRaceSettings(s *Settings, src settingSource) error {
	cross, err := settingNumber("cross_check_max_s", src.get("cross_check_max_s"), "0.01..1 s")
	if err != nil {
		return src.bad("cross_check_max_s", err)
	}
	if s.CrossCheckMax = cross.InexactFloat64(); !(s.CrossCheckMax >= 0.01 && s.CrossCheckMax <= 1) {
		return src.outside("cross_check_max_s", "0.01..1 s")
	}
	if s.DayStart, err = weather.ParseDayStart(src.get("day_starts")); err != nil {
		return src.bad("day_starts", err)
	}
	for _, x := range []struct {
		key    string
		dst    *float64
		lo, hi float64
	}{{"opponent_margin", &s.OppMargin, -1, 2}, {"opponent_margin_sd", &s.OppMarginSD, 0.001, 1},
		{"opponent_rt_mean", &s.OppRTMean, -1, 2}, {"opponent_rt_sd", &s.OppRTSD, 0.001, 1},
		{"rt_mean", &s.RTMean, -1, 2}, {"rt_sd", &s.RTSD, 0.001, 1}} {
		n, err := settingNumber(x.key, src.get(x.key), fmt.Sprintf("%g..%g s", x.lo, x.hi))
		if err != nil {
			return src.bad(x.key, err)
		}
		if *x.dst = n.InexactFloat64(); !(*x.dst >= x.lo && *x.dst <= x.hi) {
			return src.outside(x.key, fmt.Sprintf("%g..%g s", x.lo, x.hi))
		}
	}
	if s.AbortWords, err = abortWords(src.v.Get("abort_words")); err != nil {
		return src.bad("abort_words", err)
	}
	change, err := wordList("change_words", src.v.Get("change_words"), "[chute packed, new slicks]")
	if err != nil {
		return src.bad("change_words", err)
	}
	s.ChangeWords = logbook.DefaultChangeWords.With(change)
	return nil
}

// abortWords reads the setting abort_words: a YAML list of words, or (from
// the environment or a flag) one string of comma-separated words.
func abortWords(v any) (logbook.AbortWords, error) {
	extra, err := wordList("abort_words", v, "[chute early, lost fire]")
	if err != nil {
		return nil, err
	}
	return logbook.DefaultAbortWords.With(extra), nil
}

// wordList reads a list setting of words (abort_words, change_words): a
// YAML list, or (from the environment or a flag) one string of
// comma-separated words; eg is an example for the message.
func wordList(key string, v any, eg string) ([]string, error) {
	var extra []string
	switch x := v.(type) {
	case nil:
	case string:
		extra = strings.Split(x, ",")
	case []string:
		extra = x
	case []any:
		for _, w := range x {
			s, ok := w.(string)
			if !ok {
				return nil, &weather.InputError{Field: key, Value: fmt.Sprint(w), Reason: "is not a word (give a list of words, e.g. " + eg + ")"}
			}
			extra = append(extra, s)
		}
	default:
		return nil, &weather.InputError{Field: key, Value: fmt.Sprint(v), Reason: "is not a list of words (e.g. " + eg + ")"}
	}
	return extra, nil
}

// listSettings are the settings written as a YAML list.
var listSettings = map[string]bool{"abort_words": true, "change_words": true}

// CheckSettingsKeys refuses keys pitcard.yaml does not know: a misspelt
// setting would otherwise be silently ignored.
func CheckSettingsKeys(data []byte, name string) error {
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
		if _, ok := SettingDefaults[k.Value]; !ok {
			known := make([]string, 0, len(SettingDefaults))
			for key := range SettingDefaults {
				known = append(known, key)
			}
			sort.Strings(known)
			return &weather.InputError{File: name, Line: k.Line, Field: "setting", Value: k.Value,
				Reason: "is not a pitcard setting (settings: " + strings.Join(known, ", ") + ")"}
		}
		// A list or a map would be read as blank, and the default used;
		// only a list setting (abort_words, change_words) may be one, and only a list.
		if val := m.Content[i+1]; val.Kind != yaml.ScalarNode && !(listSettings[k.Value] && val.Kind == yaml.SequenceNode) {
			shape := map[yaml.Kind]string{yaml.SequenceNode: "a list", yaml.MappingNode: "a map"}[val.Kind]
			if shape == "" {
				shape = "not a plain value"
			}
			return &weather.InputError{File: name, Line: val.Line, Field: k.Value, Value: shape,
				Reason: fmt.Sprintf("is not one value: write it plain, e.g. %s: %v", k.Value, SettingDefaults[k.Value])}
		}
	}
	return nil
}

// DemoClock is the demo's "now": the demo day's last weather reading, so
// the demo card reads the same on any day. Other folders keep now.
func (e *Folder) DemoClock(now time.Time) time.Time {
	if !e.Demo {
		return now
	}
	trk, err := e.Track()
	if err != nil {
		return now
	}
	log, _, err := e.ReadableWeather(trk.Elevation())
	if err != nil || len(log) == 0 {
		return now
	}
	return log[len(log)-1].Time
}
