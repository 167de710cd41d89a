package prep

import (
	"fmt"
	"math"
	"strings"
	"time"

	"pitcard/engine"
	"pitcard/internal/text"
	"pitcard/weather"
)

// What a blended prediction rests on (engine.Forecast): the members and
// their shares, how each missed the car's own latest passes, the interval's
// scale, the passes since a change of the car and how far today lies
// outside the logbook's conditions. One formatter per figure below; predict
// prints them as a block (RestsOn), the card and dial as one line
// (RestsOnLine), and every JSON carries the same object (BlendJSON).

// hasBlend says whether the prediction was blended: physics alone, the
// plain average of passes without weather and Predict alone have no
// members.
func hasBlend(p engine.Prediction) bool { return len(p.Blend.Members) > 0 }

// RestsOn is what the prediction rests on, a line per figure, in the crew's
// units: nil when it was not blended.
func RestsOn(p engine.Prediction, f engine.Fit, u weather.Units) []string {
	if !hasBlend(p) {
		return nil
	}
	out := []string{p.Blend.Text()}
	if m := missWords(p.Blend); m != "" {
		out = append(out, m)
	}
	return append(out, restsOnRest(p, f, u)...)
}

// RestsOnLine is RestsOn in one line, without the members' misses (the
// card is at its page limit): "the pass model 95 %, today's passes 5 %;
// interval ×1.09 from the car's own misses on 30 passes", and the change
// and the outside words only when they apply. "" when not blended.
func RestsOnLine(p engine.Prediction, f engine.Fit, u weather.Units) string {
	if !hasBlend(p) {
		return ""
	}
	return strings.Join(append([]string{p.Blend.Text()}, restsOnRest(p, f, u)...), "; ")
}

// restsOnRest is the interval's scale (or the cold start), the change and
// the outside words.
func restsOnRest(p engine.Prediction, f engine.Fit, u weather.Units) []string {
	out := []string{scaleWords(p.Blend, len(f.Samples))}
	if f.Change != nil {
		out = append(out, changeWords(*f.Change))
	}
	if w := outsideWords(p.Sensitivity, p.Air.HasTrack, u); w != "" {
		out = append(out, w)
	}
	return out
}

// noteKind is what a note of the prediction is about, so the card can
// leave out the notes it says in its own words without each caller reading
// the note's wording.
type noteKind int

const (
	noteOther       noteKind = iota // a note printed as it is
	noteCalibration                 // what the model was calibrated to: Explain says it
	noteBlend                       // what the blend leaned on: RestsOnLine says it
	noteOutside                     // today outside the logbook's conditions: RestsOnLine says it
	noteColdStart                   // too few passes to fit anything: RestsOnLine says it
	noteChange                      // the change of the car (f.Change): RestsOnLine says it
)

// kindOf says what a note of prediction p, made with fit f, is about: the
// engine names its notes (Prediction.CalibrationNote and the others) and
// the change's is its own text (f.Change.Text()), so a note is told apart by
// what it is, never by its wording.
func kindOf(p engine.Prediction, f engine.Fit, note string) noteKind {
	switch {
	case note == "":
		return noteOther
	case f.Change != nil && note == f.Change.Text():
		return noteChange
	case note == p.CalibrationNote:
		return noteCalibration
	case note == p.BlendNote:
		return noteBlend
	case note == p.OutsideNote:
		return noteOutside
	case note == p.ColdStartNote:
		return noteColdStart
	}
	return noteOther
}

// said reports whether a note of kind k is one RestsOnLine says in its own
// words (the blend's, the cold start's, the change's, the outside one), so
// the card and predict do not say it twice. It says nothing of the
// calibration's note, which Explain says.
func said(p engine.Prediction, k noteKind) bool {
	if !hasBlend(p) {
		return false
	}
	switch k {
	case noteChange, noteBlend, noteOutside:
		return true
	case noteColdStart:
		return p.Blend.ColdStart
	}
	return false
}

// missWords is each member's mean miss on the car's own latest passes,
// each predicted from the passes before it: "mean miss on the car's own
// passes: the pass model 0.018 s, today's passes 0.025 s" (the members
// the shares name, with a pass scored).
func missWords(b engine.Blend) string {
	var parts []string
	pct := b.Percents()
	for i, m := range b.Members {
		if pct[i] > 0 && !math.IsNaN(m.MAE) { // the members the shares line names
			parts = append(parts, fmt.Sprintf("%s %.3f s", m.Name, m.MAE))
		}
	}
	if len(parts) == 0 {
		return ""
	}
	return "mean miss on the car's own passes, each predicted from those before it: " + strings.Join(parts, ", ")
}

// scaleWords is the interval's scale and what it was learned from, or the
// cold start: "interval ×1.35 from the car's own misses on 30 passes",
// "cold start: 2 passes carried by the air; nothing fitted".
func scaleWords(b engine.Blend, passes int) string {
	if b.ColdStart {
		return fmt.Sprintf("cold start: %s carried by the air; nothing fitted", text.Plural(passes, "pass"))
	}
	return fmt.Sprintf("interval ×%.2f from the car's own misses on %s", b.Scale, text.Plural(b.Scored, "pass"))
}

// changeWords is the passes the changed car has run: "2 passes since the
// change 'new converter' (06-13)". The crew's words are cut as a pass's
// notes are on the card.
func changeWords(c engine.Change) string {
	return fmt.Sprintf("%s since the change '%s' (%s)", text.Plural(c.Since, "pass"), passNotes(c.What), c.First.Time.Format("01-02"))
}

// outside is how far today lies beyond the conditions of the passes leaned
// on: + above the highest, − below the lowest, 0 within (°F of track, ft of
// density altitude).
func outside(s engine.Sensitivity) (trackF, daFt float64) {
	if s.ExtrapolatedT > 0 {
		trackF = s.ExtrapolatedT
		if s.TrackF < s.SeenTrackLo {
			trackF = -trackF
		}
	}
	if s.ExtrapolatedDA > 0 {
		daFt = s.ExtrapolatedDA
		if s.DAFeet < s.SeenDALo {
			daFt = -daFt
		}
	}
	return trackF, daFt
}

// outsideWords says how far today lies beyond the logbook's conditions, in
// the crew's units: "today is 20 °F hotter on the track than any pass
// leaned on; its density altitude 800 ft higher". "" within them.
func outsideWords(s engine.Sensitivity, trackRead bool, u weather.Units) string {
	trackF, daFt := outside(s)
	var parts []string
	if d := math.Round(math.Abs(trackF) * tempStep(u)); d >= 1 {
		w := "hotter"
		if trackF < 0 {
			w = "colder"
		}
		est := ""
		if !trackRead {
			est = " (the track estimated from the air, not read)"
		}
		parts = append(parts, fmt.Sprintf("%.0f %s %s on the track%s", d, u.Temp, w, est))
	}
	if da := weather.Feet(math.Abs(daFt)); weather.RoundDensityAltitude(da.In(u.Length), u.Length) > 0 {
		w := "higher"
		if daFt < 0 {
			w = "lower"
		}
		parts = append(parts, fmt.Sprintf("%s %s in density altitude", da.FormatDensityAltitude(u.Length), w))
	}
	if len(parts) == 0 {
		return ""
	}
	return "today is " + strings.Join(parts, " and ") + " than any pass leaned on"
}

// tempStep is degrees of the crew's unit per °F of difference.
func tempStep(u weather.Units) float64 {
	if u.Temp == weather.DegC {
		return 5.0 / 9
	}
	return 1
}

// BlendJSON is what the prediction rests on as JSON, the same object in
// the card's and predict's "prediction" and dial's "blend": members [{name,
// share, et, mae}] (et and mae null where the member had none), scored,
// scale, cold_start, change {what, first, since, before, offset, offset_sd}
// or null, outside {track_f, density_altitude_ft} (+ beyond the logbook's
// highest, − below its lowest, 0 within). nil when not blended.
func BlendJSON(p engine.Prediction, f engine.Fit) map[string]any {
	if !hasBlend(p) {
		return nil
	}
	b := p.Blend
	members := []map[string]any{}
	for _, m := range b.Members {
		members = append(members, map[string]any{"name": m.Name, "share": round(m.Share, 4), "et": orNull(m.ET, 3), "mae": orNull(m.MAE, 4)})
	}
	var change any
	if c := f.Change; c != nil {
		change = map[string]any{"what": c.What, "first": c.First.Time.Format(time.RFC3339), "since": c.Since, "before": c.Before,
			"offset": round(c.Offset, 4), "offset_sd": round(c.OffsetSD, 4)}
	}
	trackF, daFt := outside(p.Sensitivity)
	return map[string]any{"members": members, "scored": b.Scored, "scale": round(b.Scale, 3), "cold_start": b.ColdStart, "change": change,
		"outside": map[string]any{"track_f": round(trackF, 1), "density_altitude_ft": weather.RoundDensityAltitude(daFt, weather.UnitFt)}}
}

// orNull is v rounded, or nil (JSON null) for NaN: JSON has no NaN.
func orNull(v float64, d int) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return round(v, d)
}
