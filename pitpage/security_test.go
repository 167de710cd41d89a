package pitpage

import (
	"fmt"
	"net"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"pitcard/event"
)

// Whatever a request sends reaches the laptop's terminal as printable text
// on one line: no escape sequence (clear screen, colour, title) and no
// forged line of its own.
func TestTheLogTakesNoControlCharactersFromARequest(t *testing.T) {
	f := newFixture(t)
	f.do("GET", "/join/%1b%5b2J%1b%5b1%3b31mRED%0a20:31:00%20reading%2012:20%20added%20by%20the%20crew%20from%2010.0.0.9", "", nil)
	r := httptest.NewRequest("POST", "/reading", strings.NewReader("temp=80"))
	r.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	r.Header["Origin"] = []string{"http://evil.example\x1b]0;pwned\x07\n20:31:00 a phone joined"}
	r.AddCookie(&http.Cookie{Name: CookieName, Value: testTokens.Crew})
	r.RemoteAddr = "192.0.2.2:1234" // another address: its refusal is logged, not counted with the first's
	f.srv.ServeHTTP(httptest.NewRecorder(), r)
	log := f.log.String()
	if strings.ContainsAny(log, "\x1b\x07\r") {
		t.Errorf("a control character reached the log: %q", log)
	}
	if n := strings.Count(log, "\n"); n != 2 {
		t.Errorf("two refused requests, %d log lines: %q", n, log)
	}
	for _, line := range strings.Split(strings.TrimSuffix(log, "\n"), "\n") {
		if !strings.HasPrefix(line, "20:31:00 refused ") {
			t.Errorf("a line the server did not write: %q", line)
		}
	}
}

// 9,000 requests with a wrong token from one address write one line, and
// their count when the minute is over: the crew's writes stay readable.
func TestRepeatedRefusalsAreGrouped(t *testing.T) {
	f := newFixture(t)
	for i := 0; i < 9000; i++ {
		f.do("GET", "/", fmt.Sprintf("%032x", i), nil)
	}
	if n := strings.Count(f.log.String(), "\n"); n != 1 {
		t.Fatalf("9,000 refusals from one address wrote %d lines", n)
	}
	if w := f.post("/reading", url.Values{"temp": {"80"}, "baro": {"27.6"}, "humidity": {"40"}, "time": {"20:50"}}); w.Code != http.StatusSeeOther {
		t.Fatal(w.Code, w.Body)
	}
	f.srv.cfg.Now = func() time.Time { return demoNow.Add(61 * time.Second) }
	f.do("GET", "/", "wrong", nil)
	lines := strings.Split(strings.TrimSuffix(f.log.String(), "\n"), "\n")
	if len(lines) != 4 || !strings.Contains(lines[1], "reading 20:50 added") ||
		!strings.Contains(lines[2], "refused 8999 more requests from 192.0.2.1 since 20:31:00") || !strings.Contains(lines[3], "refused GET / from 192.0.2.1") {
		t.Errorf("the log after a minute:\n%s", f.log.String())
	}
}

// The slip's post answers with a redirect (a reload shows the result, it
// does not post again), and the very same form posted again within minutes
// (a reload of an old page, a second tap) is refused in words.
func TestASlipIsLoggedOnceWhateverIsReloaded(t *testing.T) {
	f := newFixture(t)
	v := slip()
	v.Del("time") // the pass at the time it is posted: nothing else tells a second post from a second pass
	w := f.post("/slip", v)
	loc := w.Header().Get("Location")
	if w.Code != http.StatusSeeOther || !strings.HasPrefix(loc, "/slip?") {
		t.Fatalf("a slip's post: %d to %q, want 303 to its result", w.Code, loc)
	}
	page := f.do("GET", loc, testTokens.Crew, nil).Body.String()
	if !strings.Contains(page, "Logged round 3, left lane, at 20:31: 11.431 s") || strings.Contains(page, `name="csrf"`) {
		t.Errorf("the result page:\n%s", page)
	}
	if again := f.do("GET", loc, testTokens.Crew, nil).Body.String(); again != page {
		t.Errorf("the result must read the same on a reload")
	}
	before := f.snapshot()
	for _, later := range []time.Duration{time.Minute, 9 * time.Minute} {
		f.srv.cfg.Now = func() time.Time { return demoNow.Add(later) }
		w = f.post("/slip", v)
		if body := w.Body.String(); w.Code != http.StatusUnprocessableEntity || !strings.Contains(body, "this same slip was logged at 20:31") {
			t.Errorf("the same slip again %v later: %d\n%s", later, w.Code, body)
		}
	}
	f.unchanged(before, "the same slip posted again")
	// A second pass is another form: its own figures, or its time of day.
	v.Set("time", "20:58")
	f.srv.cfg.Now = func() time.Time { return demoNow.Add(27 * time.Minute) }
	if w := f.post("/slip", v); w.Code != http.StatusSeeOther {
		t.Errorf("the same figures with their own time: %d\n%s", w.Code, w.Body)
	}
}

// A form is taken only from the page's own origin: the same scheme and
// host as the request, never "null" (a sandboxed frame, a data: page).
func TestFormsComeFromThePagesOwnOrigin(t *testing.T) {
	for _, c := range []struct {
		origin string
		code   int
	}{
		{"", http.StatusSeeOther}, // an older browser or a script: the cookie and CSRF token guard it
		{"http://example.com", http.StatusSeeOther},
		{"http://example.com:80", http.StatusSeeOther},
		{"null", http.StatusForbidden},
		{"https://example.com", http.StatusForbidden},
		{"ftp://example.com", http.StatusForbidden},
		{"http://example.com:8080", http.StatusForbidden},
		{"http://evil.example", http.StatusForbidden},
		{"http://example.com.evil.example", http.StatusForbidden},
	} {
		t.Run(c.origin, func(t *testing.T) {
			f := newFixture(t)
			before := f.snapshot()
			form := url.Values{"temp": {"80"}, "baro": {"27.6"}, "humidity": {"40"}, "time": {"20:50"}, "csrf": {testTokens.CSRF(testTokens.Crew)}}
			r := httptest.NewRequest("POST", "/reading", strings.NewReader(form.Encode()))
			r.Header.Set("Content-Type", "application/x-www-form-urlencoded")
			if c.origin != "" {
				r.Header.Set("Origin", c.origin)
			}
			r.AddCookie(&http.Cookie{Name: CookieName, Value: testTokens.Crew})
			w := httptest.NewRecorder()
			f.srv.ServeHTTP(w, r)
			if w.Code != c.code {
				t.Errorf("Origin %q: %d, want %d", c.origin, w.Code, c.code)
			}
			if c.code == http.StatusForbidden {
				f.unchanged(before, "a form from another origin")
			}
		})
	}
}

// Only the names the page is served at are answered: a site that points its
// own name at the laptop's address (DNS rebinding) gets nothing.
func TestOnlyTheServedHostIsAnswered(t *testing.T) {
	f := newFixture(t)
	f.srv.cfg.Hosts = []string{"192.168.1.20:8080", "localhost:8080", "pit-laptop.local:8080"}
	for _, c := range []struct {
		host string
		code int
	}{
		{"192.168.1.20:8080", http.StatusOK},
		{"LOCALHOST:8080", http.StatusOK},
		{"pit-laptop.local:8080", http.StatusOK},
		{"10.0.0.7:8080", http.StatusOK}, // an address no other site can make a phone send: the laptop's on another network
		{"[fe80::1]:8080", http.StatusOK},
		{"evil.example:8080", http.StatusForbidden},
		{"evil.example", http.StatusForbidden},
		{"192.168.1.20:9999", http.StatusForbidden},
		{"192.168.1.20", http.StatusForbidden},
		{"", http.StatusForbidden},
	} {
		r := httptest.NewRequest("GET", "/", nil)
		r.Host = c.host
		r.AddCookie(&http.Cookie{Name: CookieName, Value: testTokens.Crew})
		w := httptest.NewRecorder()
		f.srv.ServeHTTP(w, r)
		if w.Code != c.code {
			t.Errorf("Host %q: %d, want %d", c.host, w.Code, c.code)
		}
	}
}

// The checklist takes only the round's own items to tick, on the round's
// own day: a label the card does not offer, a rule's pass line or another
// day is refused and nothing is written.
func TestTheChecklistTakesOnlyTheRoundsItems(t *testing.T) {
	f := newFixture(t)
	for _, c := range []struct {
		name       string
		round, day string
		ticks      []string
		want       string
	}{
		{"a label of no item", "E3", "2026-06-13", []string{"Tire pressures set", "Open the hood at the line"}, `checklist item "Open the hood at the line" is not one of round 3's items to tick`},
		{"a check the rules passed, not one to tick", "E3", "2026-06-13", []string{"Parachute"}, `checklist item "Parachute" is not one of round 3's items`},
		{"another day", "E3", "2026-06-12", []string{"Tire pressures set"}, `day "2026-06-12" is not the round's day: round 3's card is for 2026-06-13`},
		{"a day far off", "E3", "1999-01-01", nil, `day "1999-01-01" is not the round's day`},
	} {
		t.Run(c.name, func(t *testing.T) {
			before := f.snapshot()
			w := f.post("/checklist", url.Values{"round": {c.round}, "day": {c.day}, "tick": c.ticks})
			if w.Code != http.StatusUnprocessableEntity || !strings.Contains(w.Body.String(), c.want) {
				t.Errorf("%d %s, want 422 saying %q", w.Code, w.Body, c.want)
			}
			f.unchanged(before, c.name)
		})
	}
	if w := f.post("/checklist", url.Values{"round": {"E3"}, "day": {"2026-06-13"}, "tick": {"Tire pressures set"}}); w.Code != http.StatusSeeOther {
		t.Errorf("the round's own item: %d %s", w.Code, w.Body)
	}
}

// timeoutBody is a form body whose connection timed out, as the server's
// socket says it.
type timeoutBody struct{}

func (timeoutBody) Read([]byte) (int, error) {
	return 0, &net.OpError{Op: "read", Net: "tcp", Source: &net.TCPAddr{IP: net.IPv4(127, 0, 0, 1), Port: 8080},
		Addr: &net.TCPAddr{IP: net.IPv4(127, 0, 0, 1), Port: 44336}, Err: os.ErrDeadlineExceeded}
}

// A phone is told what happened in words, never the laptop's folder path
// or a socket's addresses.
func TestPhonesSeeNoPathsOrSockets(t *testing.T) {
	f := newFixture(t)
	abs, err := filepath.Abs(f.dir)
	if err != nil {
		t.Fatal(err)
	}
	leaks := func(name, body string, want ...string) {
		t.Helper()
		for _, bad := range []string{abs, f.dir, filepath.Dir(f.dir), "127.0.0.1", "tcp"} {
			if strings.Contains(body, bad) {
				t.Errorf("%s shows %q:\n%s", name, bad, body)
			}
		}
		for _, w := range want {
			if !strings.Contains(body, w) {
				t.Errorf("%s must say %q:\n%s", name, w, body)
			}
		}
	}
	if w := f.post("/slip", slip()); w.Code != http.StatusSeeOther {
		t.Fatal(w.Code, w.Body)
	}
	v := slip()
	v.Set("notes", "again") // another form, the same pass: the logbook's own check
	w := f.post("/slip", v)
	leaks("the same pass twice", w.Body.String(), "already in logbook.csv at line")

	r := httptest.NewRequest("POST", "/reading", timeoutBody{})
	r.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	r.AddCookie(&http.Cookie{Name: CookieName, Value: testTokens.Crew})
	rec := httptest.NewRecorder()
	f.srv.ServeHTTP(rec, r)
	leaks("a form whose connection timed out", rec.Body.String(), "Nothing was written", "in time")

	// The schedule of another day: its warning names the file, not where it is.
	f.srv.cfg.Now = func() time.Time { return demoNow.Add(24 * time.Hour) }
	leaks("the card a day later", f.do("GET", "/", testTokens.Crew, nil).Body.String(), "schedule.yaml is for 2026-06-13, not today")

	if err := os.WriteFile(filepath.Join(f.dir, event.SettingsFile), []byte("units: furlongs\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, path := range []string{"/", "/weather", "/passes", "/slip", "/reading"} {
		leaks("a broken pitcard.yaml on "+path, f.do("GET", path, testTokens.Crew, nil).Body.String(), "pitcard.yaml")
	}
}

// A note typed on a phone that begins like a formula is kept as text in
// weather.csv and logbook.csv (a spreadsheet shows it, does not run it),
// and the pages show it as typed.
func TestNotesThatLookLikeFormulasStayText(t *testing.T) {
	f := newFixture(t)
	if w := f.post("/reading", url.Values{"temp": {"80"}, "baro": {"27.6"}, "humidity": {"40"}, "time": {"20:50"}, "notes": {"=1+2"}}); w.Code != http.StatusSeeOther {
		t.Fatal(w.Code, w.Body)
	}
	v := slip()
	v.Set("notes", "@SUM(A1:A2)")
	if w := f.post("/slip", v); w.Code != http.StatusSeeOther {
		t.Fatal(w.Code, w.Body)
	}
	if w := f.file(event.WeatherFile); !strings.Contains(w, ",'=1+2\n") {
		t.Errorf("weather.csv must hold the note as text:\n%s", w)
	}
	if lb := f.file(event.LogbookFile); !strings.Contains(lb, ",'@SUM(A1:A2)\n") {
		t.Errorf("logbook.csv must hold the note as text:\n%s", lb[len(lb)-300:])
	}
	if p := f.do("GET", "/passes", testTokens.Crew, nil).Body.String(); !strings.Contains(p, "E3 20:48 (@SUM(A1:A2))") {
		t.Errorf("the passes page must show the note as typed")
	}
}

// A confirmation the page never handed out does not claim a pass was
// logged.
func TestAnUnknownSlipConfirmationClaimsNothing(t *testing.T) {
	f := newFixture(t)
	body := f.do("GET", "/slip?logged=deadbeef", testTokens.Crew, nil).Body.String()
	if strings.Contains(body, "The pass is logged") || !strings.Contains(body, "No such confirmation") {
		t.Errorf("an unknown confirmation:\n%s", body)
	}
}

// A form refused for its content (422) is heard on the laptop too, like a
// refused token: the terminal hears every refusal.
func TestARefusedFormIsLogged(t *testing.T) {
	f := newFixture(t)
	form := url.Values{"temp": {"abc"}, "baro": {"27.6"}, "humidity": {"40%"}}
	if w := f.post("/reading", form); w.Code != http.StatusUnprocessableEntity {
		t.Fatalf("a bad reading: %d", w.Code)
	}
	if !strings.Contains(f.log.String(), "refused POST /reading") || !strings.Contains(f.log.String(), "temp") {
		t.Errorf("the log:\n%s", f.log.String())
	}
}
