package pitpage

import (
	"bytes"
	"fmt"
	"html"
	"io"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"pitcard/entry"
	"pitcard/event"
	"pitcard/prep"
)

// demoNow is the demo day's last weather reading, 20:30 on 2026-06-13, one
// minute on: the round is E3, called 20:45.
var demoNow = time.Date(2026, 6, 13, 20, 31, 0, 0, time.Local)

var testTokens = Tokens{Crew: strings.Repeat("c", 32), View: strings.Repeat("v", 32), Secret: strings.Repeat("s", 32)}

// fixture is a pit page over a copy of the demo event in a temporary folder.
type fixture struct {
	t   testing.TB
	dir string
	srv *Server
	log bytes.Buffer
}

func newFixture(t testing.TB) *fixture {
	t.Helper()
	f := &fixture{t: t, dir: t.TempDir()}
	if _, err := event.Create(f.dir, true, demoNow); err != nil {
		t.Fatal(err)
	}
	var err error
	f.srv, err = New(Config{
		Open:   func() (*event.Folder, error) { return event.Open(event.OpenOptions{Dir: f.dir}) },
		Tokens: testTokens, Now: func() time.Time { return demoNow }, Log: &f.log,
	})
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// demoFixture serves the built-in demo, read-only.
func demoFixture(t testing.TB) *fixture {
	t.Helper()
	f := &fixture{t: t}
	var err error
	f.srv, err = New(Config{
		Open:   func() (*event.Folder, error) { return event.Open(event.OpenOptions{Demo: true}) },
		Tokens: testTokens, Now: time.Now,
	})
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// do sends a request with token's cookie ("" for none) and returns the answer.
func (f *fixture) do(method, target, token string, form url.Values) *httptest.ResponseRecorder {
	f.t.Helper()
	var body io.Reader
	if form != nil {
		body = strings.NewReader(form.Encode())
	}
	r := httptest.NewRequest(method, target, body)
	if form != nil {
		r.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	}
	if token != "" {
		r.AddCookie(&http.Cookie{Name: CookieName, Value: token})
	}
	w := httptest.NewRecorder()
	f.srv.ServeHTTP(w, r)
	return w
}

// post sends a crew form with its CSRF token.
func (f *fixture) post(target string, form url.Values) *httptest.ResponseRecorder {
	f.t.Helper()
	form.Set("csrf", testTokens.CSRF(testTokens.Crew))
	return f.do("POST", target, testTokens.Crew, form)
}

func (f *fixture) file(name string) string {
	f.t.Helper()
	data, err := os.ReadFile(filepath.Join(f.dir, name))
	if err != nil && !os.IsNotExist(err) {
		f.t.Fatal(err)
	}
	return string(data)
}

// snapshot is every file of the folder, to prove nothing was written.
func (f *fixture) snapshot() map[string]string {
	f.t.Helper()
	out := map[string]string{}
	_ = filepath.Walk(f.dir, func(p string, info os.FileInfo, err error) error {
		if err == nil && !info.IsDir() {
			data, _ := os.ReadFile(p)
			out[p] = string(data)
		}
		return nil
	})
	return out
}

func (f *fixture) unchanged(before map[string]string, why string) {
	f.t.Helper()
	after := f.snapshot()
	for p, data := range after {
		if before[p] != data {
			f.t.Errorf("%s: %s was written", why, filepath.Base(p))
		}
	}
	if len(after) != len(before) {
		f.t.Errorf("%s: files were added or removed (%d before, %d after)", why, len(before), len(after))
	}
}

func TestEveryPageRendersForTheDemo(t *testing.T) {
	f := demoFixture(t)
	for _, tok := range []string{testTokens.Crew, testTokens.View} {
		for _, path := range []string{"/", "/?round=E4", "/?round=T2", "/reading", "/slip", "/passes", "/weather", "/changes"} {
			w := f.do("GET", path, tok, nil)
			if w.Code != 200 {
				t.Errorf("GET %s: %d\n%s", path, w.Code, w.Body)
				continue
			}
			if path != "/changes" && !strings.Contains(w.Body.String(), "The demo event is read-only") {
				t.Errorf("GET %s: the demo must say it is read-only", path)
			}
		}
	}
	for _, path := range []string{"/static/pit.css", "/static/pit.js"} {
		if w := f.do("GET", path, "", nil); w.Code != 200 || w.Body.Len() < 500 {
			t.Errorf("GET %s: %d, %d bytes", path, w.Code, w.Body.Len())
		}
	}
	if w := f.do("GET", "/static/../server.go", "", nil); w.Code == 200 {
		t.Error("only the page's own assets are served")
	}
}

// The page's card is the command line's: the same dial, the same table rows.
func TestThePageCardIsTheCommandLinesCard(t *testing.T) {
	f := newFixture(t)
	e, err := event.Open(event.OpenOptions{Dir: f.dir})
	if err != nil {
		t.Fatal(err)
	}
	in, _, err := entry.GatherRound(e, entry.RoundRequest{}, demoNow)
	if err != nil {
		t.Fatal(err)
	}
	c := prep.Gather(in)
	var printed bytes.Buffer
	if err := prep.RenderHTML(&printed, c); err != nil {
		t.Fatal(err)
	}
	page := f.do("GET", "/", testTokens.Crew, nil).Body.String()
	dial := regexp.MustCompile(`<div class="num">([0-9.]+)</div>`)
	want := dial.FindStringSubmatch(printed.String())
	got := dial.FindStringSubmatch(page)
	if want == nil || got == nil || want[1] != got[1] || want[1] != c.FinalDial.StringFixed(2) {
		t.Fatalf("dial on the page %v, on the printed card %v, computed %s", got, want, c.FinalDial.StringFixed(2))
	}
	rows := regexp.MustCompile(`<tr[^>]*>(?:<td[^>]*>[^<]*</td>)+</tr>`)
	n := 0
	for _, row := range rows.FindAllString(printed.String(), -1) {
		n++
		if !strings.Contains(page, row) {
			t.Errorf("the printed card's row %s is not on the page", row)
		}
	}
	if n < 20 {
		t.Errorf("only %d table rows compared", n)
	}
}

func TestNoTokenNoPage(t *testing.T) {
	f := newFixture(t)
	before := f.snapshot()
	for _, tok := range []string{"", "wrong", strings.Repeat("c", 31), testTokens.Secret} {
		for _, path := range []string{"/", "/reading", "/slip", "/passes", "/weather", "/changes"} {
			if w := f.do("GET", path, tok, nil); w.Code != http.StatusForbidden {
				t.Errorf("GET %s with token %q: %d, want 403", path, tok, w.Code)
			} else if strings.Contains(w.Body.String(), "11.4") {
				t.Errorf("GET %s with token %q: the 403 page leaks the card", path, tok)
			}
		}
		form := url.Values{"temp": {"80F"}, "baro": {"27.6"}, "humidity": {"40%"}, "csrf": {testTokens.CSRF(tok)}}
		if w := f.do("POST", "/reading", tok, form); w.Code != http.StatusForbidden {
			t.Errorf("POST /reading with token %q: %d, want 403", tok, w.Code)
		}
	}
	w := f.do("GET", "/join/"+strings.Repeat("0", 32), "", nil)
	if w.Code != http.StatusForbidden || len(w.Result().Cookies()) > 0 {
		t.Errorf("a wrong join link: %d, cookies %v", w.Code, w.Result().Cookies())
	}
	f.unchanged(before, "requests without a valid token")
}

// A join link opened from another app (a message, a chat's page) is a
// navigation from another site: a redirect's next request is still part of
// that cross-site chain and carries no SameSite=Strict cookie, so the join
// answers a page of its own that continues to the card as a same-origin
// navigation.
func TestJoinKeepsTheTokenInAPrivateCookie(t *testing.T) {
	f := newFixture(t)
	for _, tok := range []string{testTokens.Crew, testTokens.View} {
		w := f.do("GET", "/join/"+tok, "", nil)
		body := w.Body.String()
		if w.Code != http.StatusOK || w.Header().Get("Location") != "" {
			t.Fatalf("join: %d to %q, want 200 and a page of the pit page's own", w.Code, w.Header().Get("Location"))
		}
		if !strings.Contains(body, `<meta http-equiv="refresh" content="0; url=/">`) || !strings.Contains(body, `<a href="/">`) {
			t.Errorf("the join page must continue to the card by itself and offer a link:\n%s", body)
		}
		cs := w.Result().Cookies()
		if len(cs) != 1 || cs[0].Value != tok || !cs[0].HttpOnly || cs[0].SameSite != http.SameSiteStrictMode || cs[0].Path != "/" {
			t.Errorf("cookie %+v: want the token, HttpOnly, SameSite=Strict, Path=/", cs)
		}
	}
}

func TestTheViewLinkOnlyReads(t *testing.T) {
	f := newFixture(t)
	before := f.snapshot()
	page := f.do("GET", "/", testTokens.View, nil)
	if page.Code != 200 || !strings.Contains(page.Body.String(), "View link") || strings.Contains(page.Body.String(), `name="csrf"`) {
		t.Errorf("the view page must say it reads only and carry no form token (%d)", page.Code)
	}
	viewCSRF := testTokens.CSRF(testTokens.View)
	for path, form := range map[string]url.Values{
		"/reading":   {"temp": {"80F"}, "baro": {"27.6"}, "humidity": {"40%"}},
		"/slip":      {"session": {"E3"}, "lane": {"left"}, "et60": {"1.6"}, "et1320": {"11.4"}, "mph1320": {"117"}},
		"/checklist": {"round": {"E3"}, "day": {"2026-06-13"}, "tick": {"Fuel"}},
		"/opponent":  {"round": {"E3"}, "day": {"2026-06-13"}, "opponent-dial": {"11.5"}},
	} {
		form.Set("csrf", viewCSRF)
		if w := f.do("POST", path, testTokens.View, form); w.Code != http.StatusForbidden {
			t.Errorf("POST %s with the view token: %d, want 403", path, w.Code)
		}
	}
	f.unchanged(before, "the view token posting")
}

func TestFormsNeedTheirCSRFToken(t *testing.T) {
	f := newFixture(t)
	before := f.snapshot()
	form := url.Values{"temp": {"80F"}, "baro": {"27.6"}, "humidity": {"40%"}}
	for name, csrf := range map[string]string{"none": "", "wrong": strings.Repeat("0", 32), "the view token's": testTokens.CSRF(testTokens.View)} {
		form.Set("csrf", csrf)
		if w := f.do("POST", "/reading", testTokens.Crew, form); w.Code != http.StatusForbidden {
			t.Errorf("CSRF %s: %d, want 403", name, w.Code)
		}
	}
	form.Set("csrf", testTokens.CSRF(testTokens.Crew))
	r := httptest.NewRequest("POST", "/reading", strings.NewReader(form.Encode()))
	r.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	r.Header.Set("Origin", "http://evil.example")
	r.AddCookie(&http.Cookie{Name: CookieName, Value: testTokens.Crew})
	w := httptest.NewRecorder()
	f.srv.ServeHTTP(w, r)
	if w.Code != http.StatusForbidden {
		t.Errorf("a form from another origin: %d, want 403", w.Code)
	}
	f.unchanged(before, "forms without their CSRF token")
}

func TestOversizeFormsAreRefused(t *testing.T) {
	f := newFixture(t)
	before := f.snapshot()
	huge := url.Values{"temp": {"80F"}, "baro": {"27.6"}, "humidity": {"40%"}, "notes": {strings.Repeat("x", MaxBody)}}
	if w := f.post("/reading", huge); w.Code != http.StatusRequestEntityTooLarge {
		t.Errorf("a %d-byte body: %d, want 413", MaxBody, w.Code)
	}
	long := url.Values{"temp": {strings.Repeat("8", MaxFieldLen+1)}, "baro": {"27.6"}, "humidity": {"40%"}}
	if w := f.post("/reading", long); w.Code != http.StatusRequestEntityTooLarge {
		t.Errorf("a long field: %d, want 413", w.Code)
	}
	many := url.Values{"temp": {"80F"}}
	for i := 0; i <= MaxFields; i++ {
		many.Set("x"+strings.Repeat("y", i%5)+string(rune('a'+i%26))+string(rune('a'+i/26)), "1")
	}
	if w := f.post("/reading", many); w.Code != http.StatusRequestEntityTooLarge {
		t.Errorf("%d fields: %d, want 413", len(many), w.Code)
	}
	f.unchanged(before, "oversize forms")
}

func TestSecurityHeadersAndNothingFromOutside(t *testing.T) {
	f := newFixture(t)
	external := regexp.MustCompile(`(?i)(src|href|action)\s*=\s*"(https?:)?//`)
	for _, path := range []string{"/", "/reading", "/slip", "/passes", "/weather", "/static/pit.css"} {
		w := f.do("GET", path, testTokens.Crew, nil)
		h := w.Header()
		csp := h.Get("Content-Security-Policy")
		if !strings.Contains(csp, "default-src 'none'") || !strings.Contains(csp, "frame-ancestors 'none'") || strings.Contains(csp, "http") {
			t.Errorf("%s: CSP %q", path, csp)
		}
		if h.Get("X-Content-Type-Options") != "nosniff" || h.Get("X-Frame-Options") != "DENY" || h.Get("Referrer-Policy") != "same-origin" {
			t.Errorf("%s: headers %v", path, h)
		}
		if m := external.FindString(w.Body.String()); m != "" {
			t.Errorf("%s links outside: %s", path, m)
		}
		if strings.Contains(w.Body.String(), " style=") {
			t.Errorf("%s has an inline style the CSP would block", path)
		}
	}
}

// fieldError is the message shown under a form's field, or "".
func fieldError(body, name string) string {
	m := regexp.MustCompile(`<p class="msg" id="e-` + regexp.QuoteMeta(name) + `">([^<]*)</p>`).FindStringSubmatch(body)
	if m == nil {
		return ""
	}
	return m[1]
}

// fieldValue is the value a form's text field is shown with.
func fieldValue(body, name string) string {
	m := regexp.MustCompile(`name="` + regexp.QuoteMeta(name) + `" type="text" value="([^"]*)"`).FindStringSubmatch(body)
	if m == nil {
		return "(no field)"
	}
	return m[1]
}

func TestReadingFormTour(t *testing.T) {
	f := newFixture(t)
	good := func() url.Values {
		return url.Values{"temp": {"81.5"}, "baro": {"27.62"}, "baro-kind": {"station"}, "humidity": {"41"}, "wind": {"4"},
			"wind-from": {"180"}, "track-temp": {"88"}, "time": {"20:40"}, "notes": {"after the shade"}}
	}
	form := f.do("GET", "/reading", testTokens.Crew, nil).Body.String()
	if !strings.Contains(form, `placeholder="83.3 °F"`) || !strings.Contains(form, `placeholder="27.61 inHg"`) {
		t.Errorf("the form must show the last reading's values (83.3 °F, 27.61 inHg) as placeholders")
	}
	for _, c := range []struct {
		name, field, value, onField, top string
	}{
		{"not a number", "temp", "warm", "temp", ""},
		{"out of range", "temp", "300F", "temp", ""},
		{"a wrong unit", "baro", "27.6psi", "baro", ""},
		{"impossible humidity", "humidity", "140", "humidity", ""},
		{"a bad time", "time", "25:99", "time", ""},
		{"a bad kind", "baro-kind", "gauge", "baro-kind", ""},
		{"a bad wind direction", "wind-from", "400", "wind-from", ""},
		{"no temperature", "temp", "", "", "“Air temperature” is required"},
		{"humidity and dew point both", "dewpoint", "50", "", "give “Relative humidity” or “Dew point (instead of humidity)”, not both"},
	} {
		before := f.snapshot()
		v := good()
		v.Set(c.field, c.value)
		w := f.post("/reading", v)
		body := w.Body.String()
		if w.Code != http.StatusUnprocessableEntity {
			t.Errorf("%s: %d, want 422", c.name, w.Code)
		}
		if c.onField != "" {
			if msg := fieldError(body, c.onField); msg == "" || strings.Contains(msg, "--") {
				t.Errorf("%s: the message must be under the %s field, in the form's words: %q", c.name, c.onField, msg)
			}
		}
		if c.top != "" && !strings.Contains(body, html.EscapeString(c.top)) {
			t.Errorf("%s: the top message must say %q:\n%s", c.name, c.top, regexp.MustCompile(`<p class="error"[^>]*>[^<]*`).FindString(body))
		}
		if c.field != "notes" && fieldValue(body, "notes") != "after the shade" && c.field != "baro-kind" {
			t.Errorf("%s: the other fields must be kept (notes %q)", c.name, fieldValue(body, "notes"))
		}
		f.unchanged(before, c.name)
	}
	before := f.file(event.WeatherFile)
	w := f.post("/reading", good())
	if w.Code != http.StatusSeeOther || !strings.HasPrefix(w.Header().Get("Location"), "/?saved=reading") {
		t.Fatalf("a good reading: %d to %q\n%s", w.Code, w.Header().Get("Location"), w.Body)
	}
	after := f.file(event.WeatherFile)
	if !strings.Contains(after, "2026-06-13,20:40:00,81.5,27.62") || strings.Count(after, "\n") != strings.Count(before, "\n")+1 {
		t.Errorf("weather.csv must gain the one reading:\n%s", after)
	}
	if !strings.Contains(f.log.String(), "reading 20:40 added") {
		t.Errorf("the terminal must hear of the write: %q", f.log.String())
	}
	card := f.do("GET", "/?saved=reading", testTokens.Crew, nil).Body.String()
	if !strings.Contains(card, "The reading is saved") || !strings.Contains(card, "read 20:40") {
		t.Errorf("the card must use the new reading and say it is saved")
	}
	// The same minute again: refused, with the choice to replace it.
	v := good()
	v.Set("temp", "82")
	w = f.post("/reading", v)
	if w.Code != http.StatusUnprocessableEntity || !strings.Contains(w.Body.String(), `name="replace"`) {
		t.Fatalf("a second reading at 20:40: %d, it must offer to replace", w.Code)
	}
	v.Set("replace", "yes")
	if w = f.post("/reading", v); w.Code != http.StatusSeeOther {
		t.Fatalf("replacing: %d\n%s", w.Code, w.Body)
	}
	if got := f.file(event.WeatherFile); !strings.Contains(got, "2026-06-13,20:40:00,82,") || strings.Contains(got, "20:40:00,81.5") {
		t.Errorf("the 20:40 reading must be replaced:\n%s", got)
	}
}

// A decimal comma (a phone set to a European language offers one) is
// answered with how to type the figure, as typed, not lowercased.
func TestADecimalCommaSaysHowToTypeIt(t *testing.T) {
	f := newFixture(t)
	for _, c := range []struct{ field, typed, want string }{
		{"temp", "82,5F", "82.5F"},
		{"baro", "27,62", "27.62"},
		{"humidity", "41,5", "41.5"},
	} {
		t.Run(c.field, func(t *testing.T) {
			v := url.Values{"temp": {"82F"}, "baro": {"27.62"}, "humidity": {"41"}}
			v.Set(c.field, c.typed)
			body := f.post("/reading", v).Body.String()
			msg := html.UnescapeString(fieldError(body, c.field))
			if !strings.Contains(msg, `"`+c.typed+`"`) || !strings.Contains(msg, "decimal point") || !strings.Contains(msg, c.want) {
				t.Errorf("%s typed as %q: the message %q must quote it as typed and show it with a decimal point (%s)", c.field, c.typed, msg, c.want)
			}
		})
	}
}

func slip() url.Values {
	return url.Values{"session": {"E3"}, "lane": {"left"}, "dial": {"11.40"}, "rt": {".024"}, "et60": {"1.602"},
		"et330": {"4.655"}, "et660": {"7.268"}, "mph660": {"94.02"}, "et1000": {"9.494"}, "et1320": {"11.431"},
		"mph1320": {"117.61"}, "time": {"20:48"}, "notes": {"good launch"}}
}

func TestSlipFormTour(t *testing.T) {
	f := newFixture(t)
	card := f.do("GET", "/", testTokens.Crew, nil).Body.String()
	posted := regexp.MustCompile(`<div class="num">([0-9.]+)</div>`).FindStringSubmatch(card)
	if posted == nil {
		t.Fatal("the card page shows no posted dial")
	}
	page := f.do("GET", "/slip", testTokens.Crew, nil).Body.String()
	if fieldValue(page, "session") != "E3" || !strings.Contains(page, `value="left" checked`) || fieldValue(page, "dial") != posted[1] {
		t.Errorf("the slip must be preselected: session %q, dial %q (the card posts %s), left lane checked %v", fieldValue(page, "session"),
			fieldValue(page, "dial"), posted[1], strings.Contains(page, `value="left" checked`))
	}
	for _, c := range []struct {
		name, field, value, onField, top string
	}{
		{"a bad reaction time", "rt", "quick", "rt", ""},
		{"an ET out of range", "et1320", "0.4", "et1320", ""},
		{"the 1/8 slower than the 1/4", "et660", "11.9", "", ""},
		{"a trap speed that cannot be", "mph1320", "400", "mph1320", ""},
		{"no lane", "lane", "", "", "“Lane” are required"},
		{"a bad session", "session", "Q7", "session", ""},
		{"a bad time", "time", "7pm", "time", ""},
		{"half the other lane's slip", "opponent-dial", "11.50", "", "give the other lane's slip whole"},
	} {
		before := f.snapshot()
		v := slip()
		v.Set(c.field, c.value)
		w := f.post("/slip", v)
		body := w.Body.String()
		if w.Code != http.StatusUnprocessableEntity {
			t.Errorf("%s: %d, want 422", c.name, w.Code)
		}
		if c.onField != "" && fieldError(body, c.onField) == "" {
			t.Errorf("%s: no message under %s:\n%s", c.name, c.onField, regexp.MustCompile(`<p class="error"[^>]*>[^<]*`).FindString(body))
		}
		if c.onField == "" && c.top == "" && !strings.Contains(body, `class="msg"`) && !strings.Contains(body, `class="error"`) {
			t.Errorf("%s: no message at all", c.name)
		}
		if c.top != "" && !strings.Contains(body, html.EscapeString(c.top)) {
			t.Errorf("%s: want %q in\n%s", c.name, c.top, regexp.MustCompile(`<p class="error"[^>]*>[^<]*`).FindString(body))
		}
		if c.field != "notes" && fieldValue(body, "notes") != "good launch" {
			t.Errorf("%s: the other fields must be kept", c.name)
		}
		f.unchanged(before, c.name)
	}
	v := slip()
	v.Set("opponent-dial", "11.52")
	v.Set("opponent-rt", ".041")
	v.Set("opponent-et", "11.561")
	w := f.post("/slip", v)
	if w.Code != http.StatusSeeOther {
		t.Fatalf("a good slip: %d, want 303 to its result\n%s", w.Code, w.Body)
	}
	body := f.do("GET", w.Header().Get("Location"), testTokens.Crew, nil).Body.String()
	if !strings.Contains(body, "Logged round 3, left lane, at 20:48: 11.431 s") || !strings.Contains(body, "You won") {
		t.Fatalf("a good slip with the other lane's:\n%s", body)
	}
	if lb := f.file(event.LogbookFile); !strings.Contains(lb, "2026-06-13,20:48,Juniper Bend Raceway,E3,left,11.40,0.024,1.602") {
		t.Errorf("the logbook must hold the pass:\n%s", lb[len(lb)-400:])
	}
	// The same slip twice: refused, nothing written.
	before := f.snapshot()
	if w := f.post("/slip", slip()); w.Code != http.StatusUnprocessableEntity || !strings.Contains(w.Body.String(), "already in") {
		t.Errorf("the same slip twice: %d", w.Code)
	}
	f.unchanged(before, "the same slip twice")
	// The card moves on to the next round, and today's passes show it.
	if page := f.do("GET", "/", testTokens.Crew, nil).Body.String(); !strings.Contains(page, "Round 4") {
		t.Error("after E3's slip the card must be for round 4")
	}
	passes := f.do("GET", "/passes", testTokens.Crew, nil).Body.String()
	if !strings.Contains(passes, "E3 20:48 (good launch)") || !strings.Contains(passes, "11.431") {
		t.Errorf("today's passes must list E3:\n%s", passes)
	}
}

func TestChecklistAndTheOtherLane(t *testing.T) {
	f := newFixture(t)
	page := f.do("GET", "/", testTokens.Crew, nil).Body.String()
	if !strings.Contains(page, `name="tick" value="Tire pressures set"`) {
		t.Fatalf("the card's checklist must be boxes to tick")
	}
	w := f.post("/checklist", url.Values{"round": {"E3"}, "day": {"2026-06-13"}, "tick": {"Tire pressures set", "Fuel for the round (and the return road)"}})
	if w.Code != http.StatusSeeOther {
		t.Fatalf("ticking: %d %s", w.Code, w.Body)
	}
	page = f.do("GET", "/?round=E3", testTokens.Crew, nil).Body.String()
	if !strings.Contains(page, `value="Tire pressures set" checked`) || !strings.Contains(page, "(ticked 20:31)") {
		t.Errorf("ticked boxes must stay ticked, with their time")
	}
	if p := f.do("GET", "/?round=E4", testTokens.Crew, nil).Body.String(); strings.Contains(p, " checked>") {
		t.Errorf("round 4's checklist starts empty")
	}
	if w := f.post("/opponent", url.Values{"round": {"E3"}, "day": {"2026-06-13"}, "opponent-dial": {"11.62"}}); w.Code != http.StatusSeeOther {
		t.Fatalf("the other lane's dial: %d %s", w.Code, w.Body)
	}
	page = f.do("GET", "/?round=E3&saved=opponent", testTokens.Crew, nil).Body.String()
	if !strings.Contains(page, "To win") || !strings.Contains(page, `value="11.62"`) {
		t.Errorf("with the other lane's dial the card shows the chance to win")
	}
	if p := f.do("GET", "/?round=T2", testTokens.Crew, nil).Body.String(); strings.Contains(p, `id="opponent"`) {
		t.Errorf("a time trial has no other lane to enter")
	}
	if slipPage := f.do("GET", "/slip", testTokens.Crew, nil).Body.String(); fieldValue(slipPage, "opponent-dial") != "11.62" {
		t.Errorf("the slip must be preselected with the other lane's dial: %q", fieldValue(slipPage, "opponent-dial"))
	}
	before := f.snapshot()
	w = f.post("/opponent", url.Values{"round": {"E3"}, "day": {"2026-06-13"}, "opponent-dial": {"eleven"}})
	if w.Code != http.StatusUnprocessableEntity || fieldError(w.Body.String(), "opponent-dial") == "" {
		t.Errorf("a bad dial: %d, message %q", w.Code, fieldError(w.Body.String(), "opponent-dial"))
	}
	// The refused form names its round and keeps the day as it came: the
	// day is the round's, not a choice of one.
	if body := w.Body.String(); !strings.Contains(body, "<h1>The other lane, round 3, 2026-06-13</h1>") ||
		strings.Contains(body, `<select id="f-day"`) || !strings.Contains(body, `<input type="hidden" name="day" value="2026-06-13">`) {
		t.Errorf("the refused other-lane form must name round 3 and its day, and keep the day hidden:\n%s", body)
	}
	if w := f.post("/checklist", url.Values{"round": {"Q"}, "day": {"2026-06-13"}}); w.Code != http.StatusUnprocessableEntity {
		t.Errorf("a bad round: %d", w.Code)
	}
	if w := f.post("/checklist", url.Values{"round": {"E3"}, "day": {"June"}}); w.Code != http.StatusUnprocessableEntity {
		t.Errorf("a bad day: %d", w.Code)
	}
	f.unchanged(before, "bad checklist and dial forms")
}

func TestWeatherPageShowsTheTrend(t *testing.T) {
	f := newFixture(t)
	body := f.do("GET", "/weather", testTokens.View, nil).Body.String()
	for _, want := range []string{"20:30", "83.3 °F", "At the 20:45 call (round 3): density altitude", "Trend of "} {
		if !strings.Contains(body, want) {
			t.Errorf("the weather page lacks %q", want)
		}
	}
}

// The refresh stamp changes with the folder and only then.
func TestChangesFollowTheFolder(t *testing.T) {
	f := newFixture(t)
	a := f.do("GET", "/changes", testTokens.View, nil).Body.String()
	if b := f.do("GET", "/changes", testTokens.View, nil).Body.String(); a != b {
		t.Errorf("no change, a new stamp: %s %s", a, b)
	}
	time.Sleep(10 * time.Millisecond)
	if w := f.post("/reading", url.Values{"temp": {"80"}, "baro": {"27.6"}, "humidity": {"40"}, "time": {"20:50"}}); w.Code != http.StatusSeeOther {
		t.Fatal(w.Code, w.Body)
	}
	if b := f.do("GET", "/changes", testTokens.View, nil).Body.String(); a == b {
		t.Errorf("a new reading must change the stamp")
	}
}

func TestABrokenFolderStillAnswers(t *testing.T) {
	f := newFixture(t)
	if err := os.WriteFile(filepath.Join(f.dir, event.SettingsFile), []byte("units: furlongs\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	w := f.do("GET", "/", testTokens.Crew, nil)
	if w.Code != 200 || !strings.Contains(w.Body.String(), "pitcard.yaml") || !strings.Contains(w.Body.String(), "furlongs") {
		t.Errorf("a broken pitcard.yaml must be named on the page: %d\n%s", w.Code, w.Body)
	}
}

func TestTokensFile(t *testing.T) {
	dir := t.TempDir()
	a, made, err := LoadTokens(dir, false)
	if err != nil || !made {
		t.Fatal(err, made)
	}
	st, err := os.Stat(filepath.Join(dir, event.TokensFile))
	if err != nil || st.Mode().Perm() != 0o600 {
		t.Fatalf("the tokens file must be mode 0600: %v %v", st.Mode(), err)
	}
	b, made, err := LoadTokens(dir, false)
	if err != nil || made || b != a {
		t.Errorf("a second start must keep the tokens: %v %v", made, err)
	}
	if len(a.Crew) != 32 || a.Crew == a.View || a.View == a.Secret {
		t.Errorf("tokens %+v", a)
	}
	c, made, err := LoadTokens(dir, true)
	if err != nil || !made || c.Crew == a.Crew || c.View == a.View {
		t.Errorf("--new-tokens must revoke both: %v", err)
	}
	if c.RoleOf(a.Crew) != Nobody || c.RoleOf(c.Crew) != Crew || c.RoleOf(c.View) != Viewer {
		t.Error("roles of old and new tokens")
	}
	if err := os.Chmod(filepath.Join(dir, event.TokensFile), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, _, err := LoadTokens(dir, false); err != nil {
		t.Fatal(err)
	}
	if st, _ := os.Stat(filepath.Join(dir, event.TokensFile)); st.Mode().Perm() != 0o600 {
		t.Errorf("a tokens file readable by others must be made private again: %v", st.Mode())
	}
	if err := os.WriteFile(filepath.Join(dir, event.TokensFile), []byte("crew: short\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	if _, _, err := LoadTokens(dir, false); err == nil || !strings.Contains(err.Error(), "line 1") {
		t.Errorf("a broken tokens file must be named with its line: %v", err)
	}
}

// A limit the crew entered that the prediction breaks stops the dial on the
// phone as on paper: STOP in the dial's type, what failed against which limit.
func TestAFailedCheckStopsThePagesDial(t *testing.T) {
	f := newFixture(t)
	car := filepath.Join(f.dir, event.CarFile)
	data, err := os.ReadFile(car)
	if err != nil || !strings.Contains(string(data), "limit_et: 10.65") {
		t.Fatalf("car.yaml: %v", err)
	}
	if err := os.WriteFile(car, []byte(strings.Replace(string(data), "limit_et: 10.65", "limit_et: 11.50", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	body := f.do("GET", "/", testTokens.Crew, nil).Body.String()
	dial := body[strings.Index(body, `<div class="dial">`):]
	dial = dial[:strings.Index(dial, "</div>\n")+1]
	if !strings.Contains(dial, `<div class="num stop">STOP</div>`) || !strings.Contains(dial, "A CHECK FAILED: ET limit") ||
		!strings.Contains(dial, "1/4 mile limit of 11.50 s") || strings.Contains(dial, "POST THIS DIAL-IN") {
		t.Errorf("the page's dial box:\n%s", dial)
	}
}

// A warning that changes what the crew should believe (the schedule is
// another day's, the reading is old) sits in the dial's box, read with the
// dial, not below the card.
func TestWarningsSitWithTheDial(t *testing.T) {
	f := newFixture(t)
	f.srv.cfg.Now = func() time.Time { return demoNow.Add(26 * time.Hour) }
	body := f.do("GET", "/", testTokens.Crew, nil).Body.String()
	dial := regexp.MustCompile(`(?s)<div class="dial">.*?<div class="chart">`).FindString(body)
	if !strings.Contains(dial, "schedule.yaml is for 2026-06-13, not today") {
		t.Errorf("the schedule's warning must be in the dial's box, before the chart:\n%s", dial)
	}
	if strings.Count(body, "schedule.yaml is for 2026-06-13") != 1 {
		t.Errorf("the warning must be said once")
	}
}

// What a screen reader needs of the pages (the rest axe-core checks in the
// browser test): sections as headings, the current tab named, help tied to
// its field, the focus on the first bad field of a refused form, and the
// news of new data said politely.
func TestThePagesSpeakToAScreenReader(t *testing.T) {
	f := newFixture(t)
	card := f.do("GET", "/", testTokens.Crew, nil).Body.String()
	for _, want := range []string{"<h2>Air</h2>", "<h2>Checklist</h2>", `<a href="/?round=E3" class="here" aria-current="page">Card</a>`,
		`id="changed" class="live" role="status" aria-live="polite"`} {
		if !strings.Contains(card, want) {
			t.Errorf("the card page lacks %s", want)
		}
	}
	if strings.Contains(card, "<caption>") || strings.Contains(card, "<th></th>") || strings.Contains(card, `<th class="n"></th>`) {
		t.Errorf("the card's sections are headings, not captions, and no header cell is empty")
	}
	reading := f.do("GET", "/reading", testTokens.Crew, nil).Body.String()
	if !regexp.MustCompile(`<select id="f-baro-kind" name="baro-kind" aria-describedby="h-baro-kind">`).MatchString(reading) ||
		!strings.Contains(reading, `<p class="help" id="h-baro-kind">`) {
		t.Errorf("a field's help must be tied to it with aria-describedby")
	}
	w := f.post("/reading", url.Values{"temp": {"80"}, "baro": {"27.6x"}, "humidity": {"140"}})
	body := w.Body.String()
	if !strings.Contains(body, `id="f-baro" name="baro"`) || strings.Count(body, " autofocus") != 1 ||
		!regexp.MustCompile(`<input id="f-baro"[^>]* autofocus`).MatchString(body) {
		t.Errorf("a refused form must put the focus on its first bad field (baro), only there")
	}
}

// The passes page cuts each of today's passes into its segments: times
// that are the differences of the slip's timers, the launch 2·60/t² in g
// (common practice, no source; g = 32.174 ft/s², ISO 80000-3), and the
// note that an average is below a data logger's peak.
func TestPassesPageShowsTheSegments(t *testing.T) {
	f := newFixture(t) // a copy of the demo, at its evening of 2026-06-13
	body := f.do("GET", "/passes", testTokens.Crew, nil).Body.String()
	for _, w := range []string{"E2 20:13: segments", "0–60 ft", "1000–1320 ft", "below the peak a data logger shows", "SAE J1349"} {
		if !strings.Contains(body, w) {
			t.Errorf("the passes page lacks %q", w)
		}
	}
	// The demo's E2 of 2026-06-13 as its slip reads in logbook.csv.
	var et60, et330 float64
	for _, line := range strings.Split(f.file(event.LogbookFile), "\n") {
		if strings.HasPrefix(line, "2026-06-13,20:13,") {
			c := strings.Split(line, ",")
			et60, _ = strconv.ParseFloat(c[7], 64)
			et330, _ = strconv.ParseFloat(c[8], 64)
		}
	}
	if et60 == 0 {
		t.Fatal("the demo has no E2 at 20:13 on 2026-06-13")
	}
	launch := fmt.Sprintf("Launch %.2f g over the first 60 ft from rest.", 2*60/(et60*et60)/32.174)
	seg := fmt.Sprintf("<td>60–330 ft</td><td class=\"n\">%.3f</td>", et330-et60)
	for _, w := range []string{launch, seg} {
		if !strings.Contains(body, w) {
			t.Errorf("the passes page lacks %q", w)
		}
	}
}
