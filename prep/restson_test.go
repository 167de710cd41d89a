package prep

import (
	"encoding/json"
	"math"
	"testing"

	"pitcard/engine"
	"pitcard/weather"
)

// How far today lies outside the logbook, in the crew's units and with its
// side: a temperature difference is 5/9 °C per °F (no 32 offset, from
// memory), a length 0.3048 m per ft (NIST), a density altitude to its step.
func TestOutsideWords(t *testing.T) {
	metric := weather.Units{Temp: weather.DegC, Length: weather.UnitM}
	cases := []struct {
		name string
		s    engine.Sensitivity
		read bool
		u    weather.Units
		want string
	}{
		{"within", engine.Sensitivity{TrackF: 100, SeenTrackLo: 70, SeenTrackHi: 140}, true, weather.Imperial, ""},
		{"hotter", engine.Sensitivity{TrackF: 160, SeenTrackLo: 71, SeenTrackHi: 140, ExtrapolatedT: 20}, true, weather.Imperial,
			"today is 20 °F hotter on the track than any pass leaned on"},
		{"colder, in °C", engine.Sensitivity{TrackF: 50, SeenTrackLo: 70, SeenTrackHi: 140, ExtrapolatedT: 20}, true, metric,
			"today is 11 °C colder on the track than any pass leaned on"},
		{"not read", engine.Sensitivity{TrackF: 150, SeenTrackLo: 70, SeenTrackHi: 140, ExtrapolatedT: 10}, false, weather.Imperial,
			"today is 10 °F hotter on the track (the track estimated from the air, not read) than any pass leaned on"},
		{"thinner air and hotter", engine.Sensitivity{TrackF: 150, SeenTrackHi: 140, ExtrapolatedT: 10, DAFeet: 6000, SeenDALo: 1000, SeenDAHi: 5200, ExtrapolatedDA: 800},
			true, weather.Imperial, "today is 10 °F hotter on the track and 800 ft higher in density altitude than any pass leaned on"},
		{"lower, in m", engine.Sensitivity{DAFeet: 0, SeenDALo: 1000, SeenDAHi: 5200, ExtrapolatedDA: 1000}, true, metric,
			"today is 305 m lower in density altitude than any pass leaned on"},
		{"under a degree", engine.Sensitivity{TrackF: 140.4, SeenTrackHi: 140, ExtrapolatedT: 0.4}, true, weather.Imperial, ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := outsideWords(tc.s, tc.read, tc.u); got != tc.want {
				t.Errorf("got  %q\nwant %q", got, tc.want)
			}
		})
	}
}

// A member that could not predict has no ET or miss: JSON null, not NaN
// (which encoding/json refuses); the shares are the blend's.
func TestBlendJSONNullsWhatAMemberLacks(t *testing.T) {
	p := engine.Prediction{Blend: engine.Blend{Scale: 1, ColdStart: true, Members: []engine.MemberShare{
		{Name: "the pass model", ET: 11.5, MAE: math.NaN()},
		{Name: "the latest passes carried by the air", Share: 1, ET: 11.45, MAE: math.NaN()},
		{Name: "today's passes", ET: math.NaN(), MAE: math.NaN()},
	}}}
	data, err := json.Marshal(BlendJSON(p, engine.Fit{}))
	if err != nil {
		t.Fatal(err)
	}
	const want = `{"change":null,"cold_start":true,"members":[{"et":11.5,"mae":null,"name":"the pass model","share":0},` +
		`{"et":11.45,"mae":null,"name":"the latest passes carried by the air","share":1},{"et":null,"mae":null,"name":"today's passes","share":0}],` +
		`"outside":{"density_altitude_ft":0,"track_f":0},"scale":1,"scored":0}`
	if string(data) != want {
		t.Errorf("got  %s\nwant %s", data, want)
	}
	if BlendJSON(engine.Prediction{}, engine.Fit{}) != nil {
		t.Error("a prediction not blended has no blend object")
	}
	if got := RestsOnLine(p, engine.Fit{Samples: make([]engine.Sample, 2)}, weather.Imperial); got != "the latest passes carried by the air 100 %; cold start: 2 passes carried by the air; nothing fitted" {
		t.Errorf("cold start line %q", got)
	}
}

// The engine's own notes are recognized for what they are, so the card
// leaves out those it says in its own words: a pass model on 60 passes
// notes its calibration and its blend, two passes the cold start, and a
// note of any other kind is printed (the engine's wording, engine/predict.go
// and engine/blend.go; no outside source).
func TestNoteKindsOfTheEnginesNotes(t *testing.T) {
	for _, tc := range []struct {
		name   string
		passes int
		want   []noteKind // kinds the prediction's notes must include
		not    []noteKind // kinds they must not
	}{
		{"fitted", 60, []noteKind{noteCalibration, noteBlend}, []noteKind{noteColdStart}},
		{"cold start", 2, []noteKind{noteColdStart}, []noteKind{noteCalibration, noteBlend}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := Gather(input(modelLogbook(tc.passes), nil, nil))
			got := map[noteKind]bool{}
			for _, n := range c.Prediction.Notes {
				got[kindOf(c.Prediction, c.Fit, n)] = true
			}
			for _, k := range tc.want {
				if !got[k] {
					t.Errorf("no note of kind %d in %q", k, c.Prediction.Notes)
				}
			}
			for _, k := range tc.not {
				if got[k] {
					t.Errorf("a note of kind %d in %q", k, c.Prediction.Notes)
				}
			}
			for _, n := range c.Prediction.Notes {
				k := kindOf(c.Prediction, c.Fit, n)
				if left := k == noteCalibration || said(c.Prediction, k); left == (k == noteOther) {
					t.Errorf("note %q (kind %d): left out %v", n, k, left)
				}
			}
		})
	}
}

// A note's kind is what the engine named it (Prediction.CalibrationNote
// and the others) or, for the change of the car, the change itself; a note
// of the same opening words that the engine did not name is another kind
// (pitcard's own rule; no outside source).
func TestKindOf(t *testing.T) {
	change := &engine.Change{What: "new converter", Since: 2, Before: 30}
	f := engine.Fit{Change: change}
	p := engine.Prediction{
		CalibrationNote: "calibrated to 30 clean passes (2020-04-01 to 2020-04-03); the correction leans mostly on the latest 4",
		BlendNote:       "leaned on the pass model 95 % (by the last 30 passes); interval ×1.09 from their misses",
		OutsideNote:     "today lies outside the conditions of the passes leaned on (x): the interval is widened by 0.010 s",
		ColdStartNote:   "only 2 clean passes at 1320 ft: the prediction carries them to this air by the SAE J1349 factor alone; nothing is fitted yet",
	}
	for _, tc := range []struct {
		name, note string
		want       noteKind
	}{
		{"calibration", p.CalibrationNote, noteCalibration},
		{"blend", p.BlendNote, noteBlend},
		{"outside", p.OutsideNote, noteOutside},
		{"cold start", p.ColdStartNote, noteColdStart},
		{"change", change.Text(), noteChange},
		{"other", "track temperature not read: taken as the air plus 10 °F", noteOther},
		{"the same opening words, not named", "calibrated to a rule of thumb", noteOther},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if got := kindOf(p, f, tc.note); got != tc.want {
				t.Errorf("kindOf(%q) = %d, want %d", tc.note, got, tc.want)
			}
		})
	}
}
