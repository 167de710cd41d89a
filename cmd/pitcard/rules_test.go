package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func demoCopy(t *testing.T) string {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "demo")
	mustRun(t, "init", "--demo", dir)
	return dir
}

func TestRulesCommands(t *testing.T) {
	dir := demoCopy(t)
	list := mustRun(t, "rules", "list", "--dir", dir)
	for _, w := range []string{"rules/10-lane-time.lua", "dial", "rules/50-prestage.lua", "checks", "notes"} {
		if !strings.Contains(list, w) {
			t.Errorf("list lacks %q:\n%s", w, list)
		}
	}
	if out := mustRun(t, "rules", "check", "--dir", dir); !strings.Contains(out, "All 5 rules load") {
		t.Errorf("check: %s", out)
	}
	try := mustRun(t, "rules", "try", "--dir", dir, "--round", "3", "--lane", "left", "--at", "20:45")
	for _, w := range []string{"dial -0.01 s: left lane after 20:30", "log: lane left", "[confirm] Window net up", "note: Rear tires", "took"} {
		if !strings.Contains(try, w) {
			t.Errorf("try lacks %q:\n%s", w, try)
		}
	}
	hot := mustRun(t, "rules", "try", "--dir", dir, "--round", "E4", "--lane", "right", "--at", "20:45", "--track-temp", "135F")
	if !strings.Contains(hot, "dial +0.02 s: track 135 °F is over 130 °F") || strings.Contains(hot, "left lane after") {
		t.Errorf("hot track, right lane:\n%s", hot)
	}
	// a broken rule: check exits 2 (the rule is the crew's input to fix) naming the file and line; try still runs the others
	if err := os.WriteFile(filepath.Join(dir, "rules", "60-broken.lua"), []byte("function dial(ctx)\n  return 1 +\nend\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	out, _, code := pitcard(t, "rules", "check", "--dir", dir)
	if code != 2 || !strings.Contains(out, "rules/60-broken.lua:3:") {
		t.Errorf("broken rule: exit %d\n%s", code, out)
	}
	try = mustRun(t, "rules", "try", "--dir", dir, "--round", "3", "--lane", "left", "--at", "20:45")
	if !strings.Contains(try, "[fail] rule rules/60-broken.lua") || !strings.Contains(try, "dial -0.01 s") {
		t.Errorf("try with a broken rule:\n%s", try)
	}
}
