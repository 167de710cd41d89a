package pitpage

import (
	"context"
	"fmt"
	"net/http"
	"net/http/httptest"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"pitcard/event"
	"pitcard/logbook"
)

// browser starts headless Chromium at a phone's size, or skips (fails on
// CI, where .ci/run installs it).
func browser(t *testing.T) context.Context {
	t.Helper()
	path := ""
	for _, name := range []string{"chromium", "chromium-browser", "google-chrome"} {
		if p, err := exec.LookPath(name); err == nil {
			path = p
			break
		}
	}
	if path == "" {
		if os.Getenv("CI") != "" {
			t.Fatal("chromium is not installed on CI (.ci/run installs it): the pit page's browser test cannot run")
		}
		t.Skip("chromium is not installed: the pit page's browser test needs Debian's chromium (apt-get install chromium)")
	}
	opts := append(chromedp.DefaultExecAllocatorOptions[:], chromedp.ExecPath(path), chromedp.NoSandbox, chromedp.DisableGPU,
		chromedp.WindowSize(390, 844), chromedp.Flag("disable-quic", true), chromedp.Flag("hide-scrollbars", true))
	alloc, cancelAlloc := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancelCtx := chromedp.NewContext(alloc)
	ctx, cancelTime := context.WithTimeout(ctx, 240*time.Second)
	t.Cleanup(func() { cancelTime(); cancelCtx(); cancelAlloc() })
	if err := chromedp.Do(ctx, chromedp.EmulateViewport(390, 844)); err != nil {
		t.Fatalf("starting chromium: %v", err)
	}
	return ctx
}

// tooWide lists the elements reaching past the viewport's right edge.
const tooWide = `(() => {
  const w = document.documentElement.clientWidth, bad = [];
  if (document.documentElement.scrollWidth > w) bad.push("the page scrolls sideways: " + document.documentElement.scrollWidth + " px");
  for (const el of document.querySelectorAll("body *")) {
    const r = el.getBoundingClientRect();
    if (r.width > 0 && (r.right > w + 0.5 || r.left < -0.5)) bad.push(el.tagName + "." + el.className + " " + Math.round(r.left) + ".." + Math.round(r.right) + (el.tagName === "TABLE" && el.caption ? " (" + el.caption.textContent + ")" : ""));
  }
  return bad.slice(0, 8);
})()`

// shot saves the viewport as PNG in $PITCARD_SHOTS, when set (to look at).
func shot(t *testing.T, ctx context.Context, name string) {
	dir := os.Getenv("PITCARD_SHOTS")
	if dir == "" {
		return
	}
	png, err := chromedp.Run(ctx, chromedp.CaptureScreenshot())
	if err != nil {
		t.Logf("screenshot %s: %v", name, err)
		return
	}
	_ = os.WriteFile(filepath.Join(dir, name+".png"), png, 0o644)
}

// textOf is the text of the first element sel selects.
func textOf(t *testing.T, ctx context.Context, sel string) string {
	t.Helper()
	s, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(sel)))
	if err != nil {
		t.Fatalf("%s: %v", sel, err)
	}
	return s
}

func do(t *testing.T, ctx context.Context, steps ...chromedp.Action[chromedp.Void]) {
	t.Helper()
	if err := chromedp.Do(ctx, steps...); err != nil {
		t.Fatal(err)
	}
}

func eval[T any](t *testing.T, ctx context.Context, js string) T {
	t.Helper()
	v, err := chromedp.Run(ctx, chromedp.Evaluate[T](js))
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func TestThePitPageOnAPhone(t *testing.T) {
	ctx := browser(t)
	f := newFixture(t)
	start := time.Now()
	f.srv.cfg.Now = func() time.Time { return demoNow.Add(time.Since(start)) }
	base := serveLoopback(t, f, DefaultLimits)
	css := func(s string) chromedp.CSS { return chromedp.CSS(s) }

	// The crew's link opened from another app: a page of another site
	// (localhost is another site than 127.0.0.1) links to it.
	other := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		fmt.Fprintf(w, `<!DOCTYPE html><title>a message</title><a id="go" href="%s/join/%s">the crew's link</a>`, base, testTokens.Crew)
	}))
	t.Cleanup(other.Close)
	otherURL := strings.Replace(other.URL, "127.0.0.1", "localhost", 1)
	do(t, ctx, chromedp.Navigate(otherURL), chromedp.Click(css("#go")))
	landed := ""
	for deadline := time.Now().Add(10 * time.Second); time.Now().Before(deadline); time.Sleep(100 * time.Millisecond) {
		v, err := chromedp.Run(ctx, chromedp.Evaluate[string](`location.pathname + " " + (document.querySelector(".dial .num") || document.querySelector("h1") || {}).textContent`))
		if landed = v; err == nil && strings.HasPrefix(v, "/ ") && !strings.HasSuffix(v, "undefined") {
			break
		}
	}
	if !strings.HasPrefix(landed, "/ 11.") {
		t.Fatalf("the crew's link opened from another site lands on %q, want the card's dial", landed)
	}

	// The card: the dial to post in large type, above the fold; nothing wider than the phone.
	do(t, ctx, chromedp.Navigate(base+"/"), chromedp.WaitVisible(css(".dial .num")))
	shot(t, ctx, "card")
	if dial := textOf(t, ctx, ".dial .num"); !strings.HasPrefix(dial, "11.") {
		t.Errorf("the dial reads %q", dial)
	}
	box := eval[struct{ Top, Bottom, Size, Height float64 }](t, ctx, `(() => { const n = document.querySelector(".dial .num"), r = n.getBoundingClientRect();
		return {Top: r.top, Bottom: r.bottom, Size: parseFloat(getComputedStyle(n).fontSize), Height: innerHeight}; })()`)
	if box.Top < 0 || box.Bottom > box.Height || box.Size < 48 {
		t.Errorf("the dial must be visible without scrolling, in large type: %+v", box)
	}
	if wide := eval[[]string](t, ctx, tooWide); len(wide) > 0 {
		t.Errorf("the card is wider than a 390 px phone: %v", wide)
	}
	if dir := os.Getenv("PITCARD_SHOTS"); dir != "" {
		if png, err := chromedp.Run(ctx, chromedp.FullScreenshot(100)); err == nil {
			_ = os.WriteFile(filepath.Join(dir, "card-full.png"), png, 0o644)
		}
		for _, sel := range []string{"#checklist", "#opponent", ".cautions"} {
			do(t, ctx, chromedp.ScrollIntoView(css(sel)))
			shot(t, ctx, "card-"+strings.Trim(sel, "#."))
		}
	}
	for _, path := range []string{"/reading", "/slip", "/setup", "/passes", "/weather", "/?round=E4"} {
		do(t, ctx, chromedp.Navigate(base+path), chromedp.WaitReady(css("footer")))
		shot(t, ctx, strings.NewReplacer("/", "", "?", "-", "=", "").Replace(path))
		if wide := eval[[]string](t, ctx, tooWide); len(wide) > 0 {
			t.Errorf("%s is wider than a 390 px phone: %v", path, wide)
		}
	}

	// Printed from the phone's browser: one sheet, Letter or A4.
	pdfinfo, perr := exec.LookPath("pdfinfo")
	if perr != nil && os.Getenv("CI") != "" {
		t.Error("pdfinfo is not installed on CI (.ci/run installs poppler-utils)")
	}
	for name, paper := range map[string]chromedp.PaperSize{"Letter": chromedp.PaperLetter, "A4": chromedp.PaperA4} {
		pdf, err := chromedp.Run(ctx, chromedp.PrintToPDF(chromedp.PDFPaper(paper), chromedp.PDFMargin(8/25.4)))
		if err != nil {
			t.Fatal(err)
		}
		if perr != nil {
			t.Logf("pdfinfo is not installed: the printed card's page count on %s is not checked", name)
			continue
		}
		file := filepath.Join(t.TempDir(), "card.pdf")
		if err := os.WriteFile(file, pdf, 0o644); err != nil {
			t.Fatal(err)
		}
		out, err := exec.Command(pdfinfo, file).Output()
		if err != nil {
			t.Fatal(err)
		}
		if !regexp.MustCompile(`(?m)^Pages:\s+1$`).Match(out) {
			t.Errorf("the card printed from the page takes more than one %s sheet:\n%s", name, out)
		}
	}

	// The narrowest phones the page is laid out for.
	do(t, ctx, chromedp.EmulateViewport(360, 740))
	for _, path := range []string{"/", "/reading", "/slip", "/setup", "/passes", "/weather"} {
		do(t, ctx, chromedp.Navigate(base+path), chromedp.WaitReady(css("footer")))
		if wide := eval[[]string](t, ctx, tooWide); len(wide) > 0 {
			t.Errorf("%s is wider than a 360 px phone: %v", path, wide)
		}
	}
	do(t, ctx, chromedp.EmulateViewport(390, 844))

	// A reading through the form: a bad value first, marked and the rest kept, then fixed.
	do(t, ctx, chromedp.Navigate(base+"/reading"), chromedp.WaitVisible(css("#f-temp")),
		chromedp.SendKeys(css("#f-temp"), "79.5x"), chromedp.SendKeys(css("#f-baro"), "27.64"), chromedp.SendKeys(css("#f-humidity"), "44"),
		chromedp.Click(css("main button[type=submit]")), chromedp.WaitVisible(css("#e-temp")))
	shot(t, ctx, "reading-bad")
	msg := textOf(t, ctx, "#e-temp")
	kept, err := chromedp.Run(ctx, chromedp.Value(css("#f-baro")))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(msg, "Air temperature") || kept != "27.64" {
		t.Errorf("a bad temperature: message %q, the barometer kept as %q", msg, kept)
	}
	do(t, ctx, chromedp.SetValue(css("#f-temp"), "79.5"), chromedp.Click(css("main button[type=submit]")), chromedp.WaitVisible(css(".saved")))
	if main := textOf(t, ctx, "main"); !strings.Contains(main, "79.5 °F") {
		t.Errorf("the refreshed card must show the new reading's 79.5 °F")
	}
	if w := f.file(event.WeatherFile); !strings.Contains(w, ",79.5,27.64,station,44,") {
		t.Errorf("weather.csv lacks the reading:\n%s", w)
	}

	// A slip through the form, preselected for round 3.
	do(t, ctx, chromedp.Navigate(base+"/slip"), chromedp.WaitVisible(css("#f-rt")))
	if session, err := chromedp.Run(ctx, chromedp.Value(css("#f-session"))); err != nil || session != "E3" {
		t.Errorf("the slip is preselected for %q (%v), want E3", session, err)
	}
	var steps []chromedp.Action[chromedp.Void]
	for sel, v := range map[string]string{"#f-rt": ".027", "#f-et60": "1.603", "#f-et330": "4.661", "#f-et660": "7.275", "#f-mph660": "94.0",
		"#f-et1000": "9.500", "#f-et1320": "11.437", "#f-mph1320": "117.5"} {
		steps = append(steps, chromedp.SendKeys(css(sel), v))
	}
	steps = append(steps, chromedp.Click(css("main button[type=submit]")), chromedp.WaitVisible(css(".saved")))
	do(t, ctx, steps...)
	shot(t, ctx, "slip-logged")
	if said := textOf(t, ctx, ".saved"); !strings.Contains(said, "Logged round 3, left lane") || !strings.Contains(said, "11.437") {
		t.Errorf("the slip page says %q", said)
	}
	if lb := f.file(event.LogbookFile); !strings.Contains(lb, ",E3,left,") || !strings.Contains(lb, ",11.437,") {
		t.Errorf("the logbook lacks the pass")
	}
	do(t, ctx, chromedp.Navigate(base+"/"), chromedp.WaitVisible(css("h1")))
	if title := textOf(t, ctx, "h1"); !strings.Contains(title, "Round 4") {
		t.Errorf("after round 3's slip the card is %q, want round 4", title)
	}

	// The card refreshes itself when the folder changes: a tick made on
	// the laptop (as the command line would) appears on the phone.
	e, err := event.Open(event.OpenOptions{Dir: f.dir})
	if err != nil {
		t.Fatal(err)
	}
	if err := e.SetTicks("2026-06-13", logbook.Session{Kind: logbook.Elimination, N: 4}, []string{"Tire pressures set"}, f.srv.cfg.Now()); err != nil {
		t.Fatal(err)
	}
	// The page reloads itself: ask from outside, across the reload.
	refreshed := false
	for deadline := time.Now().Add(20 * time.Second); time.Now().Before(deadline) && !refreshed; time.Sleep(200 * time.Millisecond) {
		v, err := chromedp.Run(ctx, chromedp.Evaluate[bool](`(() => { const b = document.querySelector('input[value="Tire pressures set"]'); return !!b && b.checked; })()`))
		refreshed = err == nil && v
	}
	if !refreshed {
		t.Fatal("the card did not refresh itself within 20 s of the folder changing")
	}
	// In place, and said in the polite live region.
	if said := textOf(t, ctx, "#changed"); !strings.Contains(said, "Updated with new data") {
		t.Errorf("the refresh must be said in the live region, which says %q", said)
	}
	shot(t, ctx, "card-refreshed")
}
