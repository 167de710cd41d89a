package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Whatever pitcard.yaml holds, opening the folder either works with settings
// in their ranges or fails with a message naming the file or the setting.
func FuzzSettings(f *testing.F) {
	f.Add("units: metric\ndial_step: 0.001\nbreakout_risk: 0.05\n")
	f.Add("units: imperial\ntree: pro\nrt_zero: amber\nmax_rule_adjust: 0.1\nrule_time_ms: 500\nrule_memory_mib: 32\n")
	f.Add("dial_step: [1]\n")
	f.Add("unknown: 1\n")
	f.Add(": :\n")
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, yaml string) {
		if err := os.WriteFile(filepath.Join(dir, "pitcard.yaml"), []byte(yaml), 0o644); err != nil {
			t.Fatal(err)
		}
		_, errs, code := pitcard(t, "rules", "list", "--dir", dir)
		if code == 0 {
			return
		}
		if code != 2 {
			t.Fatalf("exit %d for %q: %s", code, yaml, errs)
		}
		if strings.Contains(errs, "panic") || strings.Contains(errs, "goroutine ") {
			t.Fatalf("a stack trace for %q: %s", yaml, errs)
		}
		ok := strings.Contains(errs, "pitcard.yaml")
		for _, k := range []string{"units", "dial_step", "breakout_risk", "tree", "rt-zero", "rt_zero", "max_rule_adjust", "rule_time_ms", "rule_memory_mib"} {
			ok = ok || strings.Contains(errs, k)
		}
		if !ok {
			t.Fatalf("error for %q names neither the file nor a setting: %s", yaml, errs)
		}
	})
}
