package pitpage

import (
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"runtime"
	"runtime/metrics"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"pitcard/event"
)

// budgetProbe is a modest rule: a table of 20000 numbers summed 20 times,
// a few hundred kilobytes of its own. Its check's label carries the sum,
// 20 × 20000 × 20001 / 2 = 4000200000 (the arithmetic series, common
// practice (no source)), so a page showing it shows the rule ran to its end.
const budgetProbe = `function checks(ctx)
  local t = {}
  for i = 1, 20000 do t[i] = i end
  local s = 0
  for r = 1, 20 do for i = 1, #t do s = s + t[i] end end
  return {{label = string.format("Budget probe summed %d", s), status = "pass"}}
end
`

// heapNow is the bytes of the process heap's objects, live or not yet swept.
func heapNow() int64 {
	s := []metrics.Sample{{Name: "/memory/classes/heap/objects:bytes"}}
	metrics.Read(s)
	return int64(s[0].Value.Uint64())
}

// Under `serve`, a rule's memory budget is its own: with the smallest
// budget the settings allow (4 MiB) and the page serving card requests from
// six phones at once on the loopback, each request a card of a new minute
// (so the rules run again), while the heap grows by many times the budget
// beside them, every card shows the modest rule's check and none says a
// rule ran out of memory.
func TestTheRuleBudgetIsTheRulesOwnUnderLoad(t *testing.T) {
	f := newFixture(t)
	settings := filepath.Join(f.dir, event.SettingsFile)
	data, err := os.ReadFile(settings)
	if err != nil {
		t.Fatal(err)
	}
	data = append(data, "\nrule_memory_mib: 4\nrule_time_ms: 5000\n"...)
	if err := os.WriteFile(settings, data, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(f.dir, "rules", "70-budget-probe.lua"), []byte(budgetProbe), 0o644); err != nil {
		t.Fatal(err)
	}
	var minutes atomic.Int64
	f.srv.cfg.Now = func() time.Time { return demoNow.Add(time.Duration(minutes.Load()) * time.Minute) }
	ts := httptest.NewServer(f.srv)
	defer ts.Close()
	client := &http.Client{Timeout: 60 * time.Second}

	// the heap's growth over its lowest while the page serves
	stop := make(chan struct{})
	var grew atomic.Int64
	var watch sync.WaitGroup
	watch.Add(1)
	go func() {
		defer watch.Done()
		runtime.GC()
		low := heapNow()
		for {
			select {
			case <-stop:
				return
			case <-time.After(200 * time.Microsecond):
				h := heapNow()
				low = min(low, h)
				if h-low > grew.Load() {
					grew.Store(h - low)
				}
			}
		}
	}()

	const phones, each = 6, 4
	bodies := make(chan string, phones*each)
	var wg sync.WaitGroup
	start := time.Now()
	for p := 0; p < phones; p++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := 0; i < each; i++ {
				minutes.Add(1)
				req, _ := http.NewRequest("GET", ts.URL+"/", nil)
				req.AddCookie(&http.Cookie{Name: CookieName, Value: testTokens.Crew})
				resp, err := client.Do(req)
				if err != nil {
					bodies <- "request failed: " + err.Error()
					continue
				}
				b, _ := io.ReadAll(resp.Body)
				resp.Body.Close()
				bodies <- fmt.Sprintf("%d %s", resp.StatusCode, b)
			}
		}()
	}
	wg.Wait()
	close(stop)
	watch.Wait()
	close(bodies)
	took := time.Since(start)
	t.Logf("%d cards in %v; the heap grew by up to %.0f MiB beside the rules (budget 4 MiB)", phones*each, took, float64(grew.Load())/(1<<20))
	if grew.Load() <= 4<<20 {
		t.Fatalf("the heap grew by %d bytes only: not past the 4 MiB budget, so the test proves nothing", grew.Load())
	}
	n := 0
	for b := range bodies {
		n++
		if !strings.HasPrefix(b, "200 ") {
			t.Errorf("card %d: %.200s", n, b)
			continue
		}
		if strings.Contains(b, "MiB of memory a rule call may use") {
			t.Errorf("card %d: a modest rule was stopped for memory while the page served others", n)
		}
		if !strings.Contains(b, "Budget probe summed 4000200000") {
			t.Errorf("card %d does not show the probe rule's check", n)
		}
	}
	if n != phones*each {
		t.Errorf("%d answers, want %d", n, phones*each)
	}
}
