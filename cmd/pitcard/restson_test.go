package main

import (
	"encoding/json"
	"fmt"
	"math"
	"pitcard/engine"
	"strings"
	"testing"
)

// blendJSON is the object that says what a prediction rests on, as predict
// (under "prediction"), the card (under "prediction") and dial (top level)
// write it.
type blendJSON struct {
	Members []struct {
		Name  string   `json:"name"`
		Share float64  `json:"share"`
		ET    *float64 `json:"et"`
		MAE   *float64 `json:"mae"`
	} `json:"members"`
	Scored    int     `json:"scored"`
	Scale     float64 `json:"scale"`
	ColdStart bool    `json:"cold_start"`
	Change    *struct {
		What     string  `json:"what"`
		First    string  `json:"first"`
		Since    int     `json:"since"`
		Offset   float64 `json:"offset"`
		OffsetSD float64 `json:"offset_sd"`
	} `json:"change"`
	Outside struct {
		TrackF *float64 `json:"track_f"`
		DAFt   *float64 `json:"density_altitude_ft"`
	} `json:"outside"`
}

// check is the blend's own arithmetic: the shares are a split of the
// finish (they sum to 1), the pass model is a member, the scale is a
// factor (common practice, no source: a weighted average's weights).
func (b *blendJSON) check(t *testing.T, what string) {
	t.Helper()
	if b == nil {
		t.Fatalf("%s: no blend object", what)
	}
	var sum float64
	names := map[string]bool{}
	for _, m := range b.Members {
		sum += m.Share
		names[m.Name] = true
		if m.Share < 0 || m.Share > 1 {
			t.Errorf("%s: member %q share %v outside 0..1", what, m.Name, m.Share)
		}
	}
	// five members: the pass model, the latest passes carried by the air, today's passes,
	// passes on a like surface, the last pass carried by the air
	if len(b.Members) != 5 || math.Abs(sum-1) > 0.002 || !names["the pass model"] {
		t.Errorf("%s: members %+v (shares sum to %.4f, want 1)", what, b.Members, sum)
	}
	if !(b.Scale > 0) {
		t.Errorf("%s: scale %v", what, b.Scale)
	}
}

// oneLine is a text with its wrapped lines joined, so a phrase is found
// wherever the width broke it.
func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

// predict says what its finish rests on: the blend's members and shares,
// each member's held-out miss, the interval's scale, in text and in JSON.
func TestPredictRestsOn(t *testing.T) {
	out := mustRun(t, "predict", "--demo", "--format", "json")
	var j struct {
		Prediction struct {
			Blend *blendJSON `json:"blend"`
		} `json:"prediction"`
		Basis map[string]any `json:"basis"`
	}
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	b := j.Prediction.Blend
	b.check(t, "predict")
	if b.Scored != engine.ScoredPasses || b.ColdStart || b.Change != nil {
		t.Errorf("the demo's blend: scored %d, cold start %v, change %+v", b.Scored, b.ColdStart, b.Change)
	}
	for _, m := range b.Members {
		if m.Name == "the pass model" && (m.ET == nil || m.MAE == nil || *m.MAE <= 0 || *m.MAE > 0.1) {
			t.Errorf("the pass model's figures: %+v", m)
		}
	}
	if b.Outside.TrackF == nil || *b.Outside.TrackF != 0 || b.Outside.DAFt == nil || *b.Outside.DAFt != 0 {
		t.Errorf("the demo's call lies inside its logbook: outside %+v", b.Outside)
	}
	if _, ok := j.Basis["passes_calibrated"]; !ok {
		t.Error("the older basis object lost its keys")
	}
	text := oneLine(mustRun(t, "predict", "--demo"))
	block := text[strings.Index(text, "Rests on:"):]
	for _, w := range []string{"Rests on:", "the pass model ", "the last pass carried by the air", "mean miss", "interval ×", fmt.Sprintf("from the car's own misses on %d passes", engine.ScoredPasses)} {
		if !strings.Contains(block, w) {
			t.Errorf("predict's text lacks %q:\n%s", w, text)
		}
	}
	if strings.Count(text, "interval ×") != 1 {
		t.Errorf("the blend is said once:\n%s", text)
	}
}

// A pass noted with a change of the car: predict, the card and dial say
// how many passes the changed car has run, what the change was and when.
func TestRestsOnSaysPassesSinceTheChange(t *testing.T) {
	dir := demoCopy(t)
	mustRun(t, "log", "add", "--dir", dir, "--date", "2026-06-13", "--time", "20:35", "--round", "E3", "--lane", "right",
		"--et60", "1.58", "--et1320", "11.31", "--change", "new converter")
	text := oneLine(mustRun(t, "predict", "--dir", dir, "--latest"))
	if !strings.Contains(text, "1 pass since the change 'new converter' (06-13") {
		t.Errorf("predict does not say the passes since the change:\n%s", text)
	}
	var j struct {
		Prediction struct {
			Blend *blendJSON `json:"blend"`
		} `json:"prediction"`
	}
	if err := json.Unmarshal([]byte(mustRun(t, "predict", "--dir", dir, "--latest", "--format", "json")), &j); err != nil {
		t.Fatal(err)
	}
	j.Prediction.Blend.check(t, "predict")
	c := j.Prediction.Blend.Change
	if c == nil || c.What != "new converter" || c.Since != 1 || !strings.HasPrefix(c.First, "2026-06-13T20:35") || !(c.OffsetSD > 0) {
		t.Errorf("change %+v", c)
	}
	card := oneLine(mustRun(t, "card", "--dir", dir))
	if !strings.Contains(card, "1 pass since the change 'new converter' (06-13") || strings.Contains(card, "The car was changed before") {
		t.Errorf("the card says the change once, on its Leaned on line:\n%s", card)
	}
}

// dial says what its estimate rests on in one line, and in its JSON.
func TestDialRestsOn(t *testing.T) {
	var j struct {
		Basis string     `json:"basis"`
		Blend *blendJSON `json:"blend"`
	}
	if err := json.Unmarshal([]byte(mustRun(t, "dial", "--demo", "--format", "json")), &j); err != nil {
		t.Fatal(err)
	}
	j.Blend.check(t, "dial")
	if j.Basis == "" {
		t.Error("dial's basis words are gone")
	}
	text := oneLine(mustRun(t, "dial", "--demo"))
	if !strings.Contains(text, "Rests on the pass model ") || !strings.Contains(text, fmt.Sprintf("from the car's own misses on %d passes", engine.ScoredPasses)) {
		t.Errorf("dial's text:\n%s", text)
	}
	// An estimate given by hand rests on no blend.
	if err := json.Unmarshal([]byte(mustRun(t, "dial", "--demo", "--et", "11.5", "--sd", "0.03", "--format", "json")), &j); err != nil {
		t.Fatal(err)
	}
	if j.Blend != nil {
		t.Errorf("--et and --sd rest on no blend: %+v", j.Blend)
	}
}

// The card's JSON carries the blend under its prediction; on a track
// hotter than any pass, the Leaned on line says so (and no line is added).
func TestCardRestsOn(t *testing.T) {
	var j struct {
		Prediction struct {
			Blend *blendJSON `json:"blend"`
		} `json:"prediction"`
	}
	if err := json.Unmarshal([]byte(mustRun(t, "card", "--demo", "--track-temp", "160F", "--format", "json")), &j); err != nil {
		t.Fatal(err)
	}
	b := j.Prediction.Blend
	b.check(t, "card")
	// The demo's hottest pass ran on a 140 °F track.
	if b.Outside.TrackF == nil || *b.Outside.TrackF != 20 {
		t.Errorf("outside %+v, want the track 20 °F past the logbook", b.Outside)
	}
	for _, format := range []string{"text", "markdown", "html"} {
		hot := oneLine(mustRun(t, "card", "--demo", "--track-temp", "160F", "--format", format))
		if !strings.Contains(hot, "today is 20 °F hotter on the track than any pass leaned on") || strings.Contains(hot, "Today lies outside") {
			t.Errorf("%s: the hot card's Leaned on line:\n%s", format, hot)
		}
		plain := oneLine(mustRun(t, "card", "--demo", "--format", format))
		if strings.Contains(plain, "hotter on the track than any") || strings.Contains(plain, "since the change") {
			t.Errorf("%s: the demo's card says what does not apply", format)
		}
	}
}
