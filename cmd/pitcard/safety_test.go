package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"pitcard/event"
	"pitcard/logbook"
)

// A limit the crew entered that the prediction breaks reaches the dial box
// of every card format and of 'dial', the JSON, and the exit status (3),
// while the whole card still prints. The demo car runs about 11.40 at
// 118 mph on the 1/4 mile; each limit below is set just past that.
func TestAFailedLimitStopsTheDial(t *testing.T) {
	cases := []struct{ name, from, to, words string }{
		{"ET", "limit_et: 10.65", "limit_et: 11.50", "ET limit: could run 11."},
		{"MPH", "limit_mph: 126", "limit_mph: 117", "MPH limit: could trap"},
		{"parachute", "chute_needed_mph: 141", "chute_needed_mph: 115", "Parachute: could trap"},
		{"belts", `belts_expire: "2027-03"`, `belts_expire: "2026-05"`, "date tag ran out in 2026-05"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			dir := demoCopy(t)
			editFile(t, dir, "car.yaml", func(s string) string {
				if !strings.Contains(s, tc.from) {
					t.Fatalf("car.yaml lacks %q", tc.from)
				}
				return strings.Replace(s, tc.from, tc.to, 1)
			})
			args := []string{"--dir", dir, "--round", "3", "--lane", "left"}
			out, errs, code := pitcard(t, append([]string{"card"}, args...)...)
			box := strings.Join(strings.Fields(out[:strings.Index(out, "Air")]), " ")
			if code != exitCheckFailed || !strings.Contains(box, "DO NOT") || !strings.Contains(box, tc.words) ||
				strings.Contains(box, "POST THIS") || !strings.Contains(out, "Cautions") || !strings.Contains(errs, "a check failed") {
				t.Errorf("card exit %d, dial box:\n%s\nstderr: %s", code, box, errs)
			}
			for _, format := range []string{"markdown", "html"} {
				out, _, code := pitcard(t, append([]string{"card", "--format", format}, args...)...)
				if code != exitCheckFailed || !strings.Contains(out, "STOP") || !strings.Contains(out, tc.words) {
					t.Errorf("%s card exit %d", format, code)
				}
			}
			js, _, code := pitcard(t, append([]string{"card", "--format", "json"}, args...)...)
			var j struct {
				ChecksFailed []string `json:"checks_failed"`
				Problems     []string `json:"problems"`
				Dial         struct {
					Flag string `json:"flag"`
					Post bool   `json:"post"`
				} `json:"dial"`
			}
			if err := json.Unmarshal([]byte(js), &j); err != nil || code != exitCheckFailed || len(j.ChecksFailed) != 1 ||
				!strings.Contains(j.ChecksFailed[0], tc.words) || j.Dial.Post || !strings.Contains(j.Dial.Flag, "A CHECK FAILED") || len(j.Problems) == 0 {
				t.Errorf("card JSON exit %d (%v): %+v", code, err, j)
			}
			dial, _, code := pitcard(t, "dial", "--dir", dir)
			if code != exitCheckFailed || !strings.Contains(dial, "← STOP: a check failed") || !strings.Contains(strings.Join(strings.Fields(dial), " "), tc.words) {
				t.Errorf("dial exit %d:\n%s", code, dial)
			}
			var dj dialJSON
			djs, _, _ := pitcard(t, "dial", "--dir", dir, "--format", "json")
			if err := json.Unmarshal([]byte(djs), &dj); err != nil || dj.PostOK || len(dj.ChecksFailed) != 1 {
				t.Errorf("dial JSON (%v): %+v", err, dj)
			}
		})
	}
}

// 'dial' and the card post one number: the final dial after the crew's
// rules, with the breakout rule's pick labeled as before the rules.
func TestDialAndCardPostOneNumber(t *testing.T) {
	card := mustRun(t, "card", "--demo", "--format", "json")
	var c struct {
		Final json.Number `json:"final_dial"`
	}
	if err := json.Unmarshal([]byte(card), &c); err != nil || c.Final == "" {
		t.Fatalf("card JSON: %v %q", err, c.Final)
	}
	var d dialJSON
	if err := json.Unmarshal([]byte(mustRun(t, "dial", "--demo", "--format", "json")), &d); err != nil || d.Post != c.Final || !d.PostOK {
		t.Errorf("dial posts %q (%v), the card %q", d.Post, err, c.Final)
	}
	text := mustRun(t, "dial", "--demo")
	if !strings.Contains(text, string(c.Final)+" │") || !strings.Contains(text, "← post this") || !strings.Contains(text, "← before the rules") {
		t.Errorf("dial text:\n%s", text)
	}
}

// A track far hotter than any in the logbook must not move the dial half a
// second unnoticed: the plain cross-check (the latest clean passes carried
// by the air alone) stands beside the model, and the dial box says when
// they part by more than cross_check_max_s.
func TestHotTrackIsCrossChecked(t *testing.T) {
	var j struct {
		Cross struct {
			ET   float64 `json:"et"`
			Diff float64 `json:"model_minus_cross_s"`
			Flag string  `json:"flag"`
		} `json:"cross_check"`
	}
	if err := json.Unmarshal([]byte(mustRun(t, "card", "--demo", "--format", "json")), &j); err != nil || j.Cross.ET < 11.3 || j.Cross.ET > 11.6 || j.Cross.Flag != "" {
		t.Errorf("demo cross-check (%v): %+v", err, j.Cross)
	}
	out := mustRun(t, "card", "--demo", "--track-temp", "160F")
	box := strings.Join(strings.Fields(out[:strings.Index(out, "Air")]), " ")
	if !strings.Contains(box, "CHECK: the model's") || !strings.Contains(box, "than the cross-check's") {
		t.Errorf("160 °F track, dial box:\n%s", box)
	}
	_ = json.Unmarshal([]byte(mustRun(t, "card", "--demo", "--track-temp", "160F", "--format", "json")), &j)
	if j.Cross.Flag == "" || math.Abs(j.Cross.Diff) <= 0.05 {
		t.Errorf("160 °F cross-check: %+v", j.Cross)
	}
	if _, _, code := pitcard(t, "card", "--demo"); code != 0 {
		t.Errorf("demo card exit %d", code)
	}
}

// 'dial --round --lane' posts that round's card dial; a round that is not
// one is refused, not quietly replaced by another number.
func TestDialForAGivenRound(t *testing.T) {
	var c struct {
		Final json.Number `json:"final_dial"`
	}
	_ = json.Unmarshal([]byte(mustRun(t, "card", "--demo", "--round", "E4", "--lane", "right", "--format", "json")), &c)
	var d dialJSON
	if err := json.Unmarshal([]byte(mustRun(t, "dial", "--demo", "--round", "E4", "--lane", "right", "--format", "json")), &d); err != nil || d.Post != c.Final || c.Final == "" {
		t.Errorf("dial for E4 right posts %q (%v), its card %q", d.Post, err, c.Final)
	}
	if out := mustRun(t, "dial", "--demo", "--round", "E4", "--lane", "right"); !strings.Contains(strings.Join(strings.Fields(out), " "), "Post this dial for round 4, right lane: "+string(c.Final)) {
		t.Errorf("dial text:\n%s", out)
	}
	if _, errs, code := pitcard(t, "dial", "--demo", "--round", "X9"); code != exitBadInput || !strings.Contains(errs, "--round") {
		t.Errorf("--round X9: exit %d %s", code, errs)
	}
	if _, errs, code := pitcard(t, "dial", "--demo", "--round", "E4", "--latest"); code != exitBadInput || !strings.Contains(errs, "drop --latest") {
		t.Errorf("--round with --latest: exit %d %s", code, errs)
	}
}

// Beyond the hottest track the logbook has seen (140 °F), the interval
// widens with every step further out (it used to shrink from ±0.35 s at 150 °F to ±0.11 s
// at 160 °F where the fitted grip curve goes flat).
func TestTheIntervalWidensPastTheLogbook(t *testing.T) {
	last := 0.0
	for _, f := range []string{"140F", "150F", "160F", "180F", "200F"} {
		var j struct {
			Timers []struct{ ET, Low, High float64 } `json:"timers"`
		}
		if err := json.Unmarshal([]byte(mustRun(t, "predict", "--demo", "--latest", "--track-temp", f, "--format", "json")), &j); err != nil || len(j.Timers) == 0 {
			t.Fatalf("%s: %v", f, err)
		}
		fin := j.Timers[len(j.Timers)-1]
		half := (fin.High - fin.Low) / 2
		if half <= last {
			t.Errorf("track %s: ±%.3f s, no wider than ±%.3f s nearer the logbook", f, half, last)
		}
		last = half
	}
}

// dial races the other lane the card races: its dial noted for the round in
// rounds.csv (from the pit page) gives the table its chances to win.
func TestDialReadsTheNotedOtherLane(t *testing.T) {
	dir := demoCopy(t)
	e, err := event.Open(event.OpenOptions{Dir: dir})
	if err != nil {
		t.Fatal(err)
	}
	if err := e.SetOpponentDial("2026-06-13", logbook.Session{Kind: logbook.Elimination, N: 3}, "11.88", fixedNow); err != nil {
		t.Fatal(err)
	}
	var d dialJSON
	if err := json.Unmarshal([]byte(mustRun(t, "dial", "--dir", dir, "--format", "json")), &d); err != nil || d.BestForWin == nil || d.Options[0].WinChance == nil {
		t.Errorf("dial without --opponent-dial, the card's other lane noted (%v): %+v", err, d)
	}
}

// A round whose card said STOP ends with exit 3 even when its slip is then
// refused (3 wins over 2, as the README says).
func TestRoundKeepsTheStopWhenTheSlipIsRefused(t *testing.T) {
	dir := demoCopy(t)
	editFile(t, dir, "car.yaml", func(s string) string { return strings.Replace(s, "limit_et: 10.65", "limit_et: 11.50", 1) })
	answers := strings.Join([]string{"", "", "", "", "", "", "", "", "", "", "", "fast"}, "\n") + "\n"
	out, errs, code := pitcardIn(t, answers, "round", "--dir", dir)
	if code != exitCheckFailed || !strings.Contains(out, "A CHECK FAILED") || !strings.Contains(errs, "the slip was not logged") {
		t.Errorf("exit %d\n%s\n%s", code, out, errs)
	}
}
