package main

import (
	"bytes"
	"encoding/json"
	"flag"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"
)

var update = flag.Bool("update", false, "rewrite the golden cards in testdata/")

// The demo cards are golden files: a change shows as a diff to review, and
// the diff is told figure by figure ("CF J1349 (2004) / DIN: 1.0990 →
// 1.0871"), when the test fails and when -update rewrites them, so a change
// of physics is seen as the figures it moved, not as a rewritten file.
// Regenerate with: go test ./cmd/pitcard -run TestDemoCardGolden -update -v
func TestDemoCardGolden(t *testing.T) {
	for _, tc := range []struct{ format, file string }{{"text", "card-demo.txt"}, {"markdown", "card-demo.md"}} {
		out := mustRun(t, "card", "--demo", "--format", tc.format)
		path := filepath.Join("testdata", tc.file)
		if *update {
			if old, err := os.ReadFile(path); err == nil && string(old) != out {
				t.Logf("%s: what changed, figure by figure:\n%s", path, strings.Join(figureChanges(string(old), out), "\n"))
			}
			if err := os.WriteFile(path, []byte(out), 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run with -update to create it)", err)
		}
		if out != string(want) {
			t.Errorf("%s card differs from %s (review, then regenerate with -update -v):\n%s\n%s", tc.format, path,
				strings.Join(figureChanges(string(want), out), "\n"), firstDiff(out, string(want)))
		}
	}
}

// figureRe is one figure of a card: a number with its sign and decimals, a
// clock time (20:45) or a date (2026-06-13).
var figureRe = regexp.MustCompile(`[-+]?\d+(?:[.:]\d+)*(?:-\d+)*`)

// figureChanges lists what changed from old to new, two renderings of a
// card: lines of the same shape (their words, the figures masked) are paired
// in order (a longest common subsequence), and each figure that differs is
// named by its row's label and its place in the row; lines without a pair
// are listed as removed or added.
func figureChanges(old, newText string) []string {
	ol, nl := strings.Split(old, "\n"), strings.Split(newText, "\n")
	shape := func(l string) string { return strings.Join(strings.Fields(figureRe.ReplaceAllString(l, "#")), " ") }
	oldShapes, newShapes := make([]string, len(ol)), make([]string, len(nl))
	for i, l := range ol {
		oldShapes[i] = shape(l)
	}
	for j, l := range nl {
		newShapes[j] = shape(l)
	}
	// lcs[i][j]: the longest common subsequence of os[i:] and ns[j:]
	lcs := make([][]int, len(ol)+1)
	for i := range lcs {
		lcs[i] = make([]int, len(nl)+1)
	}
	for i := len(ol) - 1; i >= 0; i-- {
		for j := len(nl) - 1; j >= 0; j-- {
			if oldShapes[i] == newShapes[j] {
				lcs[i][j] = lcs[i+1][j+1] + 1
			} else {
				lcs[i][j] = max(lcs[i+1][j], lcs[i][j+1])
			}
		}
	}
	// row splits a line into its label and its figures: a table row's label
	// is its first non-empty cell and its figures those of the other cells
	// (so J1349 in a label is no figure); another line's label is its text
	// before the first figure
	row := func(l string) (string, []string) {
		sep := ""
		for _, x := range []string{"│", "|"} {
			if strings.Contains(l, x) {
				sep = x
				break
			}
		}
		if sep == "" {
			loc := figureRe.FindStringIndex(l)
			if loc == nil {
				return strings.TrimSpace(l), nil
			}
			return strings.Trim(l[:loc[0]], " #*-:"), figureRe.FindAllString(l, -1)
		}
		parts := strings.Split(l, sep)
		for k, c := range parts {
			if c = strings.Trim(c, " *"); c != "" {
				var figs []string
				for _, r := range parts[k+1:] {
					figs = append(figs, figureRe.FindAllString(r, -1)...)
				}
				return c, figs
			}
		}
		return "", nil
	}
	var out []string
	i, j := 0, 0
	for i < len(ol) || j < len(nl) {
		switch {
		case i < len(ol) && j < len(nl) && oldShapes[i] == newShapes[j]:
			olab, of := row(ol[i])
			nlab, nf := row(nl[j])
			if olab != nlab {
				out = append(out, fmt.Sprintf("row %s → %s", olab, nlab))
			}
			for k := range min(len(of), len(nf)) {
				if of[k] != nf[k] {
					place := ""
					if len(of) > 1 {
						place = fmt.Sprintf(" (figure %d of %d)", k+1, len(of))
					}
					out = append(out, fmt.Sprintf("%s: %s → %s%s", nlab, of[k], nf[k], place))
				}
			}
			i, j = i+1, j+1
		case j < len(nl) && (i == len(ol) || lcs[i][j+1] >= lcs[i+1][j]):
			out = append(out, "added:   "+strings.TrimSpace(nl[j]))
			j++
		default:
			out = append(out, "removed: "+strings.TrimSpace(ol[i]))
			i++
		}
	}
	if len(out) == 0 && old != newText {
		out = append(out, "no figure changed (spacing only)")
	}
	return out
}

// figureChanges names a moved figure by its row; a line that appears is
// listed as added (the golden card's diff reader: no source needed).
func TestFigureChanges(t *testing.T) {
	old := "## Post this dial-in: **11.40**\n│ CF J1349 (2004) / DIN │ 1.0947 / 1.0990 │ 1.0940 / 1.0983 │\n| 11.37 | 0.0 % | 0.070 s |  |\nDrag racing can kill."
	changed := "## Post this dial-in: **11.39**\n│ CF J1349 (2004) / DIN │ 1.0947 / 1.0871 │ 1.0940 / 1.0983 │\n| 11.37 | 0.1 % | 0.070 s |  |\nA new line of 3 words.\nDrag racing can kill."
	got := figureChanges(old, changed)
	want := []string{
		"Post this dial-in: 11.40 → 11.39",
		"CF J1349 (2004) / DIN: 1.0990 → 1.0871 (figure 2 of 4)",
		"11.37: 0.0 → 0.1 (figure 1 of 2)",
		"added:   A new line of 3 words.",
	}
	if strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Errorf("changes:\n%s\nwant:\n%s", strings.Join(got, "\n"), strings.Join(want, "\n"))
	}
	if c := figureChanges(old, old); len(c) != 0 {
		t.Errorf("no change listed as %v", c)
	}
}

func firstDiff(a, b string) string {
	al, bl := strings.Split(a, "\n"), strings.Split(b, "\n")
	for i := 0; i < len(al) || i < len(bl); i++ {
		var x, y string
		if i < len(al) {
			x = al[i]
		}
		if i < len(bl) {
			y = bl[i]
		}
		if x != y {
			return "line " + strconv.Itoa(i+1) + ":\n got: " + x + "\nwant: " + y
		}
	}
	return ""
}

func TestDemoCardContent(t *testing.T) {
	out := mustRun(t, "card", "--demo")
	for _, w := range []string{"POST THIS", "Round 3, left lane", "called 20:45 (in 15 min)", "Prediction (95 % interval)",
		"Dial options", "10-lane-time.lua", "Checklist", "[ ] Rulebook and tech", "Setup notes", "Today so far", "Drag racing can kill",
		"rulebook", "inspection"} {
		if !strings.Contains(out, w) {
			t.Errorf("the demo card lacks %q", w)
		}
	}
	for i, line := range strings.Split(out, "\n") {
		if n := utf8.RuneCountInString(line); n > 100 {
			t.Errorf("line %d is %d columns wide (max 100): %q", i+1, n, line)
		}
	}
	var j map[string]any
	if err := json.Unmarshal([]byte(mustRun(t, "card", "--demo", "--format", "json")), &j); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"final_dial", "prediction", "dial", "rules", "checklist", "today", "air_now", "air_at_call", "cautions"} {
		if _, ok := j[k]; !ok {
			t.Errorf("card JSON lacks %q", k)
		}
	}
}

// Without a schedule or a weather log the card still prints what it can and
// says what is missing.
func TestCardOnASparseFolder(t *testing.T) {
	dir := newFolder(t)
	_ = os.Remove(filepath.Join(dir, "schedule.yaml"))
	_, errs, code := pitcard(t, "card", "--dir", dir)
	if code != 2 || !strings.Contains(errs, "which round?") {
		t.Errorf("no round: exit %d %s", code, errs)
	}
	_, errs, code = pitcard(t, "card", "--dir", dir, "--round", "1")
	if code != 2 || !strings.Contains(errs, "no air for the round") {
		t.Errorf("no air: exit %d %s", code, errs)
	}
	out := mustRun(t, "card", "--dir", dir, "--round", "1", "--lane", "right", "--temp", "85F", "--baro", "28.9inHg", "--humidity", "40%")
	// no pass of the car: no dial is posted, the physics estimate is a guide (a
	// fresh folder used to recommend a dial from physics alone)
	for _, w := range []string{"Round 1, right lane", "Physics from car.yaml alone", "NO DIAL YET", "make a time trial",
		"Guide from physics and car.yaml: 1/4 mile", "Not a dial-in", "Drag racing can kill", "No dial yet: make a time trial"} {
		if !strings.Contains(out, w) {
			t.Errorf("sparse card lacks %q:\n%s", w, out)
		}
	}
	for _, w := range []string{"POST THIS", "Dial options", "Over dial", "Dial on the window matches the card"} {
		if strings.Contains(out, w) {
			t.Errorf("a car with no passes got %q:\n%s", w, out)
		}
	}
	// a rule that runs away: the card still prints, with the failure named
	_ = os.WriteFile(filepath.Join(dir, "rules", "99-loop.lua"), []byte("function dial(ctx)\n  while true do end\nend\n"), 0o644)
	// (a rule that cannot run is a failed check: the card says STOP and
	// exits 3)
	out, _, code = pitcard(t, "card", "--dir", dir, "--round", "1", "--lane", "right", "--temp", "85F", "--baro", "28.9inHg", "--humidity", "40%")
	if code != 3 || !strings.Contains(out, "FAIL rule rules/99-loop.lua") || !strings.Contains(out, "rules/99-loop.lua:2") || !strings.Contains(out, "NO DIAL YET") {
		t.Errorf("card with a runaway rule:\n%s", out)
	}
}

// The HTML card in a real browser: printed to PDF by headless Chromium it is
// exactly one page, and the chart is drawn. Skipped, saying why, only where
// Chromium is absent outside CI.
func TestHTMLCardPrintsOnOnePage(t *testing.T) {
	chromium, err := exec.LookPath("chromium")
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal("chromium is not installed on CI (.ci/run installs it)")
		}
		t.Skip("chromium is not installed: install Debian's chromium and poppler-utils to run this test")
	}
	for _, tool := range []string{"pdfinfo", "pdftotext"} {
		if _, err := exec.LookPath(tool); err != nil {
			if os.Getenv("CI") != "" {
				t.Fatalf("%s is not installed on CI", tool)
			}
			t.Skipf("%s is not installed (poppler-utils)", tool)
		}
	}
	dir := t.TempDir()
	html := filepath.Join(dir, "card.html")
	mustRun(t, "card", "--demo", "--format", "html", "--out", html)
	// The longest dial boxes print on one page too: a failed limit (STOP)
	// and a model parted from its cross-check.
	stop := demoCopy(t)
	editFile(t, stop, "car.yaml", func(s string) string { return strings.Replace(s, "limit_et: 10.65", "limit_et: 11.50", 1) })
	for name, args := range map[string][]string{"stop": {"card", "--dir", stop}, "hot": {"card", "--demo", "--track-temp", "160F"}} {
		out, _, _ := pitcard(t, append(args, "--format", "html")...)
		pdf := filepath.Join(dir, name+".pdf")
		page := filepath.Join(dir, name+".html")
		_ = os.WriteFile(page, []byte(out), 0o644)
		cmd := exec.Command(chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
			"--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-pdf-header-footer",
			"--user-data-dir="+filepath.Join(dir, "profile-"+name), "--print-to-pdf="+pdf, "file://"+page)
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("chromium: %v\n%s", err, out)
		}
		info, err := exec.Command("pdfinfo", pdf).CombinedOutput()
		if !strings.Contains(string(info), "Pages:           1\n") {
			t.Errorf("the %s card is not one page (%v):\n%s", name, err, info)
		}
	}
	for _, paper := range []string{"letter", "a4"} {
		page := filepath.Join(dir, "card-"+paper+".html")
		data, _ := os.ReadFile(html)
		data = bytes.Replace(data, []byte("@page { size: auto;"), []byte("@page { size: "+paper+";"), 1)
		_ = os.WriteFile(page, data, 0o644)
		pdf := filepath.Join(dir, paper+".pdf")
		cmd := exec.Command(chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
			"--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-pdf-header-footer",
			"--user-data-dir="+filepath.Join(dir, "profile-"+paper), "--print-to-pdf="+pdf, "file://"+page)
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("chromium: %v\n%s", err, out)
		}
		info, err := exec.Command("pdfinfo", pdf).Output()
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(string(info), "Pages:           1\n") {
			t.Errorf("%s: the card is not one page:\n%s", paper, info)
		}
		txt, err := exec.Command("pdftotext", "-layout", pdf, "-").Output()
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range []string{"Density altitude (ft)", "prediction, 95 % interval", "POST THIS DIAL-IN", "Drag racing can kill"} {
			if !strings.Contains(string(txt), w) {
				t.Errorf("%s: the printed card lacks %q (the chart or the card did not draw)", paper, w)
			}
		}
	}
}

// dial's guide on too few passes says what it is made from as the card's
// does: one or two passes carried by the air, never "the pass model
// calibrated to 2 passes" beside "nothing fitted"; none, physics.
func TestDialGuideOnFewPasses(t *testing.T) {
	for _, tc := range []struct {
		keep int // the demo's latest passes kept
		want string
	}{{0, "Guide from physics and car.yaml"}, {1, "Guide from 1 pass carried to this air"}, {2, "Guide from 2 passes carried to this air"}} {
		t.Run(fmt.Sprintf("passes=%d", tc.keep), func(t *testing.T) {
			dir := demoCopy(t)
			editFile(t, dir, "logbook.csv", func(s string) string {
				lines := strings.Split(strings.TrimRight(s, "\n"), "\n")
				return strings.Join(append(lines[:1], lines[len(lines)-tc.keep:]...), "\n") + "\n"
			})
			out := oneLine(mustRun(t, "dial", "--dir", dir, "--latest"))
			if !strings.Contains(out, tc.want) || strings.Contains(out, "calibrated to") {
				t.Errorf("dial's guide should say %q, not a calibration:\n%s", tc.want, out)
			}
			var j struct{ Basis string }
			if err := json.Unmarshal([]byte(mustRun(t, "dial", "--dir", dir, "--latest", "--format", "json")), &j); err != nil {
				t.Fatal(err)
			}
			if !strings.HasPrefix("Guide from "+j.Basis, tc.want) {
				t.Errorf("dial's JSON basis %q, want it to begin as %q", j.Basis, strings.TrimPrefix(tc.want, "Guide from "))
			}
		})
	}
}
