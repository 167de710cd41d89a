package prep

import (
	"math"
	"strconv"

	"pitcard/bracket"
	"pitcard/engine"
	"pitcard/logbook"
	"pitcard/scripts"
	"pitcard/weather"
)

// RecentPasses is how many of the last passes the rules see.
const RecentPasses = 10

// RuleContext is the ctx a rule sees: plain, read-only data.
//
//	ctx.units       "imperial" or "metric": the crew's units, for a rule's own words
//	ctx.air         the keys of `pitcard air` (track_temp_f and headwind_mph when known)
//	ctx.track       name, elevation_ft, heading_deg, prep
//	ctx.car         every key of car.yaml, the crew's own keys included
//	ctx.round       session ("E3"), kind ("elimination", "time trial", "test"),
//	                number, lane ("left", "right" or nil), opponent_dial,
//	                date ("2026-06-13"), call_time ("20:45"), call_hour (20.75),
//	                minutes_to_call
//	ctx.prediction  et, sd, low, high (the finish), mph, mph_low, mph_high,
//	                physics_only, timers {distance_ft, et, low, high},
//	                traps {distance_ft, mph, low, high}, et_per_1000ft_da
//	ctx.dial        recommended (number), recommended_text ("11.46"), step,
//	                breakout_risk, breakout_chance; with an opponent also
//	                win_chance, best_for_win {dial, win_chance,
//	                breakout_chance} and options {dial, win_chance,
//	                breakout_chance} (the dials searched)
//	ctx.opponent    with an opponent dial: dial, margin and margin_sd (its
//	                ET over its dial, s), rt_mean, rt_sd, red_light_chance,
//	                from (where they came from: "from 6 passes of car 4471
//	                (3 events)", or "" for the settings' figures)
//	ctx.passes      the last 10 passes, most recent first: date, time,
//	                session, lane, dial, rt, et60 ... et1320, mph660, mph1320,
//	                temp_f, track_temp_f, density_altitude_ft, notes
//	ctx.setup       with setup items in car.yaml: planned {name = value} (the
//	                round's, card --set over the last pass's) and last {name =
//	                value} (the last pass's); a number for a numeric item, the
//	                choice's name for a choice; an item never recorded absent
func RuleContext(c Card) map[string]any {
	in := c.Input
	units := "imperial"
	if in.Settings.Units.Temp == weather.DegC {
		units = "metric"
	}
	ctx := map[string]any{
		"units": units,
		"air":   ctxAir(c),
		"track": map[string]any{"name": in.Track.Name, "elevation_ft": in.Track.ElevationFt, "heading_deg": in.Track.HeadingDeg, "prep": engine.PrepName(in.TrackPrep)},
		"car":   ctxCar(in),
		"round": ctxRound(c),
	}
	if p := c.Prediction; len(p.Timers) > 0 {
		ctx["prediction"] = ctxPrediction(p)
	}
	if c.PlanErr == nil && len(c.Plan.Options) > 0 {
		ctx["dial"] = ctxDial(c)
	}
	if o := in.Opponent; o != nil {
		ctx["opponent"] = map[string]any{"dial": o.Dial.InexactFloat64(), "margin": o.Margin, "margin_sd": o.MarginSD,
			"rt_mean": o.RT.Mean, "rt_sd": o.RT.SD, "red_light_chance": o.RT.RedLightChance(), "from": o.From}
	}
	var passes []any
	for i := len(in.Passes) - 1; i >= 0 && len(passes) < RecentPasses; i-- {
		passes = append(passes, passMap(in.Passes[i]))
	}
	ctx["passes"] = passes
	if len(in.Car.Setup) > 0 {
		planned, last := PlannedSetup(in)
		ctx["setup"] = map[string]any{"planned": setupValues(in.Car.Setup, planned), "last": setupValues(in.Car.Setup, last)}
	}
	return tidy(ctx).(map[string]any)
}

// ctxAir is ctx.air: the air at the call, with the headwind when the
// track (and so its heading) is known.
func ctxAir(c Card) map[string]any {
	in := c.Input
	air := scripts.AirFigures(c.AirCall, in.Air)
	if in.Track.Name != "" {
		air["headwind_mph"] = in.Air.HeadwindComponent(in.Track.HeadingDeg).MPH()
	}
	return air
}

// ctxCar is ctx.car: car.yaml's own keys, then the fields pitcard reads,
// which win over an extra key of the same name.
func ctxCar(in Input) map[string]any {
	car := map[string]any{}
	for k, v := range in.Car.Extra {
		car[k] = plain(v)
	}
	for k, v := range map[string]any{"name": in.Car.Name, "weight_lb": in.Car.WeightLb, "power_hp": in.Car.PowerHP,
		"induction": string(in.Car.Induction), "distance_ft": in.Car.DistanceFt, "tire": in.Car.Tire, "nitrous_hp": in.Car.NitrousHP} {
		car[k] = v
	}
	return car
}

// ctxRound is ctx.round: the session, the call and how far off it is, the
// lane and the other lane's dial.
func ctxRound(c Card) map[string]any {
	in := c.Input
	kind := map[logbook.SessionKind]string{logbook.TimeTrial: "time trial", logbook.Elimination: "elimination", logbook.Test: "test"}[in.Session.Kind]
	r := map[string]any{
		"session": in.Session.String(), "kind": kind, "number": in.Session.N,
		"date": in.Call.Format("2006-01-02"), "call_time": in.Call.Format("15:04"),
		"call_hour":       float64(in.Call.Hour()) + float64(in.Call.Minute())/60,
		"minutes_to_call": math.Round(c.MinutesToGo),
	}
	if in.Lane != "" {
		r["lane"] = string(in.Lane)
	}
	if in.OpponentDial.Valid {
		r["opponent_dial"] = in.OpponentDial.Decimal.InexactFloat64()
	}
	return r
}

// ctxPrediction is ctx.prediction: the finish and each timer and trap
// with its interval.
func ctxPrediction(p engine.Prediction) map[string]any {
	f := p.Finish()
	pred := map[string]any{"et": f.ET, "sd": f.SD, "low": f.Low, "high": f.High, "physics_only": p.PhysicsOnly,
		"et_per_1000ft_da": p.Sensitivity.PerKDA}
	var timers, traps []any
	for _, t := range p.Timers {
		timers = append(timers, map[string]any{"distance_ft": t.DistanceFt, "et": t.ET, "low": t.Low, "high": t.High})
	}
	for _, t := range p.Traps {
		traps = append(traps, map[string]any{"distance_ft": t.DistanceFt, "mph": t.MPH, "low": t.Low, "high": t.High})
		pred["mph"], pred["mph_low"], pred["mph_high"] = t.MPH, t.Low, t.High // the finish trap is last
	}
	pred["timers"], pred["traps"] = timers, traps
	return pred
}

// ctxDial is ctx.dial: the breakout rule's dial before the rules and,
// against another lane, the chances to win.
func ctxDial(c Card) map[string]any {
	dial := map[string]any{"recommended": c.Plan.Recommended.InexactFloat64(), "recommended_text": dialText(c.Plan.Recommended, c.Plan.Step),
		"step": c.Plan.Step.String(), "breakout_risk": c.Plan.Risk,
		"breakout_chance": bracket.BreakoutChance(c.Plan.Estimate, c.Plan.Recommended)}
	if len(c.Win) > 0 {
		if w, ok := winOf(c, c.Plan.Recommended); ok {
			dial["win_chance"] = w
		}
		dial["best_for_win"] = map[string]any{"dial": c.BestForWin.Dial.InexactFloat64(), "win_chance": c.BestForWin.Win,
			"breakout_chance": bracket.BreakoutChance(c.Plan.Estimate, c.BestForWin.Dial)}
		var opts []any
		for _, o := range c.Win {
			opts = append(opts, map[string]any{"dial": o.Dial.InexactFloat64(), "win_chance": o.Win, "breakout_chance": bracket.BreakoutChance(c.Plan.Estimate, o.Dial)})
		}
		dial["options"] = opts
	}
	return dial
}

// tidy rounds every number handed to the rules to 10 significant digits:
// a figure read as "120F" is stored in kelvin and comes back as
// 120.00000000000004, which would pick the wrong row of a rule's table at a
// boundary. Ten digits keep every figure's real precision (a slip's
// thousandths, a barometer's ten-thousandths) and drop the float noise.
func tidy(v any) any {
	switch x := v.(type) {
	case float64:
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return x
		}
		r, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 10, 64), 64)
		return r
	case map[string]any:
		for k, e := range x {
			x[k] = tidy(e)
		}
		return x
	case []any:
		for i, e := range x {
			x[i] = tidy(e)
		}
		return x
	}
	return v
}

func passMap(p logbook.Pass) map[string]any {
	m := map[string]any{"date": p.Time.Format("2006-01-02"), "time": p.Time.Format("15:04"), "session": p.Session.String(),
		"lane": string(p.Lane), "notes": p.Notes, "track": p.Track}
	if p.Dial.Valid {
		m["dial"] = p.Dial.Decimal.InexactFloat64()
	}
	if p.RT.Valid {
		m["rt"] = p.RT.Decimal.InexactFloat64()
	}
	for i, ft := range logbook.TimerDistancesFt {
		if p.ET[i].Valid {
			m["et"+itoa(ft)] = p.ET[i].Decimal.InexactFloat64()
		}
	}
	if p.MPH660.Valid {
		m["mph660"] = p.MPH660.Decimal.InexactFloat64()
	}
	if p.MPH1320.Valid {
		m["mph1320"] = p.MPH1320.Decimal.InexactFloat64()
	}
	if p.HasAir {
		m["temp_f"] = p.Air.Temp.Fahrenheit()
		m["density_altitude_ft"] = p.Air.Derive(0).DensityAltitude.Feet()
	}
	if p.Air.HasTrack {
		m["track_temp_f"] = p.Air.TrackTemp.Fahrenheit()
	}
	return m
}

func itoa(ft float64) string {
	return map[float64]string{60: "60", 330: "330", 660: "660", 1000: "1000", 1320: "1320"}[ft]
}

// plain turns YAML values into the plain data the rules take.
func plain(v any) any {
	switch x := v.(type) {
	case map[string]any:
		m := map[string]any{}
		for k, e := range x {
			m[k] = plain(e)
		}
		return m
	case []any:
		out := make([]any, len(x))
		for i, e := range x {
			out[i] = plain(e)
		}
		return out
	case int:
		return float64(x)
	case uint64:
		return float64(x)
	case float32:
		return float64(x)
	}
	return v
}

// setupValues are setup cells as the rules see them: a numeric item's as a
// number, a choice's as its name.
func setupValues(setup logbook.Setup, cells map[string]string) map[string]any {
	out := map[string]any{}
	for _, it := range setup {
		v, ok := cells[it.Name]
		if !ok || v == "" {
			continue
		}
		if !it.Numeric() {
			out[it.Name] = v
			continue
		}
		if x, err := strconv.ParseFloat(v, 64); err == nil {
			out[it.Name] = x
		}
	}
	return out
}
