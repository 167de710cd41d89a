package scripts

import (
	"strings"
	"testing"
	"time"
)

// A call that runs out of its wall-time budget is tried once more with
// RetryBudget times the budget: a rule starved by a busy machine passes on
// the second try, an endless loop is still stopped, and says both budgets.
func TestATimedOutCallIsTriedOnceMore(t *testing.T) {
	starved := "n = 0\nfunction dial(ctx)\n  n = n + 1\n  if n == 1 then while true do end end\n  return 0.01, 'second try'\nend\n"
	res := runSrc(t, starved)
	if len(res.Errors) != 0 || !res.HasAdjust || res.Reason != "second try" {
		t.Errorf("a call that ran out once: %+v", res)
	}
	start := time.Now()
	res = runSrc(t, "function dial(ctx)\n  while true do end\nend\n")
	took := time.Since(start)
	if len(res.Errors) == 0 || !strings.Contains(res.Errors[0].Error(), "and again given 600ms") {
		t.Errorf("an endless loop: %+v", res.Errors)
	}
	if took < (1+RetryBudget)*DefaultLimits.Time || took > 3*time.Second {
		t.Errorf("an endless loop stopped after %v", took)
	}
}
