// Package scripts is the host that runs a crew's rules: small Lua files in
// the event folder's rules/ that tweak the dial, check the car and the
// limits, and add setup notes to the card. It does not read the event
// folder, compute the dial or print the card: it sees the rest of pitcard
// only through the plain data it is handed (a map of maps, lists, strings,
// numbers and booleans) and returns plain results.
//
// Rules run sandboxed: only Lua's base, string, table and math libraries and
// os.time, os.date and os.clock; no files, processes, network or loading of
// code from outside rules/; every call under a time, memory and call-depth
// budget. A rule that fails, hangs or misbehaves becomes a failed check
// naming its file and line, and the other rules go on.
//
// The memory budget (Limits.Memory, the setting rule_memory_mib) bounds the
// estimated bytes of the values one rule's Lua state holds during a call:
// its globals, the locals, temporaries and upvalues of the calls under way,
// the modules it required, and all they reach (a table by its array's room
// and its maps' entries, a string by its bytes, a long string held in many
// places once). What pitcard hands every rule (ctx, the libraries) is not
// charged to it, nor is anything other goroutines allocate: under `serve`,
// the cards other phones ask for do not count against a rule. The state is
// weighed between two instructions, when the process heap has grown enough
// that the rule could be near its budget (budget.go), so a rule is stopped
// soon after its values pass the budget, not at the byte.
//
// The budget does not catch garbage: a rule that builds and drops strings in
// a loop holds little and is left to the collector and the time budget; the
// process heap may grow to about twice a rule's values before the collector
// runs. Nor does it catch what one instruction builds before the next
// weighing (one concatenation can pass the budget by the size of its
// result; string.rep and string.format are held to MaxString, searches to
// 1 MiB of text, unpack to 10000 values, before they start), values passed
// only as a vararg function's ..., or the Go heap's own room beyond the
// estimates.
package scripts

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"path"
	"pitcard/internal/printable"
	"regexp"
	"runtime/metrics"
	"sort"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"
	"unicode/utf8"
	"unsafe"

	"github.com/shopspring/decimal"
	lua "github.com/yuin/gopher-lua"
	"github.com/yuin/gopher-lua/parse"
)

// Limits of one rule call.
type Limits struct {
	Time      time.Duration // wall time of one call (default 200 ms)
	Memory    int64         // estimated bytes of the values a rule holds during one call (default 64 MiB; see the package doc)
	CallDepth int           // Lua call-stack frames (default 200)
	// MaxString is the largest string a library function may build in one
	// go (string.rep, string.format): one call that allocates gigabytes
	// cannot be stopped by a watchdog, so it is refused before it starts.
	MaxString int
	// DialStep is the step pit.round_dial rounds to (default 0.01 s).
	DialStep decimal.Decimal
	// MaxText is the most characters kept of one text a rule hands back
	// (a reason, a label, a note, a log line, an error's message); 0 means
	// MaxText. `pitcard rules try` raises it to show a rule's whole output.
	MaxText int
}

// MaxText is the most characters of one text a rule puts on the card: a line
// of a one-page card, with room to spare. Longer text is a rule's bug or a
// dump (a 3 MB reason once made a 9 MB card and took 360 MB to render), so
// it is cut where it leaves the rule, with cutNote saying where the whole is.
const MaxText = 300

// cutNote ends a text cut at MaxText.
const cutNote = "… (cut: `pitcard rules try` shows the whole text)"

// DefaultLimits are the limits of a rule call unless the settings say otherwise.
var DefaultLimits = Limits{Time: 200 * time.Millisecond, Memory: 64 << 20, CallDepth: 200, MaxString: 16 << 20,
	DialStep: decimal.New(1, -2), MaxText: MaxText}

// clip cuts s after the limit's MaxText characters and says so. The cut
// text is a copy (the concatenation makes one), so a multi-megabyte string
// the rule built is not kept alive by the few hundred bytes kept of it.
func (l Limits) clip(s string) string {
	s = printable.Line(s) // no rule writes control codes into a terminal
	limit := l.MaxText
	if limit <= 0 {
		limit = MaxText
	}
	if len(s) <= limit { // bytes ≥ characters
		return s
	}
	n := 0
	for i := range s {
		if n == limit {
			return s[:i] + cutNote
		}
		n++
	}
	return s
}

// Hooks are the functions a rule file may define.
var Hooks = []string{"dial", "checks", "notes"}

// Rule is one compiled rule file.
type Rule struct {
	File    string // "rules/NAME.lua"
	proto   *lua.FunctionProto
	Defines []string // which of Hooks it defines
	Err     *Error   // set when the file does not load
	Source  string
}

// Error is a rule's failure, located at its file and line.
type Error struct {
	File string
	Line int // 0 when unknown
	Msg  string
	// timedOut: the call ran out of time (tried again with more, once).
	timedOut bool
}

// Error names the rule file, the line when known, and what went wrong.
func (e *Error) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("%s:%d: %s", e.File, e.Line, e.Msg)
	}
	return e.File + ": " + e.Msg
}

// Load compiles every rules/*.lua of fsys in name order. A file that does not
// compile, or fails while it runs its top level, is returned with Err set.
func Load(fsys fs.FS, limits Limits) ([]*Rule, error) {
	names, err := fs.Glob(fsys, "rules/*.lua")
	if err != nil {
		return nil, err
	}
	sort.Strings(names)
	var rules []*Rule
	for _, name := range names {
		src, err := fs.ReadFile(fsys, name)
		if err != nil {
			return nil, err
		}
		rules = append(rules, Compile(name, string(src), fsys, limits))
	}
	return rules, nil
}

// Compile compiles one rule's source and finds which hooks it defines.
func Compile(file, src string, fsys fs.FS, limits Limits) *Rule {
	r := &Rule{File: file, Source: src}
	proto, err := compile(file, src)
	if err != nil {
		err.Msg = limits.clip(err.Msg) // the parser may quote a whole long string
		r.Err = err
		return r
	}
	r.proto = proto
	s, err := newSandbox(r, fsys, limits, nil, nil)
	if err != nil {
		r.Err = err
		return r
	}
	defer s.close()
	for _, h := range Hooks {
		switch v := s.hook(h); v.Type() {
		case lua.LTNil:
		case lua.LTFunction:
			r.Defines = append(r.Defines, h)
		default:
			r.Err = &Error{File: file, Line: assignedLine(src, h), Msg: limits.clip(fmt.Sprintf(
				"%s is a %s, not a function: define it as function %s(ctx) … end", h, v.Type(), h))}
			return r
		}
	}
	return r
}

// hook is the global a rule file defined under name, read raw: looking it up
// must not run the rule's own code (an __index on _G that loops or fails, or
// a strict-globals guard that calls a missing hook an error). Everything that
// does run the rule's code goes through sandbox.call, under the budget.
func (s *sandbox) hook(name string) lua.LValue {
	return s.L.G.Global.RawGetString(name)
}

// assignedLine is the first line of src that assigns name at the start of a
// line ("dial = 0.01"), or 0.
func assignedLine(src, name string) int {
	re := regexp.MustCompile(`(?m)^[ \t]*` + regexp.QuoteMeta(name) + `[ \t]*=([^=]|$)`)
	if loc := re.FindStringIndex(src); loc != nil {
		return strings.Count(src[:loc[0]], "\n") + 1
	}
	return 0
}

var syntaxRe = regexp.MustCompile(`line:(\d+)\(column:\d+\) near '(.*?)':\s*(.*)`)

func compile(file, src string) (*lua.FunctionProto, *Error) {
	chunk, err := parse.Parse(strings.NewReader(src), file)
	if err != nil {
		msg := strings.TrimSpace(err.Error())
		if m := syntaxRe.FindStringSubmatch(msg); m != nil {
			line := atoi(m[1])
			what := strings.TrimSpace(m[3])
			if what == "" {
				what = "syntax error"
			}
			return nil, &Error{File: file, Line: line, Msg: fmt.Sprintf("%s near '%s'", what, m[2])}
		}
		if strings.Contains(msg, "at EOF") {
			// The parser names the file itself; say it once, at the last line.
			return nil, &Error{File: file, Line: strings.Count(strings.TrimRight(src, "\n"), "\n") + 1,
				Msg: "the file ends before the code does (a missing 'end', or an unfinished line)"}
		}
		return nil, &Error{File: file, Msg: strings.TrimPrefix(msg, file+" ")}
	}
	proto, err := lua.Compile(chunk, file)
	if err != nil {
		return nil, &Error{File: file, Msg: err.Error()}
	}
	return proto, nil
}

func atoi(s string) int {
	n := 0
	for _, c := range s {
		n = n*10 + int(c-'0')
	}
	return n
}

// sandbox is one Lua state for one rule.
type sandbox struct {
	L       *lua.LState
	rule    *Rule
	limits  Limits
	log     *[]string
	proxies map[*lua.LTable]*lua.LTable // read-only proxy → its data
	mu      sync.Mutex
	memOut  bool
	fsys    fs.FS
	loaded  map[string]lua.LValue
	// abandoned: a call is still stuck in the state; it must not be touched.
	abandoned bool
	// shared: the values of the run's library and ctx, which every rule
	// sees and none is charged for (see budget.go).
	shared map[uintptr]struct{}
	// weighDue: the watchdog asks for the rule's values to be weighed;
	// ruleBytes: what they weighed last; w: the walk's reusable maps.
	weighDue  atomic.Bool
	ruleBytes atomic.Int64
	heapBase  atomic.Int64 // the process heap when the last weighing was asked for, or lower
	w         *weigher
}

// library is the standard library a run's rules share: opened once, made
// read-only, and installed in each rule's own state. Sharing makes a fresh
// state per rule cheap; read-only makes sharing safe.
type library struct {
	b        *sandbox // the builder state the shared tables were made in
	globals  map[string]lua.LValue
	stringMT *lua.LTable
}

// share marks v and everything it holds as shared by the run's rules: no
// rule's memory budget is charged for it. It keeps their addresses, which
// stay theirs while the run holds the library and ctx.
func (lib *library) share(v lua.LValue) {
	var p uintptr
	switch x := v.(type) {
	case *lua.LTable:
		p = uintptr(unsafe.Pointer(x))
	case *lua.LFunction:
		p = uintptr(unsafe.Pointer(x))
	default:
		return
	}
	if _, ok := lib.b.shared[p]; ok {
		return
	}
	lib.b.shared[p] = struct{}{}
	if t, ok := v.(*lua.LTable); ok {
		lib.share(t.Metatable)
		t.ForEach(func(k, e lua.LValue) {
			lib.share(k)
			lib.share(e)
		})
	}
}

func newLibrary(limits Limits) *library {
	L := lua.NewState(lua.Options{SkipOpenLibs: true})
	b := &sandbox{L: L, limits: limits, proxies: map[*lua.LTable]*lua.LTable{}, shared: map[uintptr]struct{}{}}
	for _, lib := range []struct {
		name string
		open lua.LGFunction
	}{{lua.BaseLibName, lua.OpenBase}, {lua.TabLibName, lua.OpenTable}, {lua.StringLibName, lua.OpenString},
		{lua.MathLibName, lua.OpenMath}, {lua.OsLibName, lua.OpenOs}} {
		L.Push(L.NewFunction(lib.open))
		L.Push(lua.LString(lib.name))
		L.Call(1, 0)
	}
	for _, name := range []string{"dofile", "loadfile", "load", "loadstring", "rawset", "module",
		"collectgarbage", "getfenv", "setfenv", "newproxy", "_printregs"} {
		L.SetGlobal(name, b.refuse(name, "rules cannot load code, change environments or bypass ctx"))
	}
	for _, lib := range []string{"io", "debug", "package", "coroutine", "channel"} {
		L.SetGlobal(lib, b.refusingTable(lib, lib+" is not available to rules: they cannot reach files, processes or pitcard's internals"))
	}
	// os: only the clock and the calendar.
	osFull := L.GetGlobal("os").(*lua.LTable)
	osSafe := b.refusingTable("os", "rules get only os.time, os.date and os.clock")
	for _, f := range []string{"time", "date", "clock"} {
		osSafe.RawSetString(f, osFull.RawGetString(f))
	}
	L.SetGlobal("os", osSafe)
	unpack := L.GetGlobal("unpack").(*lua.LFunction)
	L.SetGlobal("unpack", L.NewFunction(func(L *lua.LState) int {
		t := L.CheckTable(1)
		i, j := L.OptInt(2, 1), L.OptInt(3, t.Len())
		if j-i+1 > 10000 { // j-i+1 values: 10000 pass, 10001 do not
			L.RaiseError("unpack: %d values at once; a rule may unpack at most 10000", j-i+1)
		}
		top := L.GetTop()
		L.Push(unpack)
		for k := 1; k <= top; k++ {
			L.Push(L.Get(k))
		}
		L.Call(top, lua.MultRet)
		return L.GetTop() - top
	}))
	b.guardStrings()
	L.SetGlobal("pairs", L.NewFunction(b.luaPairs))
	L.SetGlobal("ipairs", L.NewFunction(b.luaIpairs))
	lib := &library{b: b, globals: map[string]lua.LValue{}}
	for _, name := range []string{"string", "table", "math"} {
		lib.globals[name] = b.proxyOf(L.GetGlobal(name).(*lua.LTable), name, "the standard libraries are shared by every rule")
	}
	L.G.Global.ForEach(func(k, v lua.LValue) {
		name := k.String()
		if _, done := lib.globals[name]; !done && name != "_G" {
			lib.globals[name] = v
		}
	})
	lib.stringMT = L.NewTable()
	lib.stringMT.RawSetString("__index", lib.globals["string"])
	// The strings' metatable is shared by every rule too: getmetatable("")
	// answers "locked" instead of the table, so no rule can change string
	// methods for the rules after it.
	lib.stringMT.RawSetString("__metatable", lua.LString("locked"))
	lib.share(lib.stringMT)
	for _, v := range lib.globals {
		lib.share(v)
	}
	return lib
}

// newSandbox makes a state with only the allowed libraries and runs the
// rule's top level in it, under the limits.
func newSandbox(r *Rule, fsys fs.FS, limits Limits, log *[]string, lib *library) (*sandbox, *Error) {
	L := lua.NewState(lua.Options{SkipOpenLibs: true, CallStackSize: limits.CallDepth,
		RegistrySize: 1024, RegistryMaxSize: 1024 * 256, RegistryGrowStep: 1024, MinimizeStackMemory: true})
	if log == nil {
		log = new([]string)
	}
	if lib == nil {
		lib = newLibrary(limits)
	}
	s := &sandbox{L: L, rule: r, limits: limits, log: log, proxies: lib.b.proxies, fsys: fsys, loaded: map[string]lua.LValue{},
		shared: lib.b.shared}
	for name, v := range lib.globals {
		L.SetGlobal(name, v)
	}
	L.SetGlobal("_G", L.G.Global)
	L.SetMetatable(lua.LString(""), lib.stringMT)
	L.SetGlobal("print", L.NewFunction(s.luaLog))
	L.SetGlobal("require", L.NewFunction(s.luaRequire))
	L.SetGlobal("pit", s.helpers())
	fn := L.NewFunctionFromProto(r.proto)
	if err := s.call(func() error {
		L.Push(fn)
		return L.PCall(0, 0, nil)
	}); err != nil {
		s.close()
		return nil, err
	}
	return s, nil
}

// refuse is a function standing in for one a rule may not call.
func (s *sandbox) refuse(name, why string) *lua.LFunction {
	return s.L.NewFunction(func(L *lua.LState) int {
		L.RaiseError("%s is not available to rules: %s", name, why)
		return 0
	})
}

// refusingTable is a library table whose every missing field is refused.
func (s *sandbox) refusingTable(name, why string) *lua.LTable {
	L := s.L
	t := L.NewTable()
	mt := L.NewTable()
	mt.RawSetString("__index", L.NewFunction(func(L *lua.LState) int {
		L.RaiseError("%s.%s is not available: %s", name, L.ToStringMeta(L.Get(2)).String(), why)
		return 0
	}))
	mt.RawSetString("__newindex", L.NewFunction(func(L *lua.LState) int {
		L.RaiseError("%s is read-only", name)
		return 0
	}))
	mt.RawSetString("__metatable", lua.LString("locked"))
	L.SetMetatable(t, mt)
	return t
}

func (s *sandbox) close() {
	if !s.abandoned {
		s.L.Close()
	}
}

// guardStrings replaces the string functions that can build a huge string in
// one call with versions that check the size first.
func (s *sandbox) guardStrings() {
	L := s.L
	str := L.GetGlobal("string").(*lua.LTable)
	rep := str.RawGetString("rep").(*lua.LFunction)
	str.RawSetString("rep", L.NewFunction(func(L *lua.LState) int {
		sub := L.CheckString(1)
		n := L.CheckInt(2)
		if n > 0 && int64(len(sub))*int64(n) > int64(s.limits.MaxString) {
			L.RaiseError("string.rep: the result would be %d bytes; a rule may build at most %d", int64(len(sub))*int64(n), s.limits.MaxString)
		}
		L.Push(rep)
		L.Push(lua.LString(sub))
		L.Push(lua.LNumber(n))
		L.Call(2, 1)
		return 1
	}))
	str.RawSetString("format", L.NewFunction(luaFormat))
	for _, name := range []string{"find", "match", "gmatch", "gsub"} {
		orig := str.RawGetString(name).(*lua.LFunction)
		str.RawSetString(name, L.NewFunction(func(L *lua.LState) int {
			if subj := L.CheckString(1); len(subj) > 1<<20 {
				L.RaiseError("string.%s: a rule may search at most 1 MiB of text", name)
			}
			top := L.GetTop()
			L.Push(orig)
			for i := 1; i <= top; i++ {
				L.Push(L.Get(i))
			}
			L.Call(top, lua.MultRet)
			return L.GetTop() - top
		}))
	}
}

func (s *sandbox) luaLog(L *lua.LState) int {
	var parts []string
	for i := 1; i <= L.GetTop(); i++ {
		parts = append(parts, L.ToStringMeta(L.Get(i)).String())
	}
	s.mu.Lock()
	if len(*s.log) < 200 {
		*s.log = append(*s.log, s.limits.clip(strings.Join(parts, " ")))
	}
	s.mu.Unlock()
	return 0
}

// formatSpec is one conversion of string.format: flags, width, precision
// and the option letter (or the character that stands where it should be).
var formatSpec = regexp.MustCompile(`%[-+ #0]*(\d*)(?:\.(\d*))?(.?)`)

// luaFormat is string.format with Lua's own checks: each option takes the
// value it can print, and anything else is the rule's error at its line.
// (gopher-lua hands the values to Go's fmt unchecked, so a nil printed as
// "&{}" on the card: "for a &{} °F track".) Numbers in text are taken as
// numbers, as Lua does; widths and precisions have at most 3 digits, so one
// call cannot build a huge string.
func luaFormat(L *lua.LState) int {
	f := L.CheckString(1)
	var out strings.Builder
	arg := 2
	for {
		i := strings.IndexByte(f, '%')
		if i < 0 {
			out.WriteString(f)
			break
		}
		out.WriteString(f[:i])
		f = f[i:]
		if strings.HasPrefix(f, "%%") {
			out.WriteByte('%')
			f = f[2:]
			continue
		}
		m := formatSpec.FindStringSubmatch(f)
		spec, opt := m[0], m[3]
		f = f[len(spec):]
		if len(m[1]) > 3 || len(m[2]) > 3 {
			L.RaiseError("string.format: a width or precision of more than 3 digits in %q", spec)
		}
		if opt == "" {
			L.RaiseError("string.format: the format ends inside %q (write %%%% for a percent sign)", spec)
		}
		if arg > L.GetTop() {
			L.RaiseError("string.format: argument %d (for %s) is missing: the format has more %% options than values", arg, spec)
		}
		out.WriteString(fmt.Sprintf(spec[:len(spec)-len(opt)]+goVerb(L, opt, spec), formatArg(L, arg, opt, spec)))
		arg++
	}
	L.Push(lua.LString(out.String()))
	return 1
}

// goVerb is the fmt verb for a string.format option letter.
func goVerb(L *lua.LState, opt, spec string) string {
	switch opt {
	case "d", "i", "u":
		return "d"
	case "c", "o", "x", "X", "e", "E", "f", "g", "G", "q", "s":
		return opt
	}
	L.RaiseError("string.format: '%s' is not a format (use %%d %%i %%u %%c %%o %%x %%X %%e %%E %%f %%g %%G %%q %%s, or %%%% for a percent sign)", spec)
	return ""
}

// formatArg is argument n checked for option opt: a number for the numeric
// options, text (or a number, or true/false) for %s and %q.
func formatArg(L *lua.LState, n int, opt, spec string) any {
	v := L.Get(n)
	bad := func(why string) {
		L.RaiseError("string.format: argument %d (for %s) %s", n, spec, why)
	}
	if v == lua.LNil {
		bad("is nil: the value is missing (check it first: if x == nil then … end)")
	}
	if opt == "s" || opt == "q" {
		switch x := v.(type) {
		case lua.LString, lua.LNumber:
			return x
		case lua.LBool:
			return lua.LString(x.String())
		}
		bad(fmt.Sprintf("is a %s, not text", v.Type()))
	}
	var num float64
	switch x := v.(type) {
	case lua.LNumber:
		num = float64(x)
	case lua.LString:
		f, err := strconv.ParseFloat(strings.TrimSpace(string(x)), 64)
		if err != nil {
			bad(fmt.Sprintf("is a string (%q), not a number", clipQuote(string(x))))
		}
		num = f
	default:
		bad(fmt.Sprintf("is a %s, not a number", v.Type()))
	}
	if opt == "d" || opt == "i" || opt == "u" || opt == "c" || opt == "o" || opt == "x" || opt == "X" {
		if math.IsNaN(num) || math.IsInf(num, 0) {
			bad(fmt.Sprintf("is %v, which %s cannot print as a whole number", num, spec))
		}
		return int64(num)
	}
	return num
}

// clipQuote is a value quoted in an error: its start only.
func clipQuote(s string) string {
	if utf8.RuneCountInString(s) <= 40 {
		return s
	}
	return string([]rune(s)[:40]) + "…"
}

var moduleName = regexp.MustCompile(`^[A-Za-z_][A-Za-z0-9_]*$`)

// luaRequire loads another file of rules/ as a module: require("lanes")
// runs rules/lanes.lua once and returns what it returns. Nothing outside
// rules/ can be reached.
func (s *sandbox) luaRequire(L *lua.LState) int {
	name := L.CheckString(1)
	if !moduleName.MatchString(name) {
		L.RaiseError("require %q: a rule may only require another file of rules/ by its plain name (letters, digits, _)", name)
	}
	if v, ok := s.loaded[name]; ok {
		L.Push(v)
		return 1
	}
	file := path.Join("rules", name+".lua")
	src, err := fs.ReadFile(s.fsys, file)
	if err != nil || s.fsys == nil {
		L.RaiseError("require %q: there is no %s", name, file)
	}
	proto, cerr := compile(file, string(src))
	if cerr != nil {
		L.RaiseError("%s", cerr.Error())
	}
	L.Push(L.NewFunctionFromProto(proto))
	L.Call(0, 1)
	v := L.Get(-1)
	if v == lua.LNil {
		v = lua.LTrue
	}
	s.loaded[name] = v
	L.Push(v)
	return 1
}

// luaPairs and luaIpairs see through ctx's read-only proxies.
func (s *sandbox) luaPairs(L *lua.LState) int {
	t := L.CheckTable(1)
	if d, ok := s.proxies[t]; ok {
		t = d
	}
	L.Push(L.NewFunction(func(L *lua.LState) int {
		k, v := t.Next(L.Get(2))
		if k == lua.LNil {
			L.Push(lua.LNil)
			return 1
		}
		L.Push(k)
		L.Push(v)
		return 2
	}))
	L.Push(t)
	L.Push(lua.LNil)
	return 3
}

func (s *sandbox) luaIpairs(L *lua.LState) int {
	t := L.CheckTable(1)
	if d, ok := s.proxies[t]; ok {
		t = d
	}
	L.Push(L.NewFunction(func(L *lua.LState) int {
		i := L.CheckInt(2) + 1
		v := t.RawGetInt(i)
		if v == lua.LNil {
			return 0
		}
		L.Push(lua.LNumber(i))
		L.Push(v)
		return 2
	}))
	L.Push(t)
	L.Push(lua.LNumber(0))
	return 3
}

// readOnly turns Go data into a read-only Lua value named path for errors.
// The tables it builds belong to no state in particular: a run builds ctx
// once and hands the same read-only tables to every rule in turn.
func (s *sandbox) readOnly(v any, name string) lua.LValue {
	L := s.L
	switch x := v.(type) {
	case nil:
		return lua.LNil
	case bool:
		return lua.LBool(x)
	case string:
		return lua.LString(x)
	case int:
		return lua.LNumber(x)
	case int64:
		return lua.LNumber(x)
	case float64:
		return lua.LNumber(x)
	case fmt.Stringer:
		return lua.LString(x.String())
	case []any:
		d := L.NewTable()
		for i, e := range x {
			d.RawSetInt(i+1, s.readOnly(e, fmt.Sprintf("%s[%d]", name, i+1)))
		}
		return s.proxy(d, name)
	case []map[string]any:
		d := L.NewTable()
		for i, e := range x {
			d.RawSetInt(i+1, s.readOnly(e, fmt.Sprintf("%s[%d]", name, i+1)))
		}
		return s.proxy(d, name)
	case map[string]any:
		d := L.NewTable()
		for k, e := range x {
			d.RawSetString(k, s.readOnly(e, name+"."+k))
		}
		return s.proxy(d, name)
	}
	return lua.LString(fmt.Sprint(v))
}

func (s *sandbox) proxy(d *lua.LTable, name string) *lua.LTable {
	return s.proxyOf(d, name, "ctx is pitcard's data; keep your own values in local variables")
}

// proxyOf is a read-only view of d; writing to it is an error naming the field.
func (s *sandbox) proxyOf(d *lua.LTable, name, hint string) *lua.LTable {
	L := s.L
	p := L.NewTable()
	mt := L.NewTable()
	mt.RawSetString("__index", d)
	mt.RawSetString("__newindex", L.NewFunction(func(L *lua.LState) int {
		L.RaiseError("%s.%s is read-only: %s", name, L.ToStringMeta(L.Get(2)).String(), hint)
		return 0
	}))
	mt.RawSetString("__len", L.NewFunction(func(L *lua.LState) int {
		L.Push(lua.LNumber(d.Len()))
		return 1
	}))
	mt.RawSetString("__metatable", lua.LString("read-only"))
	L.SetMetatable(p, mt)
	s.proxies[p] = d
	return p
}

// call runs f (which calls into Lua) under the limits: a context with the
// time budget that the VM checks at every instruction, and a watchdog that
// cancels it when the heap grows past the memory budget. A call stuck inside
// one library function past the budget and a grace period is abandoned.
//
// A call that runs out of time is tried once more with RetryBudget times the
// budget: the budget is wall time, and a busy laptop (the pit page serving
// phones, a fit running) can starve a three-line rule past 200 ms, which
// would fail a check and stop the dial for nothing. An endless loop is
// still stopped, after (1 + RetryBudget) budgets.
func (s *sandbox) call(f func() error) *Error {
	err := s.callWithin(f, s.limits.Time)
	if err != nil && err.timedOut && !s.abandoned {
		err = s.callWithin(f, RetryBudget*s.limits.Time)
		if err != nil && err.timedOut {
			err.Msg = fmt.Sprintf("stopped: ran longer than the %v a rule call may take, and again given %v (an endless loop?)", s.limits.Time, RetryBudget*s.limits.Time)
		}
	}
	return err
}

// RetryBudget is how many budgets a call that ran out of time is given on
// its second try.
const RetryBudget = 3

func (s *sandbox) callWithin(f func() error, budget time.Duration) *Error {
	ctx, cancel := context.WithTimeout(context.Background(), budget)
	defer cancel()
	s.L.SetContext(&weighCtx{Context: ctx, s: s, cancel: cancel})
	done := make(chan error, 1)
	s.heapBase.Store(heapBytes())
	go func() {
		defer func() {
			if p := recover(); p != nil {
				// %v, not %w: p is a recovered panic value, not an error chain a caller could check.
				done <- fmt.Errorf("the rule crashed the Lua host: %v", p)
			}
		}()
		done <- f()
	}()
	tick := time.NewTicker(time.Millisecond)
	defer tick.Stop()
	grace := time.NewTimer(budget + 300*time.Millisecond)
	defer grace.Stop()
	for {
		select {
		case err := <-done:
			s.L.RemoveContext()
			if err == nil {
				return nil
			}
			return s.locate(err, ctx)
		case <-tick.C:
			// The heap's growth is anyone's: it only says the rule's own
			// values are due to be weighed (weighCtx does it, and stops the
			// rule).
			if s.heapGrown() {
				s.weighDue.Store(true)
			}
		case <-grace.C:
			s.abandoned = true
			return &Error{File: s.rule.File, Msg: fmt.Sprintf("stopped: still busy inside one library call 300ms after its %v ran out (a huge string or pattern search?); abandoned", budget)}
		}
	}
}

var whereRe = regexp.MustCompile(`(rules/[A-Za-z0-9_.-]+\.lua):(\d+):\s*`)

// locate turns a Lua error into an Error at the rule's file and line.
func (s *sandbox) locate(err error, ctx context.Context) *Error {
	msg := err.Error()
	var ae *lua.ApiError
	if errors.As(err, &ae) {
		switch ae.Object.(type) {
		case nil: // keep err's own words
		case lua.LString, lua.LNumber:
			msg = ae.Object.String()
		default:
			// error({}) printed "table: 0x…": say what happened instead
			msg = fmt.Sprintf("the rule raised an error with a %s, not a message (give error a text: error(\"what is wrong\"))", ae.Object.Type())
		}
	}
	e := &Error{File: s.rule.File}
	if m := whereRe.FindStringSubmatchIndex(msg); m != nil {
		e.File, e.Line = msg[m[2]:m[3]], atoi(msg[m[4]:m[5]])
		msg = msg[m[1]:]
	} else if ae != nil {
		if m := whereRe.FindStringSubmatch(ae.StackTrace); m != nil {
			e.File, e.Line = m[1], atoi(m[2])
		}
	}
	s.mu.Lock()
	mem := s.memOut
	s.mu.Unlock()
	switch {
	case mem:
		msg = fmt.Sprintf("stopped: used more than the %d MiB of memory a rule call may use", s.limits.Memory>>20)
	case errors.Is(ctx.Err(), context.DeadlineExceeded):
		msg = fmt.Sprintf("stopped: ran longer than the %v a rule call may take (an endless loop?)", s.limits.Time)
		e.timedOut = true
	case strings.Contains(msg, "stack overflow"):
		msg = fmt.Sprintf("stopped: calls nested deeper than %d (endless recursion?)", s.limits.CallDepth)
	case strings.Contains(msg, "registry overflow"):
		msg = "stopped: used too many values at once (a huge unpack or argument list?)"
	}
	e.Msg = s.limits.clip(strings.TrimSpace(msg))
	return e
}

var heapSample = []metrics.Sample{{Name: "/memory/classes/heap/objects:bytes"}}
var heapMu sync.Mutex

func heapBytes() int64 {
	heapMu.Lock()
	defer heapMu.Unlock()
	metrics.Read(heapSample)
	return int64(heapSample[0].Value.Uint64())
}
