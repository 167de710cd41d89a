package main

import (
	"bytes"
	"io"
	"net/http"
	"net/http/cookiejar"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"pitcard/event"
)

// lockedBuffer is a bytes.Buffer a server goroutine writes while the test reads.
type lockedBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}
func (l *lockedBuffer) String() string { l.mu.Lock(); defer l.mu.Unlock(); return l.b.String() }

// serveFor starts 'pitcard serve' with args until the test ends and returns
// its crew and view links and what it printed so far.
func serveFor(t *testing.T, args ...string) (crew, view string, out *lockedBuffer) {
	t.Helper()
	out = &lockedBuffer{}
	stop := make(chan struct{})
	done := make(chan int, 1)
	s := &IOStreams{In: strings.NewReader(""), Out: out, Err: out, Now: func() time.Time { return fixedNow }, Stop: stop}
	base := []string{"serve", "--addr", "127.0.0.1:0"}
	if !slices.Contains(args, "--qr") {
		base = append(base, "--no-qr")
	} else {
		args = slices.DeleteFunc(slices.Clone(args), func(a string) bool { return a == "--qr" })
	}
	go func() { done <- run(append(base, args...), s) }()
	link := regexp.MustCompile(`(crew|view) \(reads[^:]*:\s+(http://\S+)`)
	for deadline := time.Now().Add(10 * time.Second); time.Now().Before(deadline); time.Sleep(20 * time.Millisecond) {
		if m := link.FindAllStringSubmatch(out.String(), -1); len(m) == 2 {
			crew, view = m[0][2], m[1][2]
			break
		}
		select {
		case code := <-done:
			t.Fatalf("serve exited %d:\n%s", code, out.String())
		default:
		}
	}
	if crew == "" {
		t.Fatalf("serve printed no links:\n%s", out.String())
	}
	t.Cleanup(func() {
		close(stop)
		if code := <-done; code != 0 {
			t.Errorf("serve exited %d:\n%s", code, out.String())
		}
	})
	return crew, view, out
}

func get(t *testing.T, url string) (int, string) {
	t.Helper()
	jar, _ := cookiejar.New(nil)
	c := &http.Client{Jar: jar, Timeout: 20 * time.Second}
	resp, err := c.Get(url)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	// A join link answers a page that continues to the card (as a phone's
	// browser does by its refresh): follow it with the cookie it set.
	if i := strings.Index(url, "/join/"); i >= 0 && resp.StatusCode == 200 {
		if resp, err = c.Get(url[:i] + "/"); err != nil {
			t.Fatal(err)
		}
		b, _ = io.ReadAll(resp.Body)
		resp.Body.Close()
	}
	return resp.StatusCode, string(b)
}

func TestServeAFolder(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ev")
	mustRun(t, "init", "--demo", dir)
	crew, view, out := serveFor(t, "--dir", dir)
	if !strings.Contains(out.String(), "New links (written to") || !strings.Contains(out.String(), "without encryption") {
		t.Errorf("serve must say where the links are kept and that it has no encryption:\n%s", out.String())
	}
	st, err := os.Stat(filepath.Join(dir, event.TokensFile))
	if err != nil || st.Mode().Perm() != 0o600 {
		t.Fatalf("the tokens file: %v %v", st, err)
	}
	if code, body := get(t, crew); code != 200 || !strings.Contains(body, "POST THIS DIAL-IN") {
		t.Errorf("the crew link: %d", code)
	}
	if code, body := get(t, view); code != 200 || !strings.Contains(body, "View link") {
		t.Errorf("the view link: %d", code)
	}
	base := crew[:strings.Index(crew, "/join/")]
	if code, _ := get(t, base+"/"); code != http.StatusForbidden {
		t.Errorf("no token: %d, want 403", code)
	}
	if !strings.Contains(out.String(), "a phone joined with the crew link") {
		t.Errorf("the terminal must hear who joined:\n%s", out.String())
	}
}

func TestServeKeepsAndRevokesTokens(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ev")
	mustRun(t, "init", "--demo", dir)
	first, _, _ := serveFor(t, "--dir", dir)
	data1, _ := os.ReadFile(filepath.Join(dir, event.TokensFile))
	_, _, out := serveFor(t, "--dir", dir)
	data2, _ := os.ReadFile(filepath.Join(dir, event.TokensFile))
	if !bytes.Equal(data1, data2) || !strings.Contains(out.String(), "Links (from") {
		t.Errorf("a second start must keep the links")
	}
	_, _, out = serveFor(t, "--dir", dir, "--new-tokens")
	data3, _ := os.ReadFile(filepath.Join(dir, event.TokensFile))
	if bytes.Equal(data1, data3) || !strings.Contains(out.String(), "older links no longer work") {
		t.Errorf("--new-tokens must make new links and say the old ones are dead")
	}
	token := first[strings.Index(first, "/join/")+6:]
	if strings.Contains(string(data3), token) {
		t.Errorf("the old crew token survived --new-tokens")
	}
}

func TestServeTheDemo(t *testing.T) {
	crew, _, out := serveFor(t, "--demo", "--qr")
	if !strings.Contains(out.String(), "for this run only") {
		t.Errorf("the demo's links last one run:\n%s", out.String())
	}
	// The crew link's QR code: a square of half-block characters, a quiet zone around it.
	qr := regexp.MustCompile(`(?m)^[█▀▄ ]{25,}$`).FindAllString(out.String(), -1)
	if !strings.Contains(out.String(), "Scan for the crew link:") || len(qr) < 12 || len([]rune(qr[0])) != len([]rune(qr[len(qr)-1])) {
		t.Errorf("no QR code of the crew link (%d rows):\n%s", len(qr), out.String())
	}
	if code, body := get(t, crew); code != 200 || !strings.Contains(body, "read-only") {
		t.Errorf("the demo card: %d", code)
	}
}

func TestServeRefusesABadAddress(t *testing.T) {
	_, errs, code := pitcard(t, "serve", "--demo", "--addr", "127.0.0.1:99999", "--no-qr")
	if code != exitBadInput || !strings.Contains(errs, "--addr") {
		t.Errorf("a bad --addr: exit %d, %q", code, errs)
	}
}
