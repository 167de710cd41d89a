package prep

import (
	"encoding/json"
	"io"
	"math"
	"strings"
	"time"

	"pitcard/bracket"
	"pitcard/engine"
	"pitcard/scripts"
	"pitcard/weather"
)

// RenderJSON writes every number on the card as JSON.
func RenderJSON(w io.Writer, c Card) error {
	j := headJSON(c)
	addContextJSON(j, c)
	if len(c.Prediction.Timers) > 0 {
		j["prediction"] = PredictionJSON(c.Prediction, c.Fit)
	}
	if c.HasCross {
		j["cross_check"] = crossCheckJSON(c)
	}
	if c.NoDial != "" {
		j["no_dial"] = c.NoDial
	}
	if c.FewPasses != "" {
		j["few_passes"] = c.FewPasses
	}
	if c.PlanErr == nil && len(c.Plan.Options) > 0 {
		addDialJSON(j, c)
	}
	j["rules"] = rulesJSON(c)
	j["checklist"] = checklistJSON(c)
	j["today"] = todayJSON(c)
	if !math.IsNaN(c.RecordMAE) && len(c.Record) > 0 {
		j["today_mean_miss_s"] = round(c.RecordMAE, 4)
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(j)
}

// headJSON is the card's keys that are always there: the round, the air,
// the problems, cautions and notes.
func headJSON(c Card) map[string]any {
	in := c.Input
	return map[string]any{
		"title":           c.Title,
		"session":         in.Session.String(),
		"lane":            string(in.Lane),
		"call_time":       in.Call.Format(time.RFC3339),
		"minutes_to_call": round(c.MinutesToGo, 1),
		"track":           in.Track.Name,
		"car":             in.Car.Name,
		"air_now":         airJSON(c.LatestAir, c.LatestReading, in),
		"air_at_call":     airJSON(c.AirCall, in.Air, in),
		"air_source":      in.AirSource,
		"prep":            engine.PrepName(in.TrackPrep),
		// A failed check is a problem too: a script that reads only
		// "problems" must not post a dial the car's own limits forbid.
		"problems":      nonNil(append(append([]string(nil), c.Problems...), c.Failed...)),
		"checks_failed": nonNil(c.Failed),
		"cautions":      c.Cautions,
		"notes":         nonNil(c.Notes),
	}
}

// addContextJSON adds to j what the round was given beyond the air: the
// other lane's dial and figures, and the forecast the call's air came
// from, each when there is one.
func addContextJSON(j map[string]any, c Card) {
	in := c.Input
	if in.OpponentDial.Valid {
		j["opponent_dial"] = json.Number(dialText(in.OpponentDial.Decimal, in.Settings.DialStep))
	}
	if o := in.Opponent; o != nil {
		// What the chance to win assumed of the other lane, and from where.
		j["opponent"] = map[string]any{"margin_s": round(o.Margin, 4), "margin_sd_s": round(o.MarginSD, 4), "rt_mean": round(o.RT.Mean, 4),
			"rt_sd": round(o.RT.SD, 4), "from": o.From}
	}
	if in.Forecast != nil {
		j["forecast"] = map[string]any{"readings_used": in.Forecast.Used, "trend_minutes": round(in.Forecast.Span.Minutes(), 1),
			"ahead_minutes": round(in.Forecast.Ahead.Minutes(), 1), "trusted": in.Forecast.Trusted, "notes": in.Forecast.Notes,
			"density_altitude_error_ft": weather.RoundDensityAltitude(in.Forecast.DAError.Feet(), weather.UnitFt)}
	}
}

// crossCheckJSON is the cross-check and, with a prediction, how far the
// model is from it.
func crossCheckJSON(c Card) map[string]any {
	cc := map[string]any{"et": round(c.Cross.ET, 3), "passes": len(c.Cross.Passes), "basis": c.Cross.Basis, "limit_s": crossLimit(c.Input.Settings), "flag": c.CrossFlag}
	if len(c.Prediction.Timers) > 0 {
		cc["model_minus_cross_s"] = round(c.Prediction.Finish().ET-c.Cross.ET, 3)
	}
	return cc
}

// addDialJSON adds to j the dial: its options, its flags, the race
// against the other lane and the final dial, each when there is one.
func addDialJSON(j map[string]any, c Card) {
	var opts []map[string]any
	for _, o := range c.Plan.Options {
		m := map[string]any{"dial": json.Number(dialText(o.Dial, c.Plan.Step)), "breakout_chance": round(o.BreakoutChance, 4),
			"expected_giveaway_s": round(o.Giveaway, 4), "recommended": o.Recommended,
			"post": c.HasFinal && o.Dial.Equal(c.FinalDial)} // recommended: the breakout rule's, before the crew's rules
		if w, ok := winOf(c, o.Dial); ok {
			m["win_chance"] = round(w, 4)
		}
		opts = append(opts, m)
	}
	j["dial"] = map[string]any{"recommended": json.Number(dialText(c.Plan.Recommended, c.Plan.Step)), "step": json.Number(c.Plan.Step.String()), "breakout_risk": c.Plan.Risk,
		"options": opts, "rule_total": json.Number(dialText(c.TotalAdjust, c.Plan.Step)), "flag": strings.Join(dialFlags(c), "; "),
		"post": c.HasFinal && len(c.Failed) == 0}
	if len(c.Win) > 0 {
		j["best_for_win"] = map[string]any{"dial": json.Number(dialText(c.BestForWin.Dial, c.Plan.Step)), "win_chance": round(c.BestForWin.Win, 4),
			"breakout_chance": round(bracket.BreakoutChance(c.Plan.Estimate, c.BestForWin.Dial), 4)}
		j["head_start_s"] = bracket.HeadStart(c.Plan.Recommended, c.Input.Opponent.Dial).InexactFloat64()
		j["win_draws"] = bracket.WinDraws
		if c.WinTrade != "" {
			j["win_trade"] = c.WinTrade
		}
	}
	if c.HasFinal {
		j["final_dial"] = json.Number(dialText(c.FinalDial, c.Plan.Step))
		j["final_breakout_chance"] = round(bracket.BreakoutChance(c.Plan.Estimate, c.FinalDial), 4)
	}
}

// dialFlags is what stands against posting the dial: the failed checks,
// the rules' total and the cross-check, in that order.
func dialFlags(c Card) []string {
	flags := []string{}
	if len(c.Failed) > 0 {
		flags = append(flags, failedWords(c.Failed))
	}
	if c.AdjustFlag != "" {
		flags = append(flags, c.AdjustFlag)
	}
	if c.CrossFlag != "" {
		flags = append(flags, c.CrossFlag)
	}
	return flags
}

// rulesJSON is each rule file's run: what it defines, its log, its
// adjustment and its errors.
func rulesJSON(c Card) []map[string]any {
	var rules []map[string]any
	for _, r := range c.Rules {
		m := map[string]any{"file": r.File, "defines": nonNil(r.Defines), "log": nonNil(r.Log), "took_ms": round(float64(r.Took.Microseconds())/1000, 2)}
		if r.HasAdjust {
			m["adjust"], m["reason"] = json.Number(dialText(r.Adjust, c.Input.Settings.DialStep)), r.Reason
		}
		var errs []string
		for _, e := range r.Errors {
			errs = append(errs, e.Error())
		}
		m["errors"] = nonNil(errs)
		rules = append(rules, m)
	}
	return nonNilMaps(rules)
}

// checklistJSON is the checklist's items with their status.
func checklistJSON(c Card) []map[string]any {
	var checks []map[string]any
	for _, ch := range c.Checks {
		checks = append(checks, map[string]any{"label": ch.Label, "status": ch.Status, "note": ch.Note, "rule": ch.File})
	}
	return nonNilMaps(checks)
}

// todayJSON is today's passes, predicted against actual.
func todayJSON(c Card) []map[string]any {
	var rec []map[string]any
	for _, r := range c.Record {
		m := map[string]any{"session": r.Pass.Session.String(), "time": r.Pass.Time.Format(time.RFC3339), "lane": string(r.Pass.Lane), "actual": r.Actual, "notes": passNotes(r.Pass.Notes)}
		if !math.IsNaN(r.Predicted) {
			m["predicted"], m["error"] = round(r.Predicted, 3), round(r.Error, 3)
		}
		rec = append(rec, m)
	}
	return nonNilMaps(rec)
}

// airJSON is the air with the keys of `pitcard air`.
func airJSON(a weather.Air, r weather.Reading, in Input) map[string]any {
	m := scripts.AirFigures(a, r)
	for k, v := range m {
		if f, ok := v.(float64); ok {
			m[k] = round(f, placesFor(k))
		}
	}
	if f, ok := m["density_altitude_ft"].(float64); ok {
		m["density_altitude_ft"] = weather.RoundDensityAltitude(f, weather.UnitFt)
	}
	m["time"] = r.Time.Format(time.RFC3339)
	if in.Track.Name != "" {
		m["headwind_mph"] = round(r.HeadwindComponent(in.Track.HeadingDeg).MPH(), 1)
	}
	return m
}

// PredictionJSON is a prediction as JSON, the same object under "prediction"
// in the card's JSON and in 'pitcard predict --format json': its timers
// [{distance_ft, et, low, high, sd}] have the keys of a logged pass's; its
// "blend" is what the finish rests on (BlendJSON, null when not blended).
func PredictionJSON(p engine.Prediction, fit engine.Fit) map[string]any {
	timers, traps, leaned, out := []map[string]any{}, []map[string]any{}, []map[string]any{}, []map[string]any{}
	for _, t := range p.Timers {
		timers = append(timers, map[string]any{"distance_ft": t.DistanceFt, "et": round(t.ET, 3), "low": round(t.Low, 3), "high": round(t.High, 3), "sd": round(t.SD, 4)})
	}
	for _, t := range p.Traps {
		traps = append(traps, map[string]any{"distance_ft": t.DistanceFt, "mph": round(t.MPH, 2), "low": round(t.Low, 2), "high": round(t.High, 2)})
	}
	for i, l := range p.Leaned {
		if i == 5 {
			break
		}
		leaned = append(leaned, map[string]any{"time": l.Pass.Time.Format(time.RFC3339), "session": l.Pass.Session.String(), "track": l.Pass.Track,
			"et": round(l.ET, 3), "carried_et": round(l.Carried, 3), "share": round(l.Share, 3)})
	}
	for _, o := range p.Outliers {
		out = append(out, map[string]any{"time": o.Pass.Time.Format(time.RFC3339), "reason": passNotes(o.Reason)})
	}
	s := p.Sensitivity
	return map[string]any{"timers": timers, "traps": traps, "physics_only": p.PhysicsOnly, "leaned_on": leaned, "left_out": out,
		"passes_calibrated": len(fit.Samples), "passes_at_distance": p.Passes, "interval_pct": 95, "notes": nonNil(p.Notes),
		"et_per_1000ft_da_s": round(s.PerKDA, 4), "et_per_10f_track_s": round(s.Per10FTrack, 4), "et_per_10mph_headwind_s": round(s.Per10Headwind, 4),
		"blend": BlendJSON(p, fit)}
}

func round(v float64, d int) float64 {
	p := math.Pow(10, float64(d))
	return math.Round(v*p) / p
}

func nonNil(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}

func nonNilMaps(s []map[string]any) []map[string]any {
	if s == nil {
		return []map[string]any{}
	}
	return s
}

// placesFor is the decimals a figure is worth, by its unit suffix.
func placesFor(key string) int {
	switch {
	case strings.HasPrefix(key, "cf_"):
		return 4
	case strings.HasSuffix(key, "_ft"), strings.HasSuffix(key, "_deg"):
		return 0
	case strings.HasSuffix(key, "_inhg"):
		return 3
	case strings.HasSuffix(key, "_hpa"), strings.HasSuffix(key, "_pct"):
		return 2
	case strings.HasSuffix(key, "_kg_m3"):
		return 5
	}
	return 1 // °F, mph, grains
}
