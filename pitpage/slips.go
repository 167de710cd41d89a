package pitpage

import (
	"crypto/rand"
	"crypto/sha256"
	"encoding/hex"
	"net/url"
	"sort"
	"sync"
	"time"

	words "pitcard/internal/text"
)

// repeatWindow is how long a slip's exact form is remembered: the same
// form again within it is a reload or a second tap, not a second pass (a
// second pass has its own figures to the thousandth, or its own time).
const repeatWindow = 10 * time.Minute

// maxSlipResults bounds the logged slips' result pages kept for reloads.
const maxSlipResults = 64

// slipResult is what a logged slip's page says.
type slipResult struct {
	at     time.Time // the pass's time
	short  string    // "round 3, left lane, 11.431 s"
	logged string
	said   []string
}

// slipLog keeps the results of the slips logged while the server runs, by
// an id the post redirects to, and when each form was posted.
type slipLog struct {
	mu      sync.Mutex
	results map[string]slipResult
	order   []string // ids, oldest first
	posted  map[string]postedSlip
}

type postedSlip struct {
	when time.Time // by the server's clock
	slipResult
}

// slipKey identifies a slip's form by everything typed in it (not its
// CSRF token, which is the same for every form of a phone).
func slipKey(v url.Values) string {
	names := make([]string, 0, len(v))
	for k := range v {
		if k != "csrf" {
			names = append(names, k)
		}
	}
	sort.Strings(names)
	h := sha256.New()
	for _, k := range names {
		for _, x := range v[k] {
			h.Write([]byte(k + "\x00" + x + "\x00"))
		}
	}
	return hex.EncodeToString(h.Sum(nil))
}

// recent is the slip logged from the same form within repeatWindow of now,
// and how long ago it was posted.
func (l *slipLog) recent(key string, now time.Time) (slipResult, time.Duration, bool) {
	l.mu.Lock()
	defer l.mu.Unlock()
	p, ok := l.posted[key]
	if !ok || now.Sub(p.when) >= repeatWindow {
		return slipResult{}, 0, false
	}
	return p.slipResult, now.Sub(p.when), true
}

// agoWords is a short while in words: "a moment", "1 minute", "9 minutes".
func agoWords(d time.Duration) string {
	if d < time.Minute {
		return "a moment"
	}
	return words.Plural(int(d/time.Minute), "minute")
}

// add keeps res and its form's key, and returns the id of its page.
func (l *slipLog) add(key string, res slipResult, now time.Time) string {
	b := make([]byte, 12)
	_, _ = rand.Read(b) // never fails (crypto/rand)
	id := hex.EncodeToString(b)
	l.mu.Lock()
	defer l.mu.Unlock()
	if l.results == nil {
		l.results, l.posted = map[string]slipResult{}, map[string]postedSlip{}
	}
	for k, p := range l.posted {
		if now.Sub(p.when) >= repeatWindow {
			delete(l.posted, k)
		}
	}
	l.posted[key] = postedSlip{when: now, slipResult: res}
	l.results[id] = res
	l.order = append(l.order, id)
	if len(l.order) > maxSlipResults {
		delete(l.results, l.order[0])
		l.order = l.order[1:]
	}
	return id
}

func (l *slipLog) result(id string) (slipResult, bool) {
	l.mu.Lock()
	defer l.mu.Unlock()
	r, ok := l.results[id]
	return r, ok
}
