package pitpage

import (
	"fmt"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"pitcard/event"
)

// axeSource is axe-core's axe.min.js, from the npm registry: .ci/run
// installs it and names it in PITCARD_AXE. Without it the accessibility
// check is skipped (fails on CI).
func axeSource(t *testing.T) string {
	t.Helper()
	p := os.Getenv("PITCARD_AXE")
	if p == "" {
		if os.Getenv("CI") != "" {
			t.Fatal("PITCARD_AXE is not set on CI (.ci/run installs axe-core from npm and sets it)")
		}
		t.Skip("axe-core is not installed: set PITCARD_AXE to axe.min.js (npm pack axe-core@4; .ci/run does it)")
	}
	src, err := os.ReadFile(p)
	if err != nil {
		t.Fatalf("PITCARD_AXE: %v", err)
	}
	return string(src)
}

// axeRun runs axe-core on the page shown and returns its violations, one
// line each: the rule, its impact and the first elements it names.
const axeRun = `axe.run(document, {resultTypes: ["violations"]}).then(r => r.violations.map(v =>
  v.id + " (" + v.impact + "): " + v.help + " at " + v.nodes.slice(0, 3).map(n => n.target.join(" ")).join(", ")))`

// smallTargets lists what a finger taps that is smaller than 44×44 px
// (WCAG 2.5.5; a box or a radio counts with its label), and any gap
// between the checklist's rows, where a tap would land on nothing.
const smallTargets = `(() => {
  const bad = [];
  const name = el => el.tagName.toLowerCase() + (el.id ? "#" + el.id : "") + (el.className ? "." + el.className : "") + " " + JSON.stringify((el.textContent || el.value || "").trim().slice(0, 20));
  for (const el of document.querySelectorAll("a[href], button, select, textarea, input:not([type=hidden])")) {
    const t = el.matches("input[type=checkbox], input[type=radio]") ? (el.closest("label") || el) : el;
    const r = t.getBoundingClientRect();
    if (r.width === 0 || r.height === 0) continue;
    if (r.width < 43.5 || r.height < 43.5) bad.push(name(t) + " " + Math.round(r.width) + "×" + Math.round(r.height));
  }
  const rows = [...document.querySelectorAll(".checks li")];
  for (let i = 1; i < rows.length; i++) {
    const gap = rows[i].getBoundingClientRect().top - rows[i-1].getBoundingClientRect().bottom;
    if (gap > 0.5) bad.push("a " + gap.toFixed(1) + " px gap above checklist row " + name(rows[i]));
  }
  for (const li of rows) {
    const l = li.querySelector("label");
    if (!l) continue;
    const a = li.getBoundingClientRect(), b = l.getBoundingClientRect();
    if (b.top - a.top > 0.5 || a.bottom - b.bottom > 0.5) bad.push("checklist row " + name(l) + ": its label covers " + Math.round(b.height) + " of the row's " + Math.round(a.height) + " px");
  }
  return bad.slice(0, 12);
})()`

// faintPlaceholders lists the placeholders (the last reading's figures)
// below 7:1 against the white field: the weakest text in sunlight
// (WCAG 1.4.6's enhanced contrast).
const faintPlaceholders = `(() => {
  const lum = c => { const m = c.match(/[\d.]+/g).map(Number), f = v => { v /= 255; return v <= 0.03928 ? v / 12.92 : Math.pow((v + 0.055) / 1.055, 2.4); };
    return 0.2126 * f(m[0]) + 0.7152 * f(m[1]) + 0.0722 * f(m[2]); };
  const bad = [];
  for (const el of document.querySelectorAll("input[placeholder]")) {
    if (!el.placeholder) continue;
    const c = getComputedStyle(el, "::placeholder").color, r = 1.05 / (lum(c) + 0.05);
    if (r < 7) bad.push(el.id + " " + c + " " + r.toFixed(1) + ":1");
  }
  return bad;
})()`

// chartLabels lists the chart's labels drawn smaller than min px and the
// labels that overlap each other or a marker, as drawn.
const chartLabels = `((min) => {
  const svg = [...document.querySelectorAll(".chart svg")].find(s => s.getBoundingClientRect().width > 0);
  if (!svg) return ["no chart is shown"];
  const bad = [], scale = svg.getScreenCTM().a;
  const texts = [...svg.querySelectorAll("text")];
  for (const t of texts) {
    const px = parseFloat(getComputedStyle(t).fontSize) * scale;
    if (px < min - 0.05) bad.push(JSON.stringify(t.textContent) + " is " + px.toFixed(1) + " px");
  }
  const box = el => el.getBoundingClientRect();
  const meet = (a, b) => a.left < b.right - 0.5 && b.left < a.right - 0.5 && a.top < b.bottom - 0.5 && b.top < a.bottom - 0.5;
  for (let i = 0; i < texts.length; i++) {
    for (let j = i + 1; j < texts.length; j++) {
      if (meet(box(texts[i]), box(texts[j]))) bad.push(JSON.stringify(texts[i].textContent) + " overlaps " + JSON.stringify(texts[j].textContent));
    }
    for (const m of svg.querySelectorAll("circle, path")) {
      if (meet(box(texts[i]), box(m))) bad.push(JSON.stringify(texts[i].textContent) + " touches a marker at " + Math.round(box(m).left) + "," + Math.round(box(m).top));
    }
  }
  return bad.slice(0, 12);
})`

// TestEveryPageOnAPhoneForBothLinks opens every page with the crew's and
// the view link at the two phone sizes the page is laid out for: no
// accessibility violation axe-core finds, every target big enough to tap,
// and a chart that reads.
func TestEveryPageOnAPhoneForBothLinks(t *testing.T) {
	ctx := browser(t)
	axe := axeSource(t)
	f := newFixture(t)
	withSetup(t, f) // the setup form and the slip's setup fields too
	start := time.Now()
	f.srv.cfg.Now = func() time.Time { return demoNow.Add(time.Since(start)) }
	base := serveLoopback(t, f, DefaultLimits)
	pages := []string{"/", "/?round=E4", "/reading", "/slip", "/setup?round=E4", "/passes", "/weather"}
	check := func(t *testing.T, path string) {
		if got, err := chromedp.Run(ctx, chromedp.Evaluate[bool](`typeof axe !== "undefined"`)); err != nil || !got {
			eval[bool](t, ctx, axe+";true")
		}
		v, err := chromedp.Run(ctx, chromedp.Evaluate[[]string](axeRun, chromedp.EvalAwaitPromise))
		if err != nil {
			t.Fatalf("%s: axe: %v", path, err)
		}
		if len(v) > 0 {
			t.Errorf("%s: axe-core finds:\n  %s", path, strings.Join(v, "\n  "))
		}
		if small := eval[[]string](t, ctx, smallTargets); len(small) > 0 {
			t.Errorf("%s: too small to tap (44×44 px):\n  %s", path, strings.Join(small, "\n  "))
		}
		if faint := eval[[]string](t, ctx, faintPlaceholders); len(faint) > 0 {
			t.Errorf("%s: placeholders below 7:1: %v", path, faint)
		}
	}
	for _, link := range []struct{ name, token string }{{"crew", testTokens.Crew}, {"view", testTokens.View}} {
		for _, size := range [][2]int64{{390, 844}, {360, 740}} {
			t.Run(fmt.Sprintf("%s/%dx%d", link.name, size[0], size[1]), func(t *testing.T) {
				do(t, ctx, chromedp.EmulateViewport(size[0], size[1]), chromedp.Navigate(base+"/join/"+link.token), chromedp.WaitVisible(chromedp.CSS(".dial .num")))
				for _, path := range pages {
					do(t, ctx, chromedp.Navigate(base+path), chromedp.WaitReady(chromedp.CSS("footer")))
					check(t, path)
					if strings.HasPrefix(path, "/?") || path == "/" {
						if bad := eval[[]string](t, ctx, chartLabels+"(12)"); len(bad) > 0 {
							t.Errorf("%s: the chart at %d px:\n  %s", path, size[0], strings.Join(bad, "\n  "))
						}
					}
				}
				if link.name == "crew" {
					// A refused form: the page as it answers, focus on the first bad field.
					do(t, ctx, chromedp.Navigate(base+"/reading"), chromedp.WaitVisible(chromedp.CSS("#f-temp")),
						chromedp.SendKeys(chromedp.CSS("#f-temp"), "80"), chromedp.SendKeys(chromedp.CSS("#f-baro"), "27.64x"), chromedp.SendKeys(chromedp.CSS("#f-humidity"), "40"), chromedp.Click(chromedp.CSS("main button[type=submit]")), chromedp.WaitVisible(chromedp.CSS("#e-baro")))
					check(t, "the refused reading")
					if id := eval[string](t, ctx, `document.activeElement.id`); id != "f-baro" {
						t.Errorf("after a refused form the focus is on %q, want the first bad field f-baro", id)
					}
				}
			})
		}
	}

	// A desktop's width: the chart's labels still do not overlap.
	do(t, ctx, chromedp.EmulateViewport(1280, 900), chromedp.Navigate(base+"/join/"+testTokens.Crew), chromedp.WaitVisible(chromedp.CSS(".dial .num")))
	if bad := eval[[]string](t, ctx, chartLabels+"(9)"); len(bad) > 0 {
		t.Errorf("the chart at 1280 px:\n  %s", strings.Join(bad, "\n  "))
	}

	// Ticking a box saves it where it is: no reload, the focus stays on the box.
	do(t, ctx, chromedp.EmulateViewport(390, 844), chromedp.Navigate(base+"/?round=E3"), chromedp.WaitVisible(chromedp.CSS(".dial .num")))
	eval[bool](t, ctx, `window.stayed = true`)
	do(t, ctx, chromedp.Focus(chromedp.CSS(`input[value="Tire pressures set"]`)), chromedp.KeyEvent(" "))
	var saved bool
	for deadline := time.Now().Add(10 * time.Second); time.Now().Before(deadline) && !saved; time.Sleep(100 * time.Millisecond) {
		saved = strings.Contains(f.file(event.RoundsFile), "Tire pressures set")
	}
	time.Sleep(300 * time.Millisecond)
	where, err := chromedp.Run(ctx, chromedp.Evaluate[string](`(window.stayed ? "same page" : "reloaded") + ", focus on " + (document.activeElement.value || document.activeElement.tagName)`))
	if !saved || err != nil || where != "same page, focus on Tire pressures set" {
		t.Errorf("ticking a box: saved %v, then %q (%v), want it saved, the same page and the focus on the box", saved, where, err)
	}
	// The next look at the folder must not reload the page over the tick it saved.
	time.Sleep(5 * time.Second)
	if where := eval[string](t, ctx, `(window.stayed ? "same page" : "reloaded") + ", focus on " + (document.activeElement.value || document.activeElement.tagName)`); where != "same page, focus on Tire pressures set" {
		t.Errorf("after its own tick was saved the page went %q", where)
	}
}
