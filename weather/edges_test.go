package weather

import (
	"fmt"
	"math"
	"strings"
	"testing"
	"time"
)

// These tests pin the edges the mutation tester found unguarded: each
// expected figure is worked by hand from the definition named beside it.

// Least squares (a statistics identity): for x = −40..0 min every 10 and
// y = 1, 3, 2, 5, 4: x̄ = −20, ȳ = 3, Sxx = 1000, Sxy = 80, so b = 0.08,
// a = ȳ − b·x̄ = 4.6; the residuals −0.4, 0.8, −1.0, 1.2, −0.6 give
// s = √(3.6/3) = 1.0954; a new observation at x = 15 has the standard error
// s·√(1 + 1/5 + 35²/1000) = 1.7059.
func TestFitLine(t *testing.T) {
	l := fitLine([]float64{-40, -30, -20, -10, 0}, []float64{1, 3, 2, 5, 4})
	cases := []struct {
		name      string
		got, want float64
	}{
		{"slope", l.b, 0.08}, {"intercept", l.a, 4.6}, {"at 15", l.at(15), 5.8},
		{"residual spread", l.s, math.Sqrt(3.6 / 3)}, {"prediction error at 15", l.predictionError(15), math.Sqrt(1.2) * math.Sqrt(2.425)},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if !(math.Abs(tc.got-tc.want) <= 1e-9) {
				t.Errorf("%s = %v, want %v", tc.name, tc.got, tc.want)
			}
		})
	}
	// every x the same: no slope, the mean, and the spread alone
	flat := fitLine([]float64{5, 5, 5}, []float64{1, 2, 6})
	if flat.b != 0 || flat.at(100) != 3 || !(math.Abs(flat.predictionError(100)-flat.s) <= 1e-12) || !(math.Abs(flat.s-math.Sqrt(14/1.0)) <= 1e-9) {
		t.Errorf("flat x: %+v", flat)
	}
}

// Durations as the notes print them (pitcard's own format).
func TestRoundMin(t *testing.T) {
	for d, want := range map[time.Duration]string{59 * time.Minute: "59 min", 60 * time.Minute: "1 h", 90 * time.Minute: "1 h 30 min",
		125 * time.Minute: "2 h 05 min", 120 * time.Minute: "2 h", 29 * time.Second: "0 min"} {
		t.Run(want, func(t *testing.T) {
			if got := roundMin(d); got != want {
				t.Errorf("roundMin(%v) = %q, want %q", d, got, want)
			}
		})
	}
}

// Inside the log a time between two readings is the straight line between
// THOSE two (linear interpolation, definition): on a log that turns (warm,
// cool, warm) no other pair gives the same figure.
func TestForecastInterpolatesBetweenNeighbours(t *testing.T) {
	log := []Reading{
		{Time: at("18:00"), Temp: Fahrenheit(80), Baro: InHg(28.90), RH: 0.40, Wind: MPH(2), TrackTemp: Fahrenheit(120), HasTrack: true},
		{Time: at("18:30"), Temp: Fahrenheit(90), Baro: InHg(28.96), RH: 0.40, Wind: MPH(8), TrackTemp: Fahrenheit(100), HasTrack: true},
		{Time: at("19:00"), Temp: Fahrenheit(70), Baro: InHg(28.80), RH: 0.40, Wind: MPH(4), TrackTemp: Fahrenheit(140), HasTrack: true},
	}
	f, err := ForecastAt(log, at("18:40"), Feet(900))
	if err != nil {
		t.Fatal(err)
	}
	w := 10.0 / 30
	cases := []struct {
		name      string
		got, want float64
	}{
		{"temp °F", f.Reading.Temp.Fahrenheit(), 90 + w*(70-90)},
		{"baro inHg", f.Reading.Baro.InHg(), 28.96 + w*(28.80-28.96)},
		{"wind mph", f.Reading.Wind.MPH(), 8 + w*(4-8)},
		{"track °F", f.Reading.TrackTemp.Fahrenheit(), 100 + w*(140-100)},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if !(math.Abs(tc.got-tc.want) <= 1e-9) {
				t.Errorf("%s at 18:40 = %v, want %v", tc.name, tc.got, tc.want)
			}
		})
	}
	if f.Used != 2 || f.Span != 30*time.Minute || !f.Trusted || !f.Interval || !strings.Contains(f.Notes[0], "between the readings of 18:30 and 19:00") {
		t.Errorf("used %d span %v trusted %v notes %q", f.Used, f.Span, f.Trusted, f.Notes)
	}
	// at a reading's own time: that reading, as it was
	if g, _ := ForecastAt(log, at("18:30"), Feet(900)); g.Reading.Temp != log[1].Temp || g.Used != 1 {
		t.Errorf("at 18:30: %+v", g.Reading)
	}
	// at the last reading's time: the last reading itself, not the trend's value there
	if g, _ := ForecastAt(log, at("19:00"), Feet(900)); g.Reading.Temp != log[2].Temp || g.Ahead != 0 {
		t.Errorf("at 19:00: %v, ahead %v", g.Reading.Temp, g.Ahead)
	}
}

// The forecast's limits, at their edges (pitcard's own rules, documented
// in forecast.go): exactly MaxAhead is forecast; exactly MinTrendReadings
// over exactly MinTrendSpan make a trend; as far ahead as the trend reaches
// back is trusted. The wind is the window's mean (definition).
func TestForecastEdges(t *testing.T) {
	mk := func(n int, step time.Duration) []Reading {
		var log []Reading
		for i := range n {
			log = append(log, Reading{Time: at("18:00").Add(time.Duration(i) * step), Temp: Fahrenheit(90 - float64(i)),
				Baro: InHg(28.9), RH: 0.4, Wind: MPH(float64(2 + 3*i)), TrackTemp: Fahrenheit(110 + 10*float64(i)), HasTrack: true})
		}
		return log
	}
	log := mk(MinTrendReadings, MinTrendSpan/time.Duration(MinTrendReadings-1))
	last := log[len(log)-1].Time
	if _, err := ForecastAt(log, last.Add(MaxAhead), Feet(900)); err != nil {
		t.Errorf("exactly %v ahead refused: %v", MaxAhead, err)
	}
	f, err := ForecastAt(log, last.Add(MinTrendSpan), Feet(900))
	if err != nil || f.Used != MinTrendReadings || !f.Trusted {
		t.Fatalf("%d readings over %v, %v ahead: used %d trusted %v notes %q (%v)", MinTrendReadings, MinTrendSpan, MinTrendSpan, f.Used, f.Trusted, f.Notes, err)
	}
	if want := 2 + 3.0*float64(MinTrendReadings-1)/2; !(math.Abs(f.Reading.Wind.MPH()-want) <= 1e-9) {
		t.Errorf("wind %v mph, the window's mean is %v", f.Reading.Wind.MPH(), want)
	}
	// a warming track's line, run far ahead, is held TrackTrendReach above
	// the highest track reading (pitcard's own guard)
	if want := 110 + 10*float64(MinTrendReadings-1) + TrackTrendReach; !(math.Abs(f.Reading.TrackTemp.Fahrenheit()-want) <= 1e-9) {
		t.Errorf("track %v °F, want held at %v", f.Reading.TrackTemp.Fahrenheit(), want)
	}
	short := log[:MinTrendReadings-1]
	g, _ := ForecastAt(short, short[len(short)-1].Time.Add(time.Minute), Feet(900))
	if g.Used != 1 || !strings.Contains(g.Notes[0], "2 readings over") {
		t.Errorf("one reading short: %q", g.Notes)
	}
	one, _ := ForecastAt(log[:1], log[0].Time.Add(time.Minute), Feet(900))
	if !strings.Contains(one.Notes[0], "1 reading over") {
		t.Errorf("one reading: %q", one.Notes)
	}
	// a minute short of the span: no trend
	tight := mk(MinTrendReadings, (MinTrendSpan-time.Minute)/time.Duration(MinTrendReadings-1))
	if h, _ := ForecastAt(tight, tight[len(tight)-1].Time.Add(time.Minute), Feet(900)); h.Used != 1 {
		t.Errorf("%v of trend made a trend", MinTrendSpan-time.Minute)
	}
}

// The dew point of no vapour is the floor of the equation's meaningful
// range, −80 °C (pitcard's own guard: ln 0 is −∞).
func TestDewPointOfNoVapour(t *testing.T) {
	for _, e := range []Pressure{0, -1} {
		if got := DewPoint(e).Celsius(); got != -80 {
			t.Errorf("DewPoint(%v) = %v °C, want −80", e, got)
		}
	}
}

// Virtual temperature is the temperature dry air needs for the moist air's
// density at the same pressure (its definition): ρ(p, Tv, 0) = ρ(p, T, e).
// The relative density is a percentage of 1.2250 kg/m³ (U.S. Standard
// Atmosphere 1976). With a dew point given, the humidity is es(dew)/es(T)
// (definition of relative humidity).
func TestDerivedDefinitions(t *testing.T) {
	r := Reading{Temp: Fahrenheit(95), Baro: InHg(28.4), DewPointSet: true, DewPoint: Fahrenheit(70)}
	a := r.Derive(0)
	if dry := AirDensity(a.Station, a.VirtualTemp, 0); !(relErr(dry, a.Density) <= 1e-12) {
		t.Errorf("dry air at Tv %v has %.6f kg/m³, the moist air %.6f", a.VirtualTemp, dry, a.Density)
	}
	if !(math.Abs(a.RelativeDensity-100*a.Density/1.2250) <= 1e-12) {
		t.Errorf("relative density %v %%, density %v", a.RelativeDensity, a.Density)
	}
	want := SaturationVaporPressure(Fahrenheit(70)).HPa() / SaturationVaporPressure(Fahrenheit(95)).HPa()
	if !(math.Abs(a.RH-want) <= 1e-12) || !(want > 0.4 && want < 0.5) {
		t.Errorf("RH from the dew point %v, want %v", a.RH, want)
	}
}

// Each range is closed: its edges are valid readings, a hair past them is
// not (pitcard's limits, reading.go). A dew point equal to the air
// temperature is saturated air, valid.
func TestValidateEdges(t *testing.T) {
	base := Reading{Temp: Fahrenheit(70), Baro: InHg(29), RH: 0.5}
	cases := []struct {
		name string
		mod  func(*Reading)
		ok   bool
	}{
		{"temp at 140 °F", func(r *Reading) { r.Temp = Fahrenheit(140) }, true},
		{"temp above 140 °F", func(r *Reading) { r.Temp = Fahrenheit(140.01) }, false},
		{"temp at −40 °F", func(r *Reading) { r.Temp = Fahrenheit(-40) }, true},
		{"humidity 100 %", func(r *Reading) { r.RH = 1 }, true},
		{"humidity 0 %", func(r *Reading) { r.RH = 0 }, true},
		{"wind at 60 mph", func(r *Reading) { r.Wind = MPH(60) }, true},
		{"wind from 360°", func(r *Reading) { r.WindFrom = 360 }, true},
		{"track at 200 °F", func(r *Reading) { r.TrackTemp, r.HasTrack = Fahrenheit(200), true }, true},
		{"station at 32.5 inHg", func(r *Reading) { r.Baro = InHg(32.5) }, true},
		{"dew point at the air temperature", func(r *Reading) { r.DewPointSet, r.DewPoint = true, Fahrenheit(70) }, true},
		{"dew point 0.01 °F above it", func(r *Reading) { r.DewPointSet, r.DewPoint = true, Fahrenheit(70.01) }, false},
		{"altimeter 32.6 inHg", func(r *Reading) { r.Baro, r.BaroKind = InHg(32.6), AltimeterSetting }, false},
	}
	// an altimeter setting outside the range is refused as itself, before
	// any station pressure is worked out from it
	alt := Reading{Temp: Fahrenheit(70), Baro: InHg(32.6), BaroKind: AltimeterSetting, RH: 0.5}
	if err := alt.Validate(0); err == nil || !strings.Contains(err.Error(), "is outside 15..32.5 inHg") || strings.Contains(err.Error(), "gives station") {
		t.Errorf("altimeter 32.6 inHg: %v", err)
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := base
			tc.mod(&r)
			if err := r.Validate(0); (err == nil) != tc.ok {
				t.Errorf("valid %v, want %v (%v)", err == nil, tc.ok, err)
			}
		})
	}
	// an altimeter setting inside the range that gives a station pressure
	// outside it at the elevation: said in those words
	r := Reading{Temp: Fahrenheit(70), Baro: InHg(17), BaroKind: AltimeterSetting, RH: 0.5}
	if err := r.Validate(Feet(5000)); err == nil || !strings.Contains(err.Error(), "gives station pressure") {
		t.Errorf("altimeter 17 inHg at 5000 ft: %v", err)
	}
}

// The kind-of-pressure warning (pitcard's own rule, reading.go): within
// 500 ft of sea level the two kinds differ less than the weather does, so
// nothing is said; an altimeter setting at the edges of 28.5..30.85 inHg is
// believable, a hair outside is not; a station reading that looks like a
// sea-level one at 2000 ft is warned about.
func TestPressureWarningEdges(t *testing.T) {
	cases := []struct {
		name  string
		r     Reading
		elev  float64
		warns bool
	}{
		{"station 27.5 at 499 ft", Reading{Baro: InHg(27.5)}, 499, false},
		{"station 29.9 at 500 ft", Reading{Baro: InHg(29.9)}, 500, false},  // 29.9 + 0.54 = 30.44: a believable setting
		{"station 30.6 at 600 ft", Reading{Baro: InHg(30.6)}, 600, true},   // 31.25: rare
		{"station 30.6 at 500 ft", Reading{Baro: InHg(30.6)}, 500, true},   // 31.15: rare; 500 ft is not "within 500 ft"
		{"station 29.0 at 2000 ft", Reading{Baro: InHg(29.0)}, 2000, true}, // 31.1
		{"station 28.5 at 2500 ft", Reading{Baro: InHg(28.5)}, 2500, true}, // 31.2, and 28.5 itself looks like a setting
		{"station 28.49 at 2500 ft", Reading{Baro: InHg(28.49)}, 2500, false},
		{"station 30.85 at 600 ft", Reading{Baro: InHg(30.85)}, 600, true},
		{"station 30.86 at 600 ft", Reading{Baro: InHg(30.86)}, 600, false},
		{"station 27.9 at 2000 ft", Reading{Baro: InHg(27.9)}, 2000, false},
		{"altimeter 28.5 at 2000 ft", Reading{Baro: InHg(28.5), BaroKind: AltimeterSetting}, 2000, false},
		{"altimeter 30.85 at 2000 ft", Reading{Baro: InHg(30.85), BaroKind: AltimeterSetting}, 2000, false},
		{"altimeter 28.49 at 2000 ft", Reading{Baro: InHg(28.49), BaroKind: AltimeterSetting}, 2000, true},
		{"altimeter 30.86 at 2000 ft", Reading{Baro: InHg(30.86), BaroKind: AltimeterSetting}, 2000, true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.r.PressureWarning(Feet(tc.elev)); (got != "") != tc.warns {
				t.Errorf("warning %q, want one: %v", got, tc.warns)
			}
		})
	}
}

// A value up to 40 characters is shown whole in an error; a longer text is
// cut at 40 with its length said, a longer number shown in exponent form
// (pitcard's own message rule, errors.go).
func TestShortValueEdge(t *testing.T) {
	forty := strings.Repeat("x", 40)
	cases := map[string]string{
		forty:                         forty,
		forty + "y":                   forty + "… (41 characters)",
		strings.Repeat("1", 40):       strings.Repeat("1", 40),
		"1" + strings.Repeat("0", 40): "1e+40",
	}
	for in, want := range cases {
		t.Run(fmt.Sprintf("%d characters", len(in)), func(t *testing.T) {
			if got := shortValue(in); got != want {
				t.Errorf("shortValue(%d characters) = %q, want %q", len(in), got, want)
			}
		})
	}
}

// A day start with minutes and seconds counts them (pitcard's race day,
// raceday.go): with the day starting 04:30, 04:29:59 belongs to the day
// before, 04:30:00, 04:30:30 and 04:31 to the day itself; a typed clock
// time reads the same way.
func TestRaceDayStartWithMinutes(t *testing.T) {
	s, err := ParseDayStart("04:30")
	if err != nil {
		t.Fatal(err)
	}
	day := time.Date(2026, 6, 13, 0, 0, 0, 0, time.UTC)
	for _, tc := range []struct {
		h, m, sec int
		dayBefore bool
	}{{4, 29, 59, false}, {4, 30, 0, true}, {4, 30, 30, true}, {4, 31, 0, true}, {5, 29, 0, true}} {
		t.Run(fmt.Sprintf("%02d:%02d:%02d", tc.h, tc.m, tc.sec), func(t *testing.T) {
			at := time.Date(2026, 6, 14, tc.h, tc.m, tc.sec, 0, time.UTC)
			want := map[bool]string{false: "2026-06-13", true: "2026-06-14"}[tc.dayBefore]
			if got := s.Key(at); got != want {
				t.Errorf("%02d:%02d:%02d is on the race day %s, want %s", tc.h, tc.m, tc.sec, got, want)
			}
			clock, err := s.Clock(fmt.Sprintf("%02d:%02d:%02d", tc.h, tc.m, tc.sec), day, time.UTC)
			wantDate := map[bool]string{false: "2026-06-14", true: "2026-06-13"}[tc.dayBefore]
			if err != nil || clock.Format("2006-01-02") != wantDate {
				t.Errorf("clock %02d:%02d:%02d on the day of 06-13: %v (%v), want on %s", tc.h, tc.m, tc.sec, clock, err, wantDate)
			}
		})
	}
}

// A zone whose daylight saving moves the clock half an hour (Lord Howe
// Island, IANA zone database): 01:45 on the night it falls back happens
// twice, and a logged time is the first of them, +11:00 (LocalTime's rule).
func TestLocalTimeHalfHourFallBack(t *testing.T) {
	loc, err := time.LoadLocation("Australia/Lord_Howe")
	if err != nil {
		t.Skipf("no zone database: %v", err)
	}
	got, err := LocalTime(2026, time.April, 5, 1, 45, 0, loc, "01:45")
	if err != nil {
		t.Fatal(err)
	}
	if _, off := got.Zone(); off != 11*3600 {
		t.Errorf("01:45 on the fall-back night is %v, want the first occurrence, +11:00", got)
	}
}

// A header in one column holding semicolons or tabs is a file saved with
// the wrong separator, said so; a wind of 0 with no direction is calm, not
// a wind of unknown direction (weather.csv's reading, log.go).
func TestLogSeparatorAndCalm(t *testing.T) {
	if _, _, err := ReadHeaderExtra([]string{"time;temp_f;baro_inhg"}, "weather.csv", "weather log", []string{"time"}, nil, nil); err == nil || !strings.Contains(err.Error(), "semicolons or tabs") {
		t.Errorf("a semicolon header: %v", err)
	}
	csv := "date,time,temp_f,baro_inhg,humidity_pct,wind_mph\n2026-06-13,18:00,88,28.9,40,0\n2026-06-13,18:15,88,28.9,40,5\n"
	rs, err := ReadLog(strings.NewReader(csv), "weather.csv", Feet(900), time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	if len(rs) != 2 || rs[0].WindDirUnknown || !rs[1].WindDirUnknown {
		t.Errorf("calm: direction unknown %v; 5 mph without a direction: unknown %v", rs[0].WindDirUnknown, rs[1].WindDirUnknown)
	}
}

// A pressure prints with the decimals a meter shows in its unit (pitcard's
// own format, units.go): inHg and kPa 2, hPa and mbar 1.
func TestPressureFormatDecimals(t *testing.T) {
	p := HPa(1013.25)
	for u, want := range map[PressureUnit]string{UnitInHg: "29.92 inHg", UnitKPa: "101.33 kPa", UnitHPa: "1013.2 hPa", UnitMbar: "1013.2 mbar"} {
		t.Run(u.String(), func(t *testing.T) {
			if got := p.Format(u); got != want {
				t.Errorf("Format(%v) = %q, want %q", u, got, want)
			}
		})
	}
}

// A direction is degrees, bare or with ° or deg, or a compass point; any
// other unit is refused (units.go).
func TestParseDirectionUnits(t *testing.T) {
	for in, want := range map[string]float64{"200": 200, "200°": 200, "200deg": 200, "SW": 225} {
		t.Run(in, func(t *testing.T) {
			if got, err := ParseDirection(in); err != nil || got != want {
				t.Errorf("ParseDirection(%q) = %v, %v; want %v", in, got, err, want)
			}
		})
	}
	for _, in := range []string{"200x", "200 mph", "north-ish"} {
		t.Run(in, func(t *testing.T) {
			if _, err := ParseDirection(in); err == nil {
				t.Errorf("ParseDirection(%q) accepted", in)
			}
		})
	}
}
