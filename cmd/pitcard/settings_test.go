package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/bracket"
	"pitcard/event"
)

// Whatever pitcard.yaml holds, opening the folder either works with settings
// in their ranges or fails with a message naming the file or the setting.
func FuzzSettings(f *testing.F) {
	f.Add("units: metric\ndial_step: 0.001\nbreakout_risk: 0.05\n")
	f.Add("units: imperial\ntree: pro\nrt_zero: amber\nmax_rule_adjust: 0.1\nrule_time_ms: 500\nrule_memory_mib: 32\n")
	f.Add("dial_step: [1]\n")
	f.Add("abort_words: [chute early, {a: 1}]\n")
	f.Add("change_words: [new slicks, [x]]\n")
	f.Add("unknown: 1\n")
	f.Add(": :\n")
	// just outside each range: refused, or (were a check lost) caught by
	// settingsInRange on the accepted side
	for _, kv := range []string{"dial_step: 0.0009", "dial_step: 0.11", "breakout_risk: 0.51", "breakout_risk: 0.0009",
		"max_rule_adjust: -0.01", "max_rule_adjust: 1.01", "rule_time_ms: 9", "rule_time_ms: 10001", "rule_memory_mib: 3",
		"rule_memory_mib: 257", "reading_max_age_min: 4", "reading_max_age_min: 1441", "cross_check_max_s: 0.009",
		"cross_check_max_s: 1.01", "opponent_margin: 2.01", "opponent_rt_sd: 0", "rt_sd: 1.01", "rt_mean: -1.01"} {
		f.Add(kv + "\n")
	}
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, yaml string) {
		if err := os.WriteFile(filepath.Join(dir, "pitcard.yaml"), []byte(yaml), 0o644); err != nil {
			t.Fatal(err)
		}
		_, errs, code := pitcard(t, "rules", "list", "--dir", dir)
		if code == 0 {
			e, err := event.Open(event.OpenOptions{Dir: dir})
			if err != nil {
				t.Fatalf("rules list accepted %q but the folder does not open: %v", yaml, err)
			}
			if err := settingsInRange(e.Settings); err != nil {
				t.Fatalf("accepted %q: %v", yaml, err)
			}
			return
		}
		if code != 2 {
			t.Fatalf("exit %d for %q: %s", code, yaml, errs)
		}
		if strings.Contains(errs, "panic") || strings.Contains(errs, "goroutine ") {
			t.Fatalf("a stack trace for %q: %s", yaml, errs)
		}
		ok := strings.Contains(errs, "pitcard.yaml")
		for _, k := range []string{"units", "dial_step", "breakout_risk", "tree", "rt-zero", "rt_zero", "max_rule_adjust", "rule_time_ms", "rule_memory_mib", "abort_words", "change_words"} {
			ok = ok || strings.Contains(errs, k)
		}
		if !ok {
			t.Fatalf("error for %q names neither the file nor a setting: %s", yaml, errs)
		}
	})
}

// The crew's own abort words (setting abort_words, or PITCARD_ABORT_WORDS)
// leave a pass out of the prediction beside pitcard's own; a bad value is
// named.
func TestCrewAbortWords(t *testing.T) {
	dir := demoCopy(t)
	lb := filepath.Join(dir, "logbook.csv")
	data, _ := os.ReadFile(lb)
	const last = "2026-06-13,20:13,Juniper Bend Raceway,E2,left,11.41,0.028,1.603,4.665,7.275,9.529,11.446,93.98,117.59,84.05,27.6032,33.4,95.72,2.32,173,3350,"
	if !strings.Contains(string(data), last+"\n") {
		t.Fatal("the demo's last pass changed: update the test")
	}
	_ = os.WriteFile(lb, []byte(strings.Replace(string(data), last+"\n", last+"chute out early\n", 1)), 0o644)
	leftOut := func() bool {
		out := mustRun(t, "predict", "--dir", dir, "--latest", "--format", "json")
		return strings.Contains(out, `"reason": "notes say \"chute out early\""`)
	}
	if leftOut() {
		t.Fatal("left out without the setting")
	}
	settings := filepath.Join(dir, "pitcard.yaml")
	orig, _ := os.ReadFile(settings)
	_ = os.WriteFile(settings, append(append([]byte{}, orig...), "\nabort_words: [chute out]\n"...), 0o644)
	if !leftOut() {
		t.Error("abort_words: [chute out] did not leave the pass out")
	}
	_ = os.WriteFile(settings, append(append([]byte{}, orig...), "\nabort_words: [[x]]\n"...), 0o644)
	if _, errs, code := pitcard(t, "predict", "--dir", dir, "--latest"); code != exitBadInput || !strings.Contains(errs, "abort_words") {
		t.Errorf("a bad abort_words: exit %d, %s", code, errs)
	}
}

// settingsInRange checks opened settings against the ranges the README and
// pitcard's own error messages give each setting, written out here apart
// from event.Open's checks.
func settingsInRange(s event.Settings) error {
	between := func(name string, v, lo, hi float64) error {
		if !(v >= lo && v <= hi) {
			return fmt.Errorf("%s = %v, outside %g..%g", name, v, lo, hi)
		}
		return nil
	}
	dec := func(d decimal.Decimal) float64 { return d.InexactFloat64() }
	for _, err := range []error{
		between("dial_step", dec(s.DialStep), 0.001, 0.1),
		between("breakout_risk", s.BreakoutRisk, 0.001, 0.5),
		between("max_rule_adjust", dec(s.MaxAdjust), 0, 1),
		between("rule_time_ms", float64(s.RuleLimits.Time/time.Millisecond), 10, 10000),
		between("rule_memory_mib", float64(s.RuleLimits.Memory>>20), 4, 256),
		between("reading_max_age_min", s.MaxReadingAge.Minutes(), 5, 1440),
		between("cross_check_max_s", s.CrossCheckMax, 0.01, 1),
		between("opponent_margin", s.OppMargin, -1, 2),
		between("opponent_margin_sd", s.OppMarginSD, 0.001, 1),
		between("opponent_rt_mean", s.OppRTMean, -1, 2),
		between("opponent_rt_sd", s.OppRTSD, 0.001, 1),
		between("rt_mean", s.RTMean, -1, 2),
		between("rt_sd", s.RTSD, 0.001, 1),
	} {
		if err != nil {
			return err
		}
	}
	if s.Tree != bracket.FullTree && s.Tree != bracket.ProTree {
		return fmt.Errorf("tree = %q", s.Tree)
	}
	if s.RTZero != bracket.FromGreen && s.RTZero != bracket.FromAmber {
		return fmt.Errorf("rt_zero = %q", s.RTZero)
	}
	if s.RuleLimits.DialStep.Cmp(s.DialStep) != 0 {
		return fmt.Errorf("the rules round to %s, the setting is %s", s.RuleLimits.DialStep, s.DialStep)
	}
	return nil
}
