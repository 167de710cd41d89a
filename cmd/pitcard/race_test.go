package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// Both lanes fouled: the slips name no winner (common practice, no source:
// the first to foul loses and only the officials know who that was), in
// text and in JSON; and the margin in feet is at the trailing car's speed
// (physics: .010 s at 105 mph is 0.010·105·5280/3600 = 1.54 ft; at the
// leader's 95 mph it would be 1.39 ft).
func TestRaceDoubleFoulAndTrailingSpeed(t *testing.T) {
	base := []string{"race", "--left-dial", "14.20", "--left-rt", ".520", "--left-et", "14.32", "--left-mph", "95",
		"--right-dial", "13.00", "--right-rt", ".550", "--right-et", "13.10", "--right-mph", "105", "--rt-zero", "amber"}
	t.Run("double foul, text", func(t *testing.T) {
		out := mustRun(t, append(base, "--left-foul", "--right-foul")...)
		if !strings.Contains(out, "No winner on the slips (double foul)") || strings.Contains(out, "Winner:") {
			t.Errorf("double foul:\n%s", out)
		}
	})
	t.Run("double foul, json", func(t *testing.T) {
		var j map[string]any
		if err := json.Unmarshal([]byte(mustRun(t, append(base, "--left-foul", "--right-foul", "--format", "json")...)), &j); err != nil {
			t.Fatal(err)
		}
		if j["winner"] != "" || j["reason"] != "double foul" {
			t.Errorf("double foul: winner %q reason %q", j["winner"], j["reason"])
		}
	})
	t.Run("margin at the trailing car's speed", func(t *testing.T) {
		var j map[string]any
		if err := json.Unmarshal([]byte(mustRun(t, append(base, "--format", "json")...)), &j); err != nil {
			t.Fatal(err)
		}
		// rounded to 0.1 ft by the JSON writer: 1.54 → 1.5 (95 mph would give 1.4)
		if j["winner"] != "left" || j["margin_s"] != 0.01 || j["margin_ft"] != 1.5 {
			t.Errorf("race %v", j)
		}
	})
}
