package scripts

import (
	"context"
	"reflect"
	"unsafe"

	lua "github.com/yuin/gopher-lua"
)

// The memory budget of a rule call is charged with the rule's own values:
// what its Lua state can reach (its globals, the locals, temporaries and
// upvalues of the calls under way, the modules it required), weighed by an
// estimate of the bytes each takes on the Go heap. The tables and strings
// pitcard shares with every rule (the libraries, ctx) are not the rule's and
// are not weighed; a table a rule got from pit.air is.
//
// gopher-lua has no allocation hook, so the weighing is a walk of the state,
// and it runs where it is safe: in the rule's own goroutine, between two
// instructions (the VM asks the call's context whether it is done before
// each one; weighCtx answers by weighing first when a weighing is due). The
// process heap only says when one is due: each time it has grown by half of
// what the rule could still add before passing its budget (weighAfter). Other goroutines'
// allocations (the pit page serving phones) can make weighings more
// frequent; they are never charged to the rule.

// Estimates of the Go heap bytes of gopher-lua's values (64-bit, gopher-lua
// v1.1.2's structs rounded to Go's size classes).
const (
	tableBytes    = 96  // an LTable
	slotBytes     = 16  // one LValue (an interface) in an array, a list or a register
	strEntryBytes = 48  // one entry of a map keyed by string (key, value, the map's spare room)
	keyEntryBytes = 48  // one entry of a map keyed by any value
	k2iEntryBytes = 32  // one entry of the table's key → position map
	numberBytes   = 8   // a boxed number
	stringBytes   = 16  // a string's header, beside its bytes
	funcBytes     = 64  // an LFunction
	upvalueBytes  = 48  // one captured variable
	mapBytes      = 320 // a map's header and first group of 8 entries
	// sharedStringLen is the length from which a string's bytes are counted
	// once however many places hold it; shorter ones are counted each time.
	sharedStringLen = 64
)

// weighCtx is a rule call's context: the time budget's, with a weighing of
// the rule's values before the VM's check of each instruction when one is
// due.
type weighCtx struct {
	context.Context
	s      *sandbox
	cancel context.CancelFunc
	steps  uint32 // instructions run, to look at the heap every 4096 of them
}

// Done is the VM's check before each instruction. When the watchdog has
// asked for a weighing it weighs the rule's values here, in the VM's own
// goroutine, and cancels the call when they are over the budget.
func (c *weighCtx) Done() <-chan struct{} {
	c.steps++
	// The watchdog's tick can come late on a busy machine: the VM looks at
	// the heap itself now and then.
	if c.s.weighDue.Load() || (c.steps%4096 == 0 && c.s.heapGrown()) {
		c.s.weighDue.Store(false)
		n := c.s.weigh()
		c.s.ruleBytes.Store(n)
		if n > c.s.limits.Memory {
			c.s.mu.Lock()
			c.s.memOut = true
			c.s.mu.Unlock()
			c.cancel()
		}
	}
	return c.Context.Done()
}

// heapGrown says whether the process heap has grown by weighAfter over its
// lowest since the last weighing was asked for, and if so starts the count
// afresh. The watchdog and the VM both ask; one of them gets the yes.
func (s *sandbox) heapGrown() bool {
	h := heapBytes()
	base := s.heapBase.Load()
	if h < base { // a collection: growth counts from the lowest heap seen
		s.heapBase.CompareAndSwap(base, h)
		return false
	}
	return h-base >= s.weighAfter() && s.heapBase.CompareAndSwap(base, h)
}

// weighAfter is how much the process heap must grow before the rule's
// values are weighed again: half what the rule could still add before it
// passes its budget (so the weighing comes before the heap has grown by the
// walk's own room as well), and at least a sixteenth of the budget so that
// a rule close to its budget is not weighed at every tick.
func (s *sandbox) weighAfter() int64 {
	return max((s.limits.Memory-s.ruleBytes.Load())/2, s.limits.Memory/16)
}

// weigher walks a rule's values and adds up their estimated bytes. It does
// not follow the values pitcard shares with the rule.
type weigher struct {
	s *sandbox
	// seen: the addresses of the tables, functions and long strings
	// counted (addresses, not values: half the room, and the walk needs
	// room too); the state keeps them alive while the walk runs.
	seen   map[uintptr]struct{}
	tables []*lua.LTable    // counted, their contents not yet
	funcs  []*lua.LFunction // counted, their upvalues not yet
	total  int64
	depth  int // tables being counted inside one another
}

// weigh is the estimated bytes of the values the rule's state can reach. It
// stops counting once past the budget. It must run in the goroutine running
// the state, between instructions.
func (s *sandbox) weigh() int64 {
	if s.w == nil {
		s.w = &weigher{s: s, seen: map[uintptr]struct{}{}}
	}
	w := s.w
	clear(w.seen)
	for p := range s.shared { // not the rule's: as if counted already
		w.seen[p] = struct{}{}
	}
	w.total = 0
	L := s.L
	w.add(L.G.Global)
	w.add(L.G.Registry)
	for _, v := range s.loaded {
		w.add(v)
	}
	w.frames()
	for w.total <= s.limits.Memory {
		if n := len(w.tables); n > 0 {
			t := w.tables[n-1]
			w.tables = w.tables[:n-1]
			w.table(t)
		} else if n := len(w.funcs); n > 0 {
			f := w.funcs[n-1]
			w.funcs = w.funcs[:n-1]
			w.function(f)
		} else {
			break
		}
	}
	// keep no value alive after the walk
	clear(w.tables[:cap(w.tables)])
	clear(w.funcs[:cap(w.funcs)])
	w.tables, w.funcs = w.tables[:0], w.funcs[:0]
	return w.total
}

// frames queues the function, locals and temporaries of every call under
// way. Values passed as a vararg function's ... are not among them.
func (w *weigher) frames() {
	L := w.s.L
	for level := 0; level <= max(w.s.limits.CallDepth, lua.CallStackSize)+1; level++ {
		dbg, ok := L.GetStack(level)
		if !ok {
			return
		}
		if fn, err := L.GetInfo("f", dbg, lua.LNil); err == nil {
			w.add(fn)
		}
		for n := 1; ; n++ {
			name, v := L.GetLocal(dbg, n)
			if name == "" {
				break
			}
			w.total += slotBytes
			w.add(v)
		}
	}
}

// add counts a string or a number at once, and a table not yet counted
// too unless it is deep inside others; it queues the others and functions.
func (w *weigher) add(v lua.LValue) {
	switch x := v.(type) {
	case lua.LString:
		if len(x) >= sharedStringLen && w.counted(unsafe.Pointer(unsafe.StringData(string(x)))) {
			return
		}
		w.total += stringBytes + int64(len(x))
	case lua.LNumber:
		w.total += numberBytes
	case *lua.LTable:
		if w.counted(unsafe.Pointer(x)) {
			return
		}
		if w.depth < 16 { // at once: the queue of a long list of tables would take room
			w.depth++
			w.table(x)
			w.depth--
			return
		}
		w.tables = append(w.tables, x)
	case *lua.LFunction:
		if !w.counted(unsafe.Pointer(x)) {
			w.funcs = append(w.funcs, x)
		}
	}
}

// function counts a function and its captured variables and adds their
// values.
func (w *weigher) function(f *lua.LFunction) {
	w.total += funcBytes + int64(len(f.Upvalues))*upvalueBytes
	for _, uv := range f.Upvalues {
		w.add(uv.Value())
	}
	if f.Env != nil {
		w.add(f.Env)
	}
}

// counted says whether the object at p is already counted, and marks it.
func (w *weigher) counted(p unsafe.Pointer) bool {
	n := len(w.seen)
	w.seen[uintptr(p)] = struct{}{} // one lookup, not two: the walk's cost is mostly here
	return len(w.seen) == n
}

// tableFields are the indexes of LTable's fields whose sizes are read by
// reflection (their lengths and capacities only: gopher-lua does not say
// how much room a table holds).
var tableFields = func() (f struct{ array, dict, strdict, keys, k2i int }) {
	t := reflect.TypeFor[lua.LTable]()
	for _, p := range []struct {
		name string
		to   *int
	}{{"array", &f.array}, {"dict", &f.dict}, {"strdict", &f.strdict}, {"keys", &f.keys}, {"k2i", &f.k2i}} {
		sf, ok := t.FieldByName(p.name)
		if !ok {
			panic("scripts: gopher-lua's LTable has no field " + p.name + ": the memory weighing must be updated")
		}
		*p.to = sf.Index[0]
	}
	return f
}()

// table counts a table's own room (its array's capacity, its maps' entries)
// and queues its metatable, keys and values.
func (w *weigher) table(t *lua.LTable) {
	r := reflect.ValueOf(t).Elem()
	strs, others := r.Field(tableFields.strdict).Len(), r.Field(tableFields.dict).Len()
	w.total += tableBytes + int64(r.Field(tableFields.array).Cap()+r.Field(tableFields.keys).Cap())*slotBytes +
		int64(strs)*strEntryBytes + int64(others)*keyEntryBytes + int64(r.Field(tableFields.k2i).Len())*k2iEntryBytes
	for _, m := range []int{tableFields.strdict, tableFields.dict, tableFields.k2i} {
		if !r.Field(m).IsNil() {
			w.total += mapBytes
		}
	}
	w.add(t.Metatable)
	n := t.MaxN()
	for i := 1; i <= n; i++ {
		w.add(t.RawGetInt(i))
	}
	if strs+others == 0 {
		return
	}
	// Next from the array's last key goes on with the keys outside it (from
	// nil when there is no array: Next(0) would skip the first of them).
	var k lua.LValue = lua.LNil
	if n > 0 {
		k = lua.LNumber(n)
	}
	for w.total <= w.s.limits.Memory {
		var v lua.LValue
		k, v = t.Next(k)
		if k == lua.LNil {
			return
		}
		w.add(k)
		w.add(v)
	}
}
