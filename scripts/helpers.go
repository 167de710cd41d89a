package scripts

import (
	"math"
	"strings"

	"github.com/shopspring/decimal"
	lua "github.com/yuin/gopher-lua"

	"pitcard/weather"
)

// helpers is the pit module every rule sees:
//
//	pit.log(...)                 a line for `pitcard rules try` (print does the same)
//	pit.convert(v, from, to)     units: F C, inHg hPa kPa, ft m, mph km/h m/s, lb kg
//	pit.air{temp_f=, baro_inhg=, humidity_pct=}
//	                             the air figures of a reading (station pressure),
//	                             with the keys of ctx.air
//	pit.round_dial(x [, step])   x rounded to the dial step, as an exact decimal
//	                             string ("11.46", never 11.459999)
//	pit.step                     the dial step, a string ("0.01")
func (s *sandbox) helpers() lua.LValue {
	L := s.L
	d := L.NewTable()
	d.RawSetString("log", L.NewFunction(s.luaLog))
	d.RawSetString("convert", L.NewFunction(luaConvert))
	d.RawSetString("air", L.NewFunction(s.luaAir))
	step := s.limits.DialStep
	if !step.IsPositive() {
		step = DefaultLimits.DialStep
	}
	d.RawSetString("step", lua.LString(step.String()))
	d.RawSetString("round_dial", L.NewFunction(func(L *lua.LState) int {
		x := L.CheckNumber(1)
		switch f := float64(x); {
		case math.IsNaN(f):
			L.RaiseError("pit.round_dial was given NaN (not a number): a figure it was computed from is missing or 0/0")
		case math.IsInf(f, 0):
			L.RaiseError("pit.round_dial was given an infinite number (a division by 0?)")
		}
		st := step
		if L.GetTop() >= 2 {
			v, err := decimal.NewFromString(L.CheckAny(2).String())
			if err != nil || !v.IsPositive() {
				L.ArgError(2, "a positive step in seconds")
			}
			st = v
		}
		r := decimal.NewFromFloat(float64(x)).Div(st).Round(0).Mul(st)
		places := max(int32(-st.Exponent()), 0)
		L.Push(lua.LString(r.StringFixed(places)))
		return 1
	}))
	return s.proxy(d, "pit")
}

// luaConvert converts between the units a crew uses.
func luaConvert(L *lua.LState) int {
	v := float64(L.CheckNumber(1))
	from := strings.ToLower(L.CheckString(2))
	to := strings.ToLower(L.CheckString(3))
	type unit struct {
		kind  string
		toSI  func(float64) float64
		frmSI func(float64) float64
	}
	lin := func(kind string, k float64) unit {
		return unit{kind, func(x float64) float64 { return x * k }, func(x float64) float64 { return x / k }}
	}
	units := map[string]unit{
		"f":    {"temperature", func(x float64) float64 { return weather.Fahrenheit(x).Kelvin() }, func(x float64) float64 { return weather.Kelvin(x).Fahrenheit() }},
		"c":    {"temperature", func(x float64) float64 { return weather.Celsius(x).Kelvin() }, func(x float64) float64 { return weather.Kelvin(x).Celsius() }},
		"inhg": lin("pressure", weather.PaPerInHg), "hpa": lin("pressure", 100), "mbar": lin("pressure", 100), "kpa": lin("pressure", 1000),
		"ft": lin("length", weather.MetrePerFt), "m": lin("length", 1), "in": lin("length", 0.0254),
		"mph": lin("speed", weather.MpsPerMph), "km/h": lin("speed", weather.MpsPerKmh), "m/s": lin("speed", 1),
		"lb": lin("mass", weather.KgPerLb), "kg": lin("mass", 1),
	}
	a, ok1 := units[from]
	b, ok2 := units[to]
	switch {
	case !ok1:
		L.ArgError(2, "unknown unit "+from+" (F C inHg hPa kPa ft m in mph km/h m/s lb kg)")
	case !ok2:
		L.ArgError(3, "unknown unit "+to+" (F C inHg hPa kPa ft m in mph km/h m/s lb kg)")
	case a.kind != b.kind:
		L.RaiseError("pit.convert: cannot convert %s (%s) to %s (%s)", from, a.kind, to, b.kind)
	}
	L.Push(lua.LNumber(b.frmSI(a.toSI(v))))
	return 1
}

// luaAir computes the air figures of a reading given as a table.
func (s *sandbox) luaAir(L *lua.LState) int {
	t := L.CheckTable(1)
	if d, ok := s.proxies[t]; ok {
		t = d
	}
	num := func(k string) float64 {
		v, ok := t.RawGetString(k).(lua.LNumber)
		if !ok {
			L.RaiseError("pit.air: %s is missing (give temp_f, baro_inhg and humidity_pct)", k)
		}
		return float64(v)
	}
	r := weather.Reading{Temp: weather.Fahrenheit(num("temp_f")), Baro: weather.InHg(num("baro_inhg")), RH: num("humidity_pct") / 100}
	if err := r.Validate(0); err != nil {
		L.RaiseError("pit.air: %s", err.Error())
	}
	L.Push(s.readOnly(AirFigures(r.Derive(0), r), "air"))
	return 1
}

// AirFigures are the air figures of a reading with the keys of `pitcard air`
// (and of ctx.air).
func AirFigures(a weather.Air, r weather.Reading) map[string]any {
	m := map[string]any{
		"density_altitude_ft":      a.DensityAltitude.Feet(),
		"pressure_altitude_ft":     a.PressureAltitude.Feet(),
		"air_density_kg_m3":        a.Density,
		"relative_air_density_pct": a.RelativeDensity,
		"vapor_pressure_hpa":       a.Vapor.HPa(),
		"dewpoint_f":               a.DewPoint.Fahrenheit(),
		"grains_per_lb":            a.Grains,
		"cf_sae_j1349":             a.CFJ1349,
		"cf_sae_j1349_2004":        a.CFJ1349v2004,
		"cf_std":                   a.CFSTD,
		"cf_din70020":              a.CFDIN,
		"virtual_temp_f":           a.VirtualTemp.Fahrenheit(),
		"baro_inhg":                a.Station.InHg(),
		"temp_f":                   r.Temp.Fahrenheit(),
		"humidity_pct":             a.RH * 100,
		"altimeter_setting_inhg":   a.Altimeter.InHg(),
		"wind_mph":                 r.Wind.MPH(),
	}
	// the older names of two figures, kept for rules written before them
	m["dew_point_f"], m["station_pressure_inhg"] = m["dewpoint_f"], m["baro_inhg"]
	if !r.WindDirUnknown {
		m["wind_from_deg"] = r.WindFrom
	}
	if r.HasTrack {
		m["track_temp_f"] = r.TrackTemp.Fahrenheit()
	}
	return m
}
