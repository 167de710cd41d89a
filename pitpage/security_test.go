package pitpage

import (
	"fmt"
	"net/http"
	"net/http/httptest"
	"net/url"
	"strings"
	"testing"
	"time"
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
