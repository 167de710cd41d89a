package scripts

import (
	"fmt"
	"io/fs"
	"os"
	"strings"
	"testing"

	"github.com/shopspring/decimal"
)

func shippedRule(t *testing.T, name string) *Rule {
	t.Helper()
	src, err := fs.ReadFile(Shipped(), "rules/"+name)
	if err != nil {
		t.Fatal(err)
	}
	r := Compile("rules/"+name, string(src), Shipped(), DefaultLimits)
	if r.Err != nil {
		t.Fatal(r.Err)
	}
	return r
}

func runWith(t *testing.T, r *Rule, ctx map[string]any) Result {
	t.Helper()
	res := Run([]*Rule{r}, Shipped(), ctx, DefaultLimits)[0]
	if len(res.Errors) > 0 {
		t.Fatalf("%s: %v", r.File, res.Errors[0])
	}
	return res
}

func TestShippedRulesLoad(t *testing.T) {
	rules, err := Load(Shipped(), DefaultLimits)
	if err != nil || len(rules) != 5 {
		t.Fatalf("%d rules, %v", len(rules), err)
	}
	for _, r := range rules {
		t.Run(r.File, func(t *testing.T) {
			if r.Err != nil || len(r.Defines) == 0 {
				t.Errorf("%s: %v, defines %v", r.File, r.Err, r.Defines)
			}
		})
	}
}

func TestLaneTimeRule(t *testing.T) {
	r := shippedRule(t, "10-lane-time.lua")
	if res := runWith(t, r, ctxFor("left", 20.75, 100)); !res.HasAdjust || res.Adjust.String() != "-0.01" || !strings.Contains(res.Reason, "left lane after 20:30") {
		t.Errorf("left after dark: %+v", res)
	}
	for _, c := range []map[string]any{ctxFor("right", 21, 100), ctxFor("left", 19.5, 100)} {
		if res := runWith(t, r, c); res.HasAdjust {
			t.Errorf("adjusted %+v", res)
		}
	}
}

func TestTrackTempRule(t *testing.T) {
	r := shippedRule(t, "20-track-temp.lua")
	if res := runWith(t, r, ctxFor("left", 15, 135)); !res.HasAdjust || res.Adjust.String() != "0.02" || !strings.Contains(res.Reason, "135 °F") || !strings.Contains(res.Reason, "dial slower") {
		t.Errorf("hot: %+v", res)
	}
	if res := runWith(t, r, ctxFor("left", 15, 125)); res.HasAdjust {
		t.Errorf("125 °F adjusted: %+v", res)
	}
	if res := runWith(t, r, ctxFor("left", 15, 0)); res.HasAdjust || len(res.Log) != 1 {
		t.Errorf("no track temp: %+v", res)
	}
}

// The tire-pressure table is one crew's drag-radial numbers (common practice,
// no source): the note says so beside the pressure, and the rule is silent
// for street tires and slicks, which the table is not for.
func TestTirePressureRule(t *testing.T) {
	r := shippedRule(t, "40-tire-pressure.lua")
	cases := map[float64]string{75: "16.5 psi", 95: "16.0 psi", 118: "15.5 psi", 135: "15.0 psi", 150: "14.5 psi", 0: "no track temperature"}
	for _, tire := range []any{nil, "", "radial", "Radial"} { // car.yaml's default is radial
		for track, want := range cases {
			t.Run(fmt.Sprintf("tire %v, track %v °F", tire, track), func(t *testing.T) {
				c := ctxFor("left", 15, track)
				c["car"].(map[string]any)["tire"] = tire
				res := runWith(t, r, c)
				if len(res.Notes) != 1 || !strings.Contains(res.Notes[0], want) {
					t.Errorf("tire %v, track %v: %v, want %q", tire, track, res.Notes, want)
					return
				}
				if track != 0 && (!strings.Contains(res.Notes[0], "drag radials") || !strings.Contains(res.Notes[0], "tire maker's minimum comes first")) {
					t.Errorf("tire %v, track %v: %q does not say whose numbers these are", tire, track, res.Notes[0])
				}
			})
		}
	}
	for _, tire := range []string{"street", "slick", "SLICK"} {
		t.Run(tire, func(t *testing.T) {
			c := ctxFor("left", 15, 95)
			c["car"].(map[string]any)["tire"] = tire
			if res := runWith(t, r, c); len(res.Notes) != 0 {
				t.Errorf("%s tires got %q", tire, res.Notes)
			}
		})
	}
}

func TestPrestageRule(t *testing.T) {
	r := shippedRule(t, "50-prestage.lua")
	res := runWith(t, r, ctxFor("left", 15, 100))
	if len(res.Checks) != 6 {
		t.Errorf("%d items", len(res.Checks))
	}
	for _, c := range res.Checks {
		if c.Status != Confirm {
			t.Errorf("%q is %s, want confirm", c.Label, c.Status)
		}
	}
	c := ctxFor("left", 15, 100)
	c["car"].(map[string]any)["chute"] = true
	if res := runWith(t, r, c); len(res.Checks) != 7 {
		t.Errorf("with a chute: %d items", len(res.Checks))
	}
	// no dial posted (ctx.dial is nil): there is no dial to match on the window
	c = ctxFor("left", 15, 100)
	delete(c, "dial")
	res = runWith(t, r, c)
	var labels []string
	for _, ch := range res.Checks {
		labels = append(labels, ch.Label)
	}
	all := strings.Join(labels, "\n")
	if len(res.Checks) != 6 || strings.Contains(all, "Dial on the window") || !strings.Contains(all, "No dial yet: make a time trial") {
		t.Errorf("no dial: items\n%s", all)
	}
}

func mustDec(s string) decimal.Decimal { return decimal.RequireFromString(s) }

// The other-lane rule moves the dial to the one that wins most when it is
// worth three points and breaks out at most 15 % of the time, and does
// nothing without an opponent (pitcard's own strategy rule; no source).
func TestOtherLaneRule(t *testing.T) {
	r := shippedRule(t, "60-other-lane.lua")
	ctx := ctxFor("left", 20, 100)
	if res := runWith(t, r, ctx); res.HasAdjust && !res.Adjust.IsZero() {
		t.Errorf("no opponent: adjusted %s", res.Adjust)
	}
	ctx["opponent"] = map[string]any{"dial": 12.1, "margin": 0.005, "margin_sd": 0.008, "rt_mean": 0.015, "rt_sd": 0.008}
	ctx["dial"] = map[string]any{"recommended": 11.46, "recommended_text": "11.46", "win_chance": 0.40,
		"best_for_win": map[string]any{"dial": 11.48, "win_chance": 0.46, "breakout_chance": 0.12}}
	res := runWith(t, r, ctx)
	if !res.HasAdjust || res.Adjust.String() != "0.02" || !strings.Contains(res.Reason, "11.48 wins 46 %") {
		t.Errorf("a 6-point gain at 12 %% breakout: %+v", res)
	}
	ctx["dial"].(map[string]any)["best_for_win"] = map[string]any{"dial": 11.49, "win_chance": 0.46, "breakout_chance": 0.30}
	if res := runWith(t, r, ctx); res.HasAdjust && !res.Adjust.IsZero() {
		t.Errorf("30 %% breakout accepted: %+v", res)
	}
}

// The README's example rule runs as printed, with and without a track
// temperature (it printed "for a &{} °F track" when none was read).
func TestReadmeExampleRule(t *testing.T) {
	doc, err := os.ReadFile("../README.md")
	if err != nil {
		t.Fatal(err)
	}
	_, rest, ok := strings.Cut(string(doc), "### The crew's rules")
	_, rest, ok2 := strings.Cut(rest, "```lua\n")
	src, _, ok3 := strings.Cut(rest, "```")
	if !ok || !ok2 || !ok3 {
		t.Fatal("the README has no ```lua example under \"The crew's rules\"")
	}
	r := Compile("rules/example.lua", src, nil, DefaultLimits)
	if r.Err != nil || len(r.Defines) != 3 {
		t.Fatalf("example: %v, defines %v", r.Err, r.Defines)
	}
	for _, tc := range []struct {
		name   string
		trackF float64
		want   string
	}{{"track read", 118, "118 °F"}, {"no track temperature", 0, "no track temperature"}} {
		t.Run(tc.name, func(t *testing.T) {
			res := runWith(t, r, ctxFor("left", 20.75, tc.trackF))
			if len(res.Notes) != 1 || !strings.Contains(res.Notes[0], tc.want) {
				t.Errorf("notes %q, want one saying %q", res.Notes, tc.want)
			}
		})
	}
}
