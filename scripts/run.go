package scripts

import (
	"fmt"
	"io/fs"
	"math"
	"strings"
	"time"

	"github.com/shopspring/decimal"
	lua "github.com/yuin/gopher-lua"
)

// Check statuses.
const (
	Pass    = "pass"
	Warn    = "warn"
	Fail    = "fail"
	Confirm = "confirm" // an item a person must tick on the card
)

// Check is one checklist item a rule returned (or its failure).
type Check struct {
	Label  string
	Status string // pass, warn, fail or confirm
	Note   string
	File   string // the rule that returned it
}

// Result is what one rule file returned.
type Result struct {
	File      string
	Defines   []string
	HasAdjust bool
	Adjust    decimal.Decimal // s, added to the recommended dial
	Reason    string
	Checks    []Check
	Notes     []string
	Log       []string // pit.log and print lines
	Errors    []*Error // every failure; each is also a failed check
	Took      time.Duration
}

// MaxAdjust is the largest adjustment, s, one rule may return.
const MaxAdjust = 1.0

// Run runs every rule on ctx, each in its own sandbox, in order. A rule's
// failure is recorded in its Result (and as a failed check); the others go on.
func Run(rules []*Rule, fsys fs.FS, ctx map[string]any, limits Limits) []Result {
	out := make([]Result, 0, len(rules))
	// The libraries and the read-only ctx are built once and shared.
	lib := newLibrary(limits)
	defer lib.b.L.Close()
	arg := lib.b.readOnly(ctx, "ctx")
	lib.share(arg)
	for _, r := range rules {
		out = append(out, runOne(r, fsys, arg, lib, limits))
	}
	return out
}

func runOne(r *Rule, fsys fs.FS, arg lua.LValue, lib *library, limits Limits) (res Result) {
	res = Result{File: r.File, Defines: r.Defines}
	start := time.Now()
	defer func() { res.Took = time.Since(start) }()
	fail := func(err *Error) {
		// a copy: r.Err is shared by every run of the rule
		e := &Error{File: err.File, Line: err.Line, Msg: limits.clip(err.Msg)} // an item's label or status quoted in the message is the rule's text
		res.Errors = append(res.Errors, e)
		res.Checks = append(res.Checks, Check{Label: "rule " + r.File, Status: Fail, Note: e.Error(), File: r.File})
	}
	if r.Err != nil {
		fail(r.Err)
		return res
	}
	s, err := newSandbox(r, fsys, limits, &res.Log, lib)
	if err != nil {
		fail(err)
		return res
	}
	defer s.close()
	for _, hook := range r.Defines {
		fn, ok := s.hook(hook).(*lua.LFunction)
		if !ok {
			// the file's top level ran again in this state and chose otherwise
			fail(&Error{File: r.File, Msg: fmt.Sprintf("%s was a function when the file loaded, and is a %s now", hook, s.hook(hook).Type())})
			continue
		}
		var rets []lua.LValue
		err := s.call(func() error {
			s.L.Push(fn)
			s.L.Push(arg)
			if err := s.L.PCall(1, 2, nil); err != nil {
				return err
			}
			rets = []lua.LValue{s.L.Get(-2), s.L.Get(-1)}
			s.L.Pop(2)
			return nil
		})
		if err != nil {
			fail(err)
			if s.abandoned {
				return res
			}
			continue
		}
		if e := collect(&res, hook, fn, rets, r.File, s); e != nil {
			fail(e)
		}
	}
	return res
}

// collect checks and stores what hook fn returned. Every text is cut at
// the limits' MaxText here, where it leaves the rule.
func collect(res *Result, hook string, fn *lua.LFunction, rets []lua.LValue, file string, s *sandbox) *Error {
	line := 0 // where the hook is defined: a wrong result is that function's
	if fn.Proto != nil {
		line = fn.Proto.LineDefined
	}
	c := collector{res: res, file: file, s: s, clip: s.limits.clip, bad: func(format string, a ...any) *Error {
		return &Error{File: file, Line: line, Msg: hook + "(ctx) " + fmt.Sprintf(format, a...)}
	}}
	switch hook {
	case "dial":
		return c.dial(rets[0], rets[1])
	case "checks":
		return c.checks(rets[0])
	case "notes":
		return c.notes(rets[0])
	}
	return nil
}

// collector stores one hook's results in res; bad makes the error of a
// wrong result, at the line where the hook is defined.
type collector struct {
	res  *Result
	file string
	s    *sandbox
	clip func(string) string
	bad  func(format string, a ...any) *Error
}

// dial checks the adjustment v and its reason and adds it to the result. It
// does not round the adjustment: the card rounds the total.
func (c collector) dial(v, why lua.LValue) *Error {
	bad := c.bad
	var adj decimal.Decimal
	switch x := v.(type) {
	case *lua.LNilType:
		return nil
	case lua.LNumber:
		f := float64(x)
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return bad("returned %v, not an adjustment in seconds", f)
		}
		adj = decimal.NewFromFloat(f)
	case lua.LString:
		d, err := decimal.NewFromString(strings.TrimSpace(string(x)))
		if err != nil {
			return bad("returned %q, not an adjustment in seconds", string(x))
		}
		adj = d
	default:
		return bad("returned a %s; it must return an adjustment in seconds (a number) and a reason", v.Type())
	}
	if adj.Abs().GreaterThan(decimal.NewFromFloat(MaxAdjust)) {
		return bad("returned %s s; an adjustment beyond ±%.0f s is surely a mistake (seconds, not hundredths?)", adj, MaxAdjust)
	}
	reason, ok := why.(lua.LString)
	if !adj.IsZero() && (!ok || strings.TrimSpace(string(reason)) == "") {
		return bad("returned %s s without a reason (return the adjustment and a reason string)", adj)
	}
	if adj.IsZero() {
		return nil
	}
	res := c.res
	res.HasAdjust, res.Adjust, res.Reason = true, res.Adjust.Add(adj), c.clip(string(reason))
	return nil
}

// checks checks each item of the list v and adds it to the result's
// checks. A wrong item stops the list there: the items before it are kept.
func (c collector) checks(v lua.LValue) *Error {
	bad, clip := c.bad, c.clip
	items, err := list(v, c.s)
	if err != nil {
		return bad("%s", err)
	}
	for i, it := range items {
		t, ok := it.(*lua.LTable)
		if !ok {
			return bad("item %d is a %s; each item is a table {label=..., status=..., note=...}", i+1, it.Type())
		}
		label, lok := t.RawGetString("label").(lua.LString)
		status, sok := t.RawGetString("status").(lua.LString)
		if !lok || strings.TrimSpace(string(label)) == "" {
			return bad("item %d has no label", i+1)
		}
		st := strings.ToLower(string(status))
		if !sok || (st != Pass && st != Warn && st != Fail && st != Confirm) {
			return bad("item %d (%s) has status %q; use pass, warn, fail or confirm", i+1, clip(string(label)), clip(t.RawGetString("status").String()))
		}
		note := ""
		switch n := t.RawGetString("note").(type) {
		case *lua.LNilType:
		case lua.LString, lua.LNumber:
			note = n.String()
		default: // a table's String is its address: "table: 0x…" on the card
			return bad("item %d (%s) has a note that is a %s, not text", i+1, clip(string(label)), n.Type())
		}
		c.res.Checks = append(c.res.Checks, Check{Label: clip(string(label)), Status: st, Note: clip(note), File: c.file})
	}
	return nil
}

// notes adds the note v (one string, or a list of strings and numbers) to
// the result. A wrong line stops the list there: the lines before it are kept.
func (c collector) notes(v lua.LValue) *Error {
	res := c.res
	if str, ok := v.(lua.LString); ok {
		res.Notes = append(res.Notes, c.clip(string(str)))
		return nil
	}
	items, err := list(v, c.s)
	if err != nil {
		return c.bad("%s", err)
	}
	for i, it := range items {
		str, ok := it.(lua.LString)
		if !ok {
			if n, isNum := it.(lua.LNumber); isNum {
				str = lua.LString(n.String())
			} else {
				return c.bad("line %d is a %s, not a string", i+1, it.Type())
			}
		}
		res.Notes = append(res.Notes, c.clip(string(str)))
	}
	return nil
}

// list reads a Lua array (nil is empty).
func list(v lua.LValue, s *sandbox) ([]lua.LValue, error) {
	switch t := v.(type) {
	case *lua.LNilType:
		return nil, nil
	case *lua.LTable:
		if d, ok := s.proxies[t]; ok {
			t = d
		}
		var out []lua.LValue
		for i := 1; i <= t.Len(); i++ {
			out = append(out, t.RawGetInt(i))
			if len(out) > 100 {
				return nil, fmt.Errorf("returned more than 100 items")
			}
		}
		return out, nil
	}
	return nil, fmt.Errorf("returned a %s; it must return a list (a table)", v.Type())
}
