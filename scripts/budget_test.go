package scripts

import (
	"fmt"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// allocate keeps the heap busy until stop is closed: n goroutines each
// allocate 1 MiB buffers without end, keeping the last 16, as a page
// serving phones does beside a rule. It returns the most the heap grew over
// its lowest while they ran, read when stop is closed.
func allocate(n int, stop chan struct{}) func() int64 {
	var wg sync.WaitGroup
	var sink atomic.Int64
	for g := 0; g < n; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var keep [16][]byte
			for i := 0; ; i++ {
				select {
				case <-stop:
					return
				default:
				}
				b := make([]byte, 1<<20)
				b[i%len(b)] = byte(i)
				keep[i%len(keep)] = b
				sink.Add(int64(b[0]))
				runtime.Gosched()
			}
		}()
	}
	grew := heapGrowth(200*time.Microsecond, stop)
	return func() int64 {
		wg.Wait()
		return grew()
	}
}

// heapGrowth samples the heap every interval until stop is closed; the
// function it returns waits for the sampler and gives the most the heap
// grew over its lowest sample.
func heapGrowth(every time.Duration, stop chan struct{}) func() int64 {
	var grew int64
	done := make(chan struct{})
	go func() {
		defer close(done)
		low := heapBytes()
		tick := time.NewTicker(every)
		defer tick.Stop()
		for {
			select {
			case <-stop:
				return
			case <-tick.C:
				h := heapBytes()
				low = min(low, h)
				grew = max(grew, h-low)
			}
		}
	}()
	return func() int64 {
		<-done
		return grew
	}
}

// A rule's memory budget is charged with the rule's own values, not with
// what other goroutines allocate meanwhile: a modest rule (a table of 20000
// numbers, summed over and over) under an 8 MiB budget runs to its end
// while four goroutines allocate many times the budget beside it; and a
// runaway rule under the same load is still stopped by the budget. The sums
// are checked against the arithmetic series n(n+1)/2 (common practice (no
// source)).
func TestMemoryBudgetIsTheRulesOwn(t *testing.T) {
	lim := DefaultLimits
	lim.Memory = 8 << 20
	lim.Time = 20 * time.Second // the budget, not the clock, is under test
	modest := `function notes(ctx)
  local t = {}
  for i = 1, 20000 do t[i] = i end
  local s = 0
  for r = 1, 60 do for i = 1, #t do s = s + t[i] end end
  return {string.format("%d", s)}
end`
	runaway := "function notes(ctx)\n local t = {}\n for i = 1, 1e9 do t[i] = {i, i} end\nend"
	for _, tc := range []struct {
		name, src string
		stopped   bool
	}{{"modest", modest, false}, {"runaway", runaway, true}} {
		t.Run(tc.name, func(t *testing.T) {
			r := Compile("rules/b.lua", tc.src, nil, lim)
			stop := make(chan struct{})
			grew := allocate(4, stop)
			time.Sleep(20 * time.Millisecond) // the load is under way before the rule starts
			start := time.Now()
			res := Run([]*Rule{r}, nil, ctxFor("left", 20, 100), lim)[0]
			took := time.Since(start)
			close(stop)
			g := grew()
			t.Logf("the heap grew by up to %.0f MiB beside the rule (budget %d MiB); the rule took %v", float64(g)/(1<<20), lim.Memory>>20, took)
			if g <= lim.Memory {
				t.Fatalf("the load grew the heap by %d bytes only: not past the %d-byte budget, so the test proves nothing", g, lim.Memory)
			}
			if !tc.stopped {
				if len(res.Errors) > 0 {
					t.Fatalf("a modest rule was stopped while others allocated: %v", res.Errors)
				}
				if want := fmt.Sprint(int64(60 * 20000 * 20001 / 2)); len(res.Notes) != 1 || res.Notes[0] != want {
					t.Errorf("notes %v, want [%s]", res.Notes, want)
				}
				return
			}
			if len(res.Errors) == 0 || !strings.Contains(res.Errors[0].Error(), "used more than the 8 MiB of memory a rule call may use") {
				t.Fatalf("a runaway rule under load: errors %v", res.Errors)
			}
		})
	}
}

// The weighing counts what a rule keeps and not what pitcard shares with it:
// a rule keeping 4 MiB of text in its globals weighs between 4 and 5 MiB
// (its bytes, their headers, the table holding them), and ctx and the
// libraries, reachable from the same state, add nothing (measured: from
// memory of gopher-lua's structs, budget.go's estimates).
func TestWeighCountsTheRulesValues(t *testing.T) {
	lib := newLibrary(DefaultLimits)
	big := map[string]any{"passes": make([]any, 0, 2000)}
	for i := 0; i < 2000; i++ {
		big["passes"] = append(big["passes"].([]any), map[string]any{"et": 10.5, "note": strings.Repeat("n", 200)})
	}
	arg := lib.b.readOnly(big, "ctx")
	lib.share(arg)
	for _, tc := range []struct {
		name, src string
		lo, hi    int64
	}{
		{"nothing kept", "x = 1", 0, 64 << 10},
		{"4 MiB of text", "keep = {} for i = 1, 64 do keep[i] = string.rep('x', 65536 - 8) .. string.format('%08d', i) end", 4 << 20, 5 << 20},
		{"the same text 64 times", "keep = {} local s = string.rep('x', 65536) for i = 1, 64 do keep[i] = s end", 64 << 10, 128 << 10},
		{"ctx kept", "keep = {}", 0, 64 << 10},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := &Rule{File: "rules/w.lua"}
			var cerr *Error
			if r.proto, cerr = compile(r.File, tc.src); cerr != nil {
				t.Fatal(cerr)
			}
			s, err := newSandbox(r, nil, DefaultLimits, nil, lib)
			if err != nil {
				t.Fatal(err)
			}
			defer s.close()
			s.L.SetGlobal("held", arg) // ctx held in a global: shared, not the rule's
			if n := s.weigh(); n < tc.lo || n > tc.hi {
				t.Errorf("weighed %d bytes, want %d..%d", n, tc.lo, tc.hi)
			}
		})
	}
}
