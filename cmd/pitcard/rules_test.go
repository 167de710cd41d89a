package main

import (
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"
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
	// (the failed check stops the dial here as on the card: exit 3)
	try, _, code = pitcard(t, "rules", "try", "--dir", dir, "--round", "3", "--lane", "left", "--at", "20:45")
	if code != exitCheckFailed || !strings.Contains(try, "[fail] rule rules/60-broken.lua") || !strings.Contains(try, "dial -0.01 s") {
		t.Errorf("try with a broken rule:\n%s", try)
	}
}

// A rule that puts a looping or failing __index on its globals: every
// command that loads the rules returns in time, the card prints, and the
// rule is a failed check naming its file and line (it used to hang, or exit
// 1 "a bug in pitcard" with no card).
func TestRuleWithGlobalsMetatable(t *testing.T) {
	for name, index := range map[string]string{"loop": "while true do end", "error": "error('boom')"} {
		t.Run(name, func(t *testing.T) {
			dir := demoCopy(t)
			src := "setmetatable(_G, {__index = function() " + index + " end})\n" +
				"function checks(ctx)\n  return {{label = 'uses ' .. missing, status = 'pass'}}\nend\n"
			if err := os.WriteFile(filepath.Join(dir, "rules", "70-globals.lua"), []byte(src), 0o644); err != nil {
				t.Fatal(err)
			}
			for _, tc := range []struct {
				args []string
				code int
				want []string
			}{
				// a rule that cannot run is a failed check: the card prints
				// whole, says STOP and exits 3
				{[]string{"card", "--dir", dir}, 3, []string{"DO NOT", "A CHECK FAILED: rule rules/70-globals.lua", "FAIL rule rules/70-globals.lua", "rules/70-globals.lua:1:", "Cautions"}},
				{[]string{"rules", "list", "--dir", dir}, 0, []string{"rules/70-globals.lua", "checks"}},
				{[]string{"rules", "check", "--dir", dir}, 2, []string{"FAIL  rules/70-globals.lua:1:", "1 of 6 rules failed"}},
				{[]string{"rules", "try", "--dir", dir, "--round", "3", "--lane", "left", "--at", "20:45"}, 3, []string{"[fail] rule rules/70-globals.lua", "rules/70-globals.lua:1:", "dial -0.01 s"}},
			} {
				type ran struct {
					out, errs string
					code      int
				}
				done := make(chan ran, 1)
				go func() {
					out, errs, code := pitcard(t, tc.args...)
					done <- ran{out, errs, code}
				}()
				select {
				case r := <-done:
					if r.code != tc.code {
						t.Errorf("%s: exit %d, want %d\n%s%s", tc.args[:2], r.code, tc.code, r.out, r.errs)
					}
					for _, w := range tc.want {
						if !strings.Contains(r.out+r.errs, w) {
							t.Errorf("%s lacks %q:\n%s%s", tc.args[:2], w, r.out, r.errs)
						}
					}
				case <-time.After(10 * time.Second):
					t.Fatalf("%s did not return within 10 s", tc.args[:2])
				}
			}
		})
	}
}

// A rule's text and a pass's notes are cut on the card, saying where the
// whole is; `pitcard rules try` shows the rule's whole output. A 3 MB reason
// made a 9 MB card and took 360 MB; the card stays a page and the memory
// the command allocates stays near a plain card's.
func TestLongTextsAreCutOnTheCard(t *testing.T) {
	allocated := func(args ...string) (string, uint64) {
		t.Helper()
		runtime.GC()
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		out := mustRun(t, args...)
		runtime.ReadMemStats(&after)
		return out, after.TotalAlloc - before.TotalAlloc
	}
	dir := demoCopy(t)
	_, plain := allocated("card", "--dir", dir)
	if err := os.WriteFile(filepath.Join(dir, "rules", "70-long.lua"), []byte(
		"local big = string.rep('why ', 750000) -- 3 MB\nfunction dial(ctx) return 0.01, big end\nfunction notes(ctx) return {big} end\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	// today's last pass with 3 MB of notes
	book := filepath.Join(dir, "logbook.csv")
	data, err := os.ReadFile(book)
	if err != nil {
		t.Fatal(err)
	}
	rows := strings.Split(strings.TrimRight(string(data), "\n"), "\n")
	rows[len(rows)-1] += "lifted " + strings.Repeat("then ", 600000)
	if err := os.WriteFile(book, []byte(strings.Join(rows, "\n")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, format := range []string{"text", "markdown", "html", "json"} {
		card, took := allocated("card", "--dir", dir, "--format", format)
		if len(card) > 40<<10 {
			t.Errorf("%s card: %d KB", format, len(card)>>10)
		}
		if !strings.Contains(card, "pitcard rules try") || !strings.Contains(card, "pitcard log list") {
			t.Errorf("%s card does not say where the whole texts are", format)
		}
		if took > plain+64<<20 {
			t.Errorf("%s card allocated %d MB, a plain card %d MB", format, took>>20, plain>>20)
		}
	}
	try := mustRun(t, "rules", "try", "--dir", dir)
	if !strings.Contains(try, strings.Repeat("why ", 750000)) {
		t.Errorf("rules try does not show the whole reason (%d bytes)", len(try))
	}
}
