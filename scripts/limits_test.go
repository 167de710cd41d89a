package scripts

import (
	"fmt"
	"runtime"
	"strings"
	"testing"
	"time"
)

// The memory budget is measured, not read back from the setting: while a
// rule grows a table without end, the heap is sampled beside it. The budget
// weighs the rule's own Lua values (budget.go), so the heap they take is
// the budget and Go's overhead on it: the rule must be stopped after it has
// grown the heap by at least 0.9 × the budget (64 MiB, the documented
// default; the test's own samples may miss the last by a fraction of a
// millisecond) and before 2 × the budget (the package doc: the heap can
// reach about twice a rule's values before a collection; measured 76–100
// MiB over 27 runs).
func TestMemoryBudgetMeasured(t *testing.T) {
	if DefaultLimits.Memory != 64<<20 {
		t.Fatalf("the default memory budget is %d MiB; the README and the card say 64", DefaultLimits.Memory>>20)
	}
	lim := DefaultLimits
	lim.Time = 20 * time.Second // the memory budget, not the clock, must stop it
	src := "function checks(ctx)\n local t = {}\n for i = 1, 1e9 do t[i] = {i, i, i, i} end\nend"
	r := Compile("rules/t.lua", src, nil, lim)
	runtime.GC()
	stop := make(chan struct{})
	growth := heapGrowth(100*time.Microsecond, stop)
	res := Run([]*Rule{r}, nil, ctxFor("left", 20, 100), lim)[0]
	close(stop)
	peak := growth()
	if len(res.Errors) == 0 || !strings.Contains(res.Errors[0].Error(), "64 MiB of memory") {
		t.Fatalf("errors %v", res.Errors)
	}
	lo, hi := lim.Memory*9/10, lim.Memory*2
	t.Logf("heap grew %.1f MiB before the rule was stopped (budget %d MiB)", float64(peak)/(1<<20), lim.Memory>>20)
	if peak < lo || peak > hi {
		t.Errorf("the rule was stopped after growing the heap by %.1f MiB; the %d MiB budget means between %.1f and %.1f",
			float64(peak)/(1<<20), lim.Memory>>20, float64(lo)/(1<<20), float64(hi)/(1<<20))
	}
}

// A rule that keeps half the budget (32 MiB of text in 16 distinct 2 MiB
// strings) is not stopped: the budget is not smaller than it says.
func TestMemoryUnderBudgetRuns(t *testing.T) {
	res := runSrc(t, `
local keep = {}
function notes(ctx)
  for i = 1, 16 do keep[i] = string.rep("x", 2^21 - 8) .. string.format("%08d", i) end
  return {tostring(#keep) .. " strings of " .. #keep[16]}
end`)
	if len(res.Errors) > 0 {
		t.Fatalf("a rule using half the budget was stopped: %v", res.Errors)
	}
	if len(res.Notes) != 1 || res.Notes[0] != fmt.Sprintf("16 strings of %d", 1<<21) {
		t.Errorf("notes %v", res.Notes)
	}
}

// String searches take at most 1 MiB of text (the sandbox's limit: a
// pattern search cannot be stopped mid-call): exactly 1 MiB is searched,
// one byte more is refused, for each of find, match, gmatch and gsub.
func TestStringSearchLimit(t *testing.T) {
	calls := map[string]string{
		"find":   "string.find(s, 'b', 1, true)",
		"match":  "string.match(s, '^a')",
		"gmatch": "(function() local n = 0 for _ in string.gmatch(s, 'b') do n = n + 1 end return n end)()",
		"gsub":   "(string.gsub(s, '^a', 'c'))",
	}
	for name, call := range calls {
		for _, n := range []int{1 << 20, 1<<20 + 1} {
			t.Run(fmt.Sprintf("%s %d bytes", name, n), func(t *testing.T) {
				// a search of 1 MiB takes gopher-lua up to a second: the
				// clock is widened so the size limit alone decides
				lim := DefaultLimits
				lim.Time = 20 * time.Second
				src := fmt.Sprintf("function notes(ctx)\n local s = string.rep('a', %d)\n local r = %s\n return {'searched'}\nend", n, call)
				res := Run([]*Rule{Compile("rules/t.lua", src, nil, lim)}, nil, ctxFor("left", 20, 100), lim)[0]
				if n <= 1<<20 {
					if len(res.Errors) > 0 || len(res.Notes) != 1 {
						t.Errorf("a search of %d bytes was refused: %v %v", n, res.Errors, res.Notes)
					}
					return
				}
				if len(res.Errors) == 0 || !strings.Contains(res.Errors[0].Error(), "string."+name+": a rule may search at most 1 MiB") {
					t.Errorf("a search of %d bytes: errors %v", n, res.Errors)
				}
			})
		}
	}
}

// unpack hands back at most 10000 values at once (the sandbox's limit: a
// huge unpack fills the Lua stack before any budget can stop it): 10000
// are returned, 10001 are refused, whether the range is given or the
// table's length.
func TestUnpackLimit(t *testing.T) {
	cases := []struct {
		name, expr string
		ok         bool
	}{
		{"10000 by range", "select('#', unpack({}, 1, 10000))", true},
		{"10001 by range", "select('#', unpack({}, 1, 10001))", false},
		{"10000 from 5", "select('#', unpack({}, 5, 10004))", true},
		{"10001 from 5", "select('#', unpack({}, 5, 10005))", false},
		{"a table of 10000", "select('#', unpack(big(10000)))", true},
		{"a table of 10001", "select('#', unpack(big(10001)))", false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			res := runSrc(t, "local function big(n) local t = {} for i = 1, n do t[i] = i end return t end\nfunction notes(ctx) return {tostring("+tc.expr+")} end")
			if tc.ok {
				if len(res.Errors) > 0 || len(res.Notes) != 1 || res.Notes[0] != "10000" {
					t.Errorf("notes %v, errors %v; want 10000 values", res.Notes, res.Errors)
				}
				return
			}
			if len(res.Errors) == 0 || !strings.Contains(res.Errors[0].Error(), "unpack: 10001 values at once; a rule may unpack at most 10000") {
				t.Errorf("notes %v, errors %v; want 10001 values refused", res.Notes, res.Errors)
			}
		})
	}
}
