package scripts

import (
	"strings"
	"testing"
	"time"
)

// Whatever a rule file holds, the host neither panics nor hangs: every
// failure is an Error naming the rule's file, and every result it accepts
// has the shape the card expects.
func FuzzRule(f *testing.F) {
	for _, s := range []string{
		"function dial(ctx) return -0.01, 'x' end",
		"function checks(ctx) return {{label='a', status='pass'}} end",
		"function notes(ctx) return {'a', 1} end",
		"function dial(ctx) return '0.02', 'text' end",
		"function checks(ctx) return {{label=ctx.round.lane, status=ctx.x}} end",
		"x = 1 +",
		"function notes(ctx) return ctx.passes end",
		"function dial(ctx) return 1e309, 'inf' end",
		"setmetatable(_G, {__index = function() while true do end end})\nfunction notes(ctx) return {x} end",
		"setmetatable(_G, {__index = function() error('boom') end})",
		"dial = 0.01",
		"function notes(ctx) return {string.format('%d %s %q %5.1f', nil, {}, 1)} end",
	} {
		f.Add(s)
	}
	lim := DefaultLimits
	lim.Time = 50 * time.Millisecond
	f.Fuzz(func(t *testing.T, src string) {
		r := Compile("rules/f.lua", src, nil, lim)
		res := Run([]*Rule{r}, nil, ctxFor("left", 20, 100), lim)[0]
		for _, e := range res.Errors {
			if e.File != "rules/f.lua" || !strings.HasPrefix(e.Error(), "rules/f.lua") {
				t.Fatalf("error %q does not name the rule", e)
			}
		}
		if res.HasAdjust && (res.Adjust.Abs().GreaterThan(decimalOne) || res.Reason == "") {
			t.Fatalf("accepted adjustment %s with reason %q", res.Adjust, res.Reason)
		}
		for _, c := range res.Checks {
			switch c.Status {
			case Pass, Warn, Fail, Confirm:
			default:
				t.Fatalf("accepted status %q", c.Status)
			}
			if c.Label == "" {
				t.Fatal("accepted a check without a label")
			}
		}
	})
}

var decimalOne = mustDec("1")
