package scripts

import (
	"math"
	"runtime"
	"strconv"
	"strings"
	"testing"
	"testing/fstest"
	"time"
)

// ctxFor is a ctx like the card's, with the fields the tests need.
func ctxFor(lane string, hour float64, trackF float64) map[string]any {
	air := map[string]any{"density_altitude_ft": 4300.0, "temp_f": 84.0}
	if trackF > 0 {
		air["track_temp_f"] = trackF
	}
	return map[string]any{
		"air":   air,
		"car":   map[string]any{"name": "test", "weight_lb": 3350.0, "limit_et": 10.0, "chute": false, "chute_needed_mph": 150.0, "belts_expire": "2027-03"},
		"round": map[string]any{"session": "E3", "number": 3, "lane": lane, "call_hour": hour, "call_time": "20:45", "date": "2026-06-13"},
		"prediction": map[string]any{"et": 11.50, "low": 11.45, "high": 11.55, "mph": 117.6, "mph_low": 117.0, "mph_high": 118.3,
			"timers": []any{map[string]any{"distance_ft": 60.0, "et": 1.62}, map[string]any{"distance_ft": 1320.0, "et": 11.5}}},
		"dial":   map[string]any{"recommended": 11.46, "recommended_text": "11.46"},
		"passes": []any{map[string]any{"et1320": 11.49}, map[string]any{"et1320": 11.52}},
	}
}

func runSrc(t *testing.T, src string) Result {
	t.Helper()
	fsys := fstest.MapFS{"rules/t.lua": {Data: []byte(src)}, "rules/helper.lua": {Data: []byte("return {x = 41}")}}
	r := Compile("rules/t.lua", src, fsys, DefaultLimits)
	return Run([]*Rule{r}, fsys, ctxFor("left", 20.75, 118), DefaultLimits)[0]
}

// Hostile rules: each is stopped with a clear error naming the file (and the
// line where there is one) within 3 s (an endless loop has its budget twice, the second three times longer), and the process stays under 512 MiB.
func TestHostileRules(t *testing.T) {
	cases := []struct {
		name, src, want string
	}{
		{"endless loop", "function dial(ctx)\n  while true do end\nend", "ran longer than"},
		{"endless loop at load", "while true do end", "ran longer than"},
		{"endless recursion", "local function f(n) return f(n+1)+1 end\nfunction dial(ctx) return f(1) end", "nested deeper"},
		{"string doubling", "function notes(ctx)\n local s = 'x'\n while true do s = s .. s end\nend", "stopped"},
		{"string.rep 2^31", "function notes(ctx) return {string.rep('x', 2^31)} end", "string.rep"},
		{"method rep", "function notes(ctx) return {('xy'):rep(2^30)} end", "string.rep"},
		{"huge format width", "function notes(ctx) return {string.format('%99999999d', 1)} end", "width"},
		{"huge table", "function checks(ctx)\n local t = {}\n for i = 1, 1e9 do t[i] = {i, i, i} end\nend", "stopped"},
		{"huge unpack", "function notes(ctx) return {unpack({}, 1, 1e8)} end", "at most 10000"},
		{"os.execute", "function dial(ctx) os.execute('rm -rf /') end", "execute"},
		{"io.open", "function dial(ctx) io.open('/etc/passwd') end", "io"},
		{"require outside rules", "local x = require('../../etc/passwd')", "only require another file of rules/"},
		{"require a path", "local x = require('os.path')", "only require"},
		{"load bytecode", "function dial(ctx) return load('\\27Lua')() end", "load"},
		{"loadstring", "function dial(ctx) return loadstring('return 1')() end", "loadstring"},
		{"dofile", "dofile('/etc/passwd')", "dofile"},
		{"write ctx", "function dial(ctx) ctx.round.lane = 'right' return 0 end", "ctx.round.lane is read-only"},
		{"write ctx top", "function dial(ctx) ctx.cheat = 1 return 0 end", "ctx.cheat is read-only"},
		{"rawset ctx", "function dial(ctx) rawset(ctx, 'x', 1) return 0 end", "rawset"},
		{"unlock metatable", "function dial(ctx) setmetatable(ctx, nil) return 0 end", "protected metatable"},
		{"dial wrong type", "function dial(ctx) return {1} end", "rules/t.lua:1: dial(ctx) returned a table"},
		{"unfinished file", "function dial(ctx)\n  return 1 +\n", "rules/t.lua:2: the file ends before the code does"},
		{"dial no reason", "function dial(ctx) return 0.02 end", "without a reason"},
		{"dial too big", "function dial(ctx) return 2, 'hundredths?' end", "beyond"},
		{"dial nan", "function dial(ctx) return 0/0, 'x' end", "not an adjustment"},
		{"checks wrong type", "\nfunction checks(ctx) return 'fine' end", "rules/t.lua:2: checks(ctx) returned a string; it must return a list"},
		{"checks bad status", "function checks(ctx) return {{label='x', status='ok'}} end", "pass, warn, fail or confirm"},
		{"checks no label", "function checks(ctx) return {{status='pass'}} end", "no label"},
		{"notes wrong type", "function notes(ctx) return {{}} end", "not a string"},
		{"check note a table", "function checks(ctx) return {{label = 'x', status = 'pass', note = {}}} end", "rules/t.lua:1: checks(ctx) item 1 (x) has a note that is a table, not text"},
		{"runtime error", "function dial(ctx)\n  local x = nil\n  return x.y\nend", "rules/t.lua:3:"},
		{"syntax error", "function dial(ctx)\n  return 1 +\nend", "rules/t.lua:3:"},
		{"error()", "function dial(ctx) error('my own message') end", "my own message"},
		{"debug", "function dial(ctx) return debug.getinfo(1) end", "debug"},
		// a hook that is not a function is the crew's mistake, not silence
		{"dial a number", "dial = 0.01", "rules/t.lua:1: dial is a number, not a function"},
		{"checks a table", "\nchecks = {{label = 'x', status = 'pass'}}", "rules/t.lua:2: checks is a table, not a function"},
		{"notes a string", "notes = 'fine'", "rules/t.lua:1: notes is a string, not a function"},
		// string.format with a missing value, in the rule's words
		{"format %f nil", "function notes(ctx)\n  return {string.format('%.0f °F', ctx.air.nothing)}\nend", "rules/t.lua:2: string.format: argument 2 (for %.0f) is nil"},
		{"format %d nil", "function notes(ctx)\n  return {string.format('%d', nil)}\nend", "rules/t.lua:2: string.format: argument 2 (for %d) is nil"},
		{"format %s nil", "function notes(ctx)\n  return {('a %s'):format(nil)}\nend", "rules/t.lua:2: string.format: argument 2 (for %s) is nil"},
		{"format %s table", "function notes(ctx)\n  return {string.format('%s', {})}\nend", "rules/t.lua:2: string.format: argument 2 (for %s) is a table"},
		{"format %d text", "function notes(ctx)\n  return {string.format('%d', 'ten')}\nend", "rules/t.lua:2: string.format: argument 2 (for %d) is a string (\"ten\"), not a number"},
		{"format missing", "function notes(ctx)\n  return {string.format('%.1f and %.1f', 1)}\nend", "rules/t.lua:2: string.format: argument 3 (for %.1f) is missing"},
		{"format bad option", "function notes(ctx)\n  return {string.format('%y', 1)}\nend", "rules/t.lua:2: string.format: '%y' is not a format"},
		// errors a rule raises, said in rule words
		{"error with a table", "function dial(ctx)\n  error({})\nend", "rules/t.lua:2: the rule raised an error with a table, not a message"},
		{"error with a boolean", "function dial(ctx)\n  error(false)\nend", "rules/t.lua:2: the rule raised an error with a boolean, not a message"},
		{"round_dial NaN", "function dial(ctx)\n  return pit.round_dial(0/0), 'x'\nend", "rules/t.lua:2: pit.round_dial was given NaN (not a number)"},
		{"round_dial inf", "function dial(ctx)\n  return pit.round_dial(1/0), 'x'\nend", "rules/t.lua:2: pit.round_dial was given an infinite number"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			start := time.Now()
			res := runSrc(t, tc.src)
			took := time.Since(start)
			if len(res.Errors) == 0 {
				t.Errorf("%s: no error (%+v)", tc.name, res)
				return
			}
			msg := res.Errors[0].Error()
			if !strings.Contains(msg, tc.want) || !strings.HasPrefix(msg, "rules/t.lua") {
				t.Errorf("%s: error %q, want it to name rules/t.lua and contain %q", tc.name, msg, tc.want)
			}
			if took > 3*time.Second { // an endless loop gets (1 + RetryBudget) budgets; generous for a loaded machine
				t.Errorf("%s: took %v to stop", tc.name, took)
			}
			if len(res.Checks) == 0 || res.Checks[0].Status != Fail {
				t.Errorf("%s: the failure is not a failed check: %+v", tc.name, res.Checks)
			}
			var m runtime.MemStats
			runtime.ReadMemStats(&m)
			if m.HeapAlloc > 512<<20 {
				t.Errorf("%s: heap %d MiB", tc.name, m.HeapAlloc>>20)
			}
			runtime.GC()
		})
	}
}

// The memory watchdog stops a rule that grows the heap past its budget, even
// with time to spare.
func TestMemoryBudget(t *testing.T) {
	lim := DefaultLimits
	lim.Time = 10 * time.Second
	src := "function checks(ctx)\n local t = {}\n for i = 1, 1e9 do t[i] = {i, i, i, i} end\nend"
	r := Compile("rules/t.lua", src, nil, lim)
	// The memory, not the 10 s clock, must be what stops it: the error
	// says which (no timed assertion: a loaded machine is slow, not wrong).
	res := Run([]*Rule{r}, nil, ctxFor("left", 20, 100), lim)[0]
	if len(res.Errors) == 0 || !strings.Contains(res.Errors[0].Error(), "64 MiB of memory") {
		t.Fatalf("errors %v", res.Errors)
	}
}

func TestRuleAPI(t *testing.T) {
	res := runSrc(t, `
local h = require("helper")
function dial(ctx)
  pit.log("lane", ctx.round.lane, #ctx.passes)
  local n = 0
  for i, p in ipairs(ctx.passes) do n = n + 1 end
  for k, v in pairs(ctx.car) do n = n + 1 end
  if n ~= 2 + 6 or h.x ~= 41 then error("iteration saw " .. n) end
  return pit.round_dial(0.0149), "test reason"
end
function notes(ctx)
  local a = pit.air{temp_f = 59, baro_inhg = 29.92, humidity_pct = 0}
  return {
    string.format("%.0f", pit.convert(100, "C", "F")),
    string.format("%.3f", pit.convert(1, "inHg", "hPa")),
    string.format("%.0f", a.density_altitude_ft),
    pit.round_dial(10.119999),
    pit.round_dial(11.4616, "0.005"),
    pit.step,
    os.date("%Y", 0) ~= nil and "date" or "no date",
  }
end`)
	if len(res.Errors) > 0 {
		t.Fatal(res.Errors[0])
	}
	if !res.HasAdjust || res.Adjust.String() != "0.01" || res.Reason != "test reason" {
		t.Errorf("dial %v %v %q", res.HasAdjust, res.Adjust, res.Reason)
	}
	// Unit definitions: 100 °C = 212 °F; 1 inHg = 33.864 hPa. U.S. Standard
	// Atmosphere 1976: 59 °F (15 °C), 29.92 inHg dry is sea level, DA ≈ 0 ft.
	want := []string{"212", "33.864", "0", "10.12", "11.460", "0.01", "date"}
	if len(res.Notes) != len(want) {
		t.Fatalf("notes %v", res.Notes)
	}
	for i, w := range want {
		if i == 2 { // DA within ±9 ft of 0 (29.92 inHg is 1013.21 hPa, not 1013.25)
			if da, err := strconv.ParseFloat(res.Notes[i], 64); err != nil || math.Abs(da) > 9 {
				t.Errorf("note %d = %q, want a density altitude within 9 ft of 0", i, res.Notes[i])
			}
			continue
		}
		if res.Notes[i] != w {
			t.Errorf("note %d = %q, want %q", i, res.Notes[i], w)
		}
	}
	if len(res.Log) != 1 || res.Log[0] != "lane left 2" {
		t.Errorf("log %v", res.Log)
	}
}

// One bad rule does not stop the others.
func TestOtherRulesGoOn(t *testing.T) {
	fsys := fstest.MapFS{
		"rules/a.lua": {Data: []byte("function dial(ctx) return -0.01, 'a' end")},
		"rules/b.lua": {Data: []byte("function dial(ctx) while true do end end")},
		"rules/c.lua": {Data: []byte("function notes(ctx) return 'c ran' end")},
	}
	rules, err := Load(fsys, DefaultLimits)
	if err != nil {
		t.Fatal(err)
	}
	res := Run(rules, fsys, ctxFor("left", 20, 100), DefaultLimits)
	if !res[0].HasAdjust || len(res[1].Errors) != 1 || len(res[2].Notes) != 1 {
		t.Errorf("results %+v", res)
	}
}

func BenchmarkTwentyRules(b *testing.B) {
	fsys := fstest.MapFS{}
	for i := range 20 {
		src := []string{
			"function dial(ctx) if ctx.round.lane == 'left' then return -0.01, 'left' end return 0 end",
			"function checks(ctx) return {{label='ET', status=ctx.prediction.low > ctx.car.limit_et and 'pass' or 'fail'}} end",
			"function notes(ctx) return {string.format('track %.0f', ctx.air.track_temp_f)} end",
			"function checks(ctx) local out = {} for i, p in ipairs(ctx.passes) do out[#out+1] = {label='p'..i, status='pass'} end return out end",
		}[i%4]
		fsys[string([]byte{'r', 'u', 'l', 'e', 's', '/', byte('a' + i)})+".lua"] = &fstest.MapFile{Data: []byte(src)}
	}
	rules, _ := Load(fsys, DefaultLimits)
	ctx := ctxFor("left", 20.75, 118)
	for b.Loop() {
		Run(rules, fsys, ctx, DefaultLimits)
	}
}

// A rule that replaced the strings' shared metatable used to change string
// methods for every rule after it (the shipped safety rule turned a FAIL
// into a WARN). The metatable is locked like the shared libraries.
func TestOneRuleCannotChangeStringsForTheNext(t *testing.T) {
	lim := DefaultLimits
	evil := Compile("rules/10-evil.lua", `
local mt = getmetatable("")
if type(mt) == "table" then
  mt.__index = {upper = function(s) return "hijacked" end, find = function() return nil end}
end
function notes(ctx) return {"tried: " .. type(mt)} end`, nil, lim)
	victim := Compile("rules/20-victim.lua", `function notes(ctx) return {("expired"):upper(), tostring(("belts expired"):find("expired"))} end`, nil, lim)
	res := Run([]*Rule{evil, victim}, nil, ctxFor("left", 20, 100), lim)
	if len(res[1].Errors) > 0 || len(res[1].Notes) != 2 || res[1].Notes[0] != "EXPIRED" || res[1].Notes[1] != "7" {
		t.Errorf("the second rule saw changed strings: notes %q, errors %v", res[1].Notes, res[1].Errors)
	}
	if len(res[0].Notes) == 0 || res[0].Notes[0] != "tried: string" {
		t.Errorf("getmetatable(\"\") gave the rule the table itself: %q %v", res[0].Notes, res[0].Errors)
	}
}

// A rule that puts a metatable on its own globals: the host's own look-ups
// (which hooks the file defines, where each is) never run the rule's
// metamethods, and every call that does runs under the budget. The rule that
// loops or fails in __index is a failed check at its file and line, in time.
func TestGlobalsMetatable(t *testing.T) {
	cases := []struct {
		name, src string
		defines   int
		want      string // "" for no error
	}{
		{"looping __index, no hooks", "setmetatable(_G, {__index = function() while true do end end})", 0, ""},
		{"failing __index, no hooks", "setmetatable(_G, {__index = function() error('boom') end})", 0, ""},
		{"looping __index, hook reads a missing global", "setmetatable(_G, {__index = function() while true do end end})\n" +
			"function checks(ctx)\n  return {{label = 'x' .. missing, status = 'pass'}}\nend", 1, "rules/t.lua:1: stopped: ran longer than"},
		{"failing __index, hook reads a missing global", "setmetatable(_G, {__index = function() error('boom') end})\n" +
			"function checks(ctx)\n  return {{label = 'x' .. missing, status = 'pass'}}\nend", 1, "rules/t.lua:1: boom"},
		{"strict globals, hooks well behaved", "setmetatable(_G, {__index = function(_, k) error('undefined global ' .. k, 2) end})\n" +
			"function notes(ctx)\n  return {'fine'}\nend", 1, ""},
		{"__newindex swallows the hooks", "setmetatable(_G, {__newindex = function() while true do end end})\nfunction dial(ctx) return 0 end", 0, "rules/t.lua:1: stopped: ran longer than"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			type out struct {
				r   *Rule
				res Result
				p   any
			}
			done := make(chan out, 1)
			go func() {
				var o out
				defer func() { o.p = recover(); done <- o }()
				o.r = Compile("rules/t.lua", tc.src, nil, DefaultLimits)
				o.res = Run([]*Rule{o.r}, nil, ctxFor("left", 20, 100), DefaultLimits)[0]
			}()
			var o out
			select {
			case o = <-done:
			case <-time.After(5 * time.Second):
				t.Fatal("Compile and Run did not return within 5 s")
			}
			if o.p != nil {
				t.Fatalf("the host panicked: %v", o.p)
			}
			if len(o.r.Defines) != tc.defines {
				t.Errorf("defines %v, want %d hooks", o.r.Defines, tc.defines)
			}
			if tc.want == "" {
				if len(o.res.Errors) > 0 {
					t.Errorf("errors %v", o.res.Errors)
				}
				return
			}
			if len(o.res.Errors) == 0 || !strings.HasPrefix(o.res.Errors[0].Error(), tc.want) {
				t.Fatalf("errors %v, want one starting %q", o.res.Errors, tc.want)
			}
			if len(o.res.Checks) == 0 || o.res.Checks[0].Status != Fail {
				t.Errorf("the failure is not a failed check: %+v", o.res.Checks)
			}
		})
	}
}
