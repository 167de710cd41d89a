package weather

import (
	"bytes"
	"errors"
	"io"
	"math"
	"strings"
	"testing"
	"testing/iotest"
	"time"
)

var day = time.Date(2026, 6, 13, 0, 0, 0, 0, time.UTC)

func at(hhmm string) time.Time {
	t, err := ParseClock(hhmm, day, time.UTC)
	if err != nil {
		panic(err)
	}
	return t
}

func TestValidateRanges(t *testing.T) {
	ok := Reading{Temp: Fahrenheit(88), Baro: InHg(28.9), RH: 0.4, Wind: MPH(5), WindFrom: 200, TrackTemp: Fahrenheit(120), HasTrack: true}
	if err := ok.Validate(Feet(900)); err != nil {
		t.Fatalf("good reading refused: %v", err)
	}
	cases := []struct {
		name string
		edit func(*Reading)
		elev float64
		want []string
	}{
		{"hot", func(r *Reading) { r.Temp = Fahrenheit(150) }, 900, []string{"temp", "150 °F", "-40..140 °F"}},
		{"cold", func(r *Reading) { r.Temp = Fahrenheit(-41) }, 900, []string{"temp", "-41"}},
		{"baro high", func(r *Reading) { r.Baro = InHg(33) }, 900, []string{"baro", "33 inHg", "15..32.5 inHg"}},
		{"baro low", func(r *Reading) { r.Baro = InHg(14) }, 900, []string{"baro", "15..32.5"}},
		{"rh", func(r *Reading) { r.RH = 1.2 }, 900, []string{"humidity", "120 %", "0..100 %"}},
		{"dew above air", func(r *Reading) { r.DewPointSet, r.DewPoint = true, Fahrenheit(90) }, 900, []string{"dewpoint", "90.0 °F", "above the air temperature"}},
		{"elevation", func(r *Reading) {}, 16000, []string{"elevation", "16000 ft", "-1500..15000 ft"}},
		{"wind", func(r *Reading) { r.Wind = MPH(70) }, 900, []string{"wind", "70 mph", "0..60 mph"}},
		{"track", func(r *Reading) { r.TrackTemp = Fahrenheit(210) }, 900, []string{"track-temp", "210 °F", "-20..200 °F"}},
		{"nan", func(r *Reading) { r.Temp = Temperature(math.NaN()) }, 900, []string{"temp", "-40..140"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := ok
			tc.edit(&r)
			err := r.Validate(Feet(tc.elev))
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Errorf("%s: got %v, want an InputError", tc.name, err)
				return
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%s: %q lacks %q", tc.name, err, w)
				}
			}
		})
	}
}

// Common practice (no source): at a track well above sea level, a figure
// near 29.9 inHg entered as station pressure is almost always an airport's
// altimeter setting, and one near 25 entered as altimeter is a station reading.
func TestPressureKindWarning(t *testing.T) {
	elev := Feet(4300)
	station := Reading{Temp: Fahrenheit(80), Baro: InHg(29.95), RH: 0.3}
	if w := station.PressureWarning(elev); !strings.Contains(w, "looks like an altimeter") {
		t.Errorf("29.95 station at 4300 ft: warning %q", w)
	}
	alt := Reading{Temp: Fahrenheit(80), Baro: InHg(25.6), BaroKind: AltimeterSetting, RH: 0.3}
	if w := alt.PressureWarning(elev); !strings.Contains(w, "looks like a station") {
		t.Errorf("25.6 altimeter: warning %q", w)
	}
	fine := Reading{Temp: Fahrenheit(80), Baro: InHg(25.6), RH: 0.3}
	if w := fine.PressureWarning(elev); w != "" {
		t.Errorf("25.6 station at 4300 ft: unexpected warning %q", w)
	}
	if w := station.PressureWarning(Feet(300)); w != "" {
		t.Errorf("near sea level the kinds cannot be told apart, got %q", w)
	}
}

func TestLogRoundTrip(t *testing.T) {
	in := []Reading{
		{Time: at("18:30"), Temp: Fahrenheit(91.5), Baro: InHg(28.93), RH: 0.38, Wind: MPH(6), WindFrom: 210, TrackTemp: Fahrenheit(128), HasTrack: true},
		{Time: at("18:45"), Temp: Celsius(32.1), Baro: HPa(979.4), DewPointSet: true, DewPoint: Fahrenheit(60.2), Note: "cloud, \"light\" breeze"},
		{Time: at("19:00"), Temp: Fahrenheit(88), Baro: InHg(29.95), BaroKind: AltimeterSetting, RH: 0.41},
	}
	var buf bytes.Buffer
	if err := WriteLog(&buf, in); err != nil {
		t.Fatal(err)
	}
	out, err := ReadLog(&buf, "weather.csv", Feet(900), time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	if len(out) != len(in) {
		t.Fatalf("read %d readings, wrote %d", len(out), len(in))
	}
	for i := range in {
		a, b := in[i].Derive(Feet(900)), out[i].Derive(Feet(900))
		if math.Abs(a.DensityAltitude.Feet()-b.DensityAltitude.Feet()) > 1 || !out[i].Time.Equal(in[i].Time) ||
			out[i].Note != in[i].Note || out[i].BaroKind != in[i].BaroKind {
			t.Errorf("row %d: wrote %+v, read %+v", i, in[i], out[i])
		}
	}
}

func TestReadLogMetricColumns(t *testing.T) {
	csv := "date,time,temp_c,baro_hpa,humidity_pct,wind_kmh,track_temp_c\n2026-06-13,18:30,31,980,40,10,50\n"
	out, err := ReadLog(strings.NewReader(csv), "weather.csv", Feet(900), time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	r := out[0]
	if math.Abs(r.Temp.Celsius()-31) > 1e-9 || math.Abs(r.Baro.HPa()-980) > 1e-9 || math.Abs(r.Wind.KMH()-10) > 1e-9 || math.Abs(r.TrackTemp.Celsius()-50) > 1e-9 {
		t.Errorf("metric row read as %+v", r)
	}
}

func TestReadLogErrorsNameFileLineColumn(t *testing.T) {
	head := "date,time,temp_f,baro_inhg,humidity_pct\n"
	cases := []struct {
		csv  string
		want []string
	}{
		{head + "2026-06-13,18:30,88,28.9,40\n2026-06-13,18:45,190,28.9,40\n", []string{"weather.csv line 3", "temp_f", "190", "-40..140 °F"}},
		{head + "2026-06-13,18:30,88,28.9,140\n", []string{"line 2", "humidity", "0..100 %"}},
		{head + "2026-13-13,18:30,88,28.9,40\n", []string{"line 2", "date", "YYYY-MM-DD"}},
		{head + "2026-06-13,6pm,88,28.9,40\n", []string{"line 2", "time", "HH:MM"}},
		{head + "2026-06-13,18:30,88K,28.9,40\n", []string{"line 2", "temp_f", "unknown unit"}},
		{head + "2026-06-13,18:30,88,28.9\n", []string{"line 2", "fields"}},
		{"date,time,temp_f,pressure,humidity_pct\n", []string{"line 1", "pressure", "not a weather-log column"}},
		{"date,time,temp_f,humidity_pct\n", []string{"baro_inhg", "missing"}},
		{head + "2026-06-13,18:30,88,\"28.9,40\n", []string{"line 2", "CSV"}},
		{head + "2026-06-13,18:30,88,28.9,\n", []string{"line 2", "humidity_pct", "blank"}},
	}
	for _, tc := range cases {
		t.Run(strings.Join(tc.want, " "), func(t *testing.T) {
			_, err := ReadLog(strings.NewReader(tc.csv), "weather.csv", Feet(900), time.UTC)
			if err == nil {
				t.Errorf("%q: no error", tc.csv)
				return
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%q: %q lacks %q", tc.csv, err, w)
				}
			}
		})
	}
}

func FuzzReadLog(f *testing.F) {
	f.Add("date,time,temp_f,baro_inhg,humidity_pct\n2026-06-13,18:30,88,28.9,40\n")
	f.Add("date,time,temp_c,baro_hpa,dewpoint_c,baro_kind,notes\n2026-06-13,18:30,31,980,12,altimeter,\"a,b\"\n")
	f.Add("date,time,temp_f,baro_inhg,humidity_pct,track_temp_f,wind_mph,wind_from_deg\n2026-06-13,18:30:05,88,28.9,40,,3,\n")
	f.Add("\ufeffdate,time\n")
	f.Fuzz(func(t *testing.T, s string) {
		rs, err := ReadLog(strings.NewReader(s), "weather.csv", Feet(900), time.UTC)
		if err != nil {
			var ie *InputError
			if errors.As(err, &ie) {
				if ie.Field == "" || ie.File != "weather.csv" {
					t.Fatalf("error %q does not name its field and file", err)
				}
			}
			return
		}
		for _, r := range rs {
			if r.Validate(Feet(900)) != nil {
				t.Fatalf("accepted an invalid reading %+v", r)
			}
		}
	})
}

// The forecast of a log that follows a straight line is the line (definition
// of a linear trend); the spread of a clean line is ~0.
func TestForecastFollowsLinearTrend(t *testing.T) {
	var log []Reading
	for i := 0; i <= 6; i++ { // 18:00..19:30 every 15 min: cooling 2 °F per 15 min
		log = append(log, Reading{Time: at("18:00").Add(time.Duration(i) * 15 * time.Minute),
			Temp: Fahrenheit(92 - 2*float64(i)), Baro: InHg(28.90 + 0.01*float64(i)), DewPointSet: true, DewPoint: Fahrenheit(60),
			TrackTemp: Fahrenheit(130 - 4*float64(i)), HasTrack: true})
	}
	f, err := ForecastAt(log, at("20:30"), Feet(900))
	if err != nil {
		t.Fatal(err)
	}
	// the track's line would reach 130 − 40 = 90 °F, 16 °F under the lowest
	// track reading: held TrackTrendReach under it (pitcard's own guard)
	if math.Abs(f.Reading.Temp.Fahrenheit()-(92-2*10)) > 1e-6 || math.Abs(f.Reading.Baro.InHg()-29.00) > 1e-6 ||
		math.Abs(f.Reading.TrackTemp.Fahrenheit()-(106-TrackTrendReach)) > 1e-6 || !strings.Contains(strings.Join(f.Notes, " "), "held to 96 °F") {
		t.Errorf("forecast %+v %q", f.Reading, f.Notes)
	}
	// within reach of the readings, the track follows its line
	if g, _ := ForecastAt(log, at("19:45"), Feet(900)); math.Abs(g.Reading.TrackTemp.Fahrenheit()-(130-4*7)) > 1e-6 {
		t.Errorf("track at 19:45: %v", g.Reading.TrackTemp)
	}
	// further ahead than the trend reaches back (90 min) is not trusted
	if g, _ := ForecastAt(log, at("21:01"), Feet(900)); g.Trusted || !strings.Contains(strings.Join(g.Notes, " "), "not to be trusted") {
		t.Errorf("91 min ahead on 90 min of trend: trusted %v %q", g.Trusted, g.Notes)
	}
	if f.Used != 7 || f.Span != 90*time.Minute || f.Ahead != time.Hour || !f.Trusted {
		t.Errorf("used %d span %v ahead %v trusted %v", f.Used, f.Span, f.Ahead, f.Trusted)
	}
	if !strings.Contains(strings.Join(f.Notes, " "), "7 readings over 1 h 30 min") {
		t.Errorf("notes %q", f.Notes)
	}
	// inside the log: interpolation
	g, err := ForecastAt(log, at("18:07"), Feet(900))
	if err != nil || !g.Interval || math.Abs(g.Reading.Temp.Fahrenheit()-(92-2*7.0/15)) > 1e-9 {
		t.Errorf("interpolated %+v, %v", g.Reading, err)
	}
}

func TestForecastRefusesAndDoubts(t *testing.T) {
	log := []Reading{
		{Time: at("18:00"), Temp: Fahrenheit(90), Baro: InHg(28.9), RH: 0.4},
		{Time: at("18:15"), Temp: Fahrenheit(89), Baro: InHg(28.9), RH: 0.4},
	}
	if _, err := ForecastAt(log, at("21:16"), Feet(900)); err == nil || !strings.Contains(err.Error(), "at most 3 h") {
		t.Errorf("3 h 1 min ahead: %v", err)
	}
	if _, err := ForecastAt(log, at("17:00"), Feet(900)); err == nil || !strings.Contains(err.Error(), "before the first") {
		t.Errorf("before the log: %v", err)
	}
	if _, err := ForecastAt(nil, at("17:00"), Feet(900)); err == nil {
		t.Error("empty log gave no error")
	}
	f, err := ForecastAt(log, at("19:00"), Feet(900))
	if err != nil || f.Trusted || !strings.Contains(f.Notes[0], "too short") || f.Reading.Temp != log[1].Temp {
		t.Errorf("short log: %+v %v", f, err)
	}
	noisy := []Reading{}
	for i, temp := range []float64{90, 70, 95, 65, 92, 68} {
		noisy = append(noisy, Reading{Time: at("18:00").Add(time.Duration(i) * 10 * time.Minute), Temp: Fahrenheit(temp), Baro: InHg(28.9), RH: 0.4})
	}
	f, err = ForecastAt(noisy, at("19:30"), Feet(900))
	if err != nil || f.Trusted || !strings.Contains(strings.Join(f.Notes, " "), "too noisy") {
		t.Errorf("noisy log: %+v %v", f, err)
	}
}

func BenchmarkDeriveAir(b *testing.B) {
	r := Reading{Temp: Fahrenheit(88), Baro: InHg(28.91), RH: 0.42, Wind: MPH(6), WindFrom: 200}
	elev := Feet(1850)
	var da float64
	for b.Loop() {
		da += r.Derive(elev).DensityAltitude.Feet()
	}
	_ = da
}

func BenchmarkForecast2000(b *testing.B) {
	log := make([]Reading, 2000)
	for i := range log {
		log[i] = Reading{Time: at("00:00").Add(time.Duration(i) * 30 * time.Second), Temp: Fahrenheit(90 - float64(i)/200),
			Baro: InHg(28.9), RH: 0.4, TrackTemp: Fahrenheit(120), HasTrack: true}
	}
	target := log[len(log)-1].Time.Add(time.Hour)
	for b.Loop() {
		if _, err := ForecastAt(log, target, Feet(900)); err != nil {
			b.Fatal(err)
		}
	}
}

// A wind speed read without its direction counts as neither head- nor
// tailwind, and stays without a direction through the log (physics: an
// unknown direction has no expected component along the track).
func TestWindWithoutDirection(t *testing.T) {
	csv := "date,time,temp_f,baro_inhg,humidity_pct,wind_mph,wind_from_deg\n2026-06-13,18:30,88,28.9,40,9,\n"
	rs, err := ReadLog(strings.NewReader(csv), "weather.csv", Feet(900), time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	if !rs[0].WindDirUnknown || rs[0].HeadwindComponent(0) != 0 || rs[0].Wind.MPH() < 8.99 {
		t.Errorf("read %+v", rs[0])
	}
	var buf bytes.Buffer
	_ = WriteLog(&buf, rs)
	back, _ := ReadLog(&buf, "weather.csv", Feet(900), time.UTC)
	if !back[0].WindDirUnknown {
		t.Errorf("the direction came back as %v", back[0].WindFrom)
	}
}

// A station pressure whose pressure altitude (NWS formula) lies more than
// StationMargin below the track is refused: sea-level pressure has never
// been recorded above about 1084 hPa (from memory), so such a figure is an
// altimeter setting typed as station pressure. Standard station pressures
// (U.S. Standard Atmosphere 1976: 24.71 inHg at 5200 ft) are accepted.
func TestImpossibleStationPressure(t *testing.T) {
	for _, tc := range []struct {
		name    string
		elevFt  float64
		baro    float64
		kind    PressureKind
		refused bool
	}{
		{"airport figure as station at 5200 ft (NWS PA -170 ft)", 5200, 30.10, StationPressure, true},
		{"airport figure as station at 3000 ft", 3000, 30.20, StationPressure, true},
		{"standard station at 5200 ft (USSA 1976)", 5200, 24.71, StationPressure, false},
		{"high pressure day at 5200 ft, 1050 hPa at sea level", 5200, 25.6, StationPressure, false},
		{"29.92 at 2240 ft: within the margin (PA 0 ft)", 2240, 29.92, StationPressure, false},
		{"record-high sea level 1083.8 hPa (from memory)", 0, 32.0, StationPressure, false},
		{"the same figure as an altimeter setting", 5200, 30.10, AltimeterSetting, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := Reading{Temp: Fahrenheit(80), Baro: InHg(tc.baro), BaroKind: tc.kind, RH: 0.3}
			err := r.Validate(Feet(tc.elevFt))
			if !tc.refused {
				if err != nil {
					t.Errorf("refused: %v", err)
				}
				return
			}
			var ie *InputError
			if !errors.As(err, &ie) || ie.Field != "baro" {
				t.Fatalf("got %v, want an InputError on baro", err)
			}
			for _, w := range []string{"station pressure", "altimeter", "ft"} {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%q lacks %q", err, w)
				}
			}
		})
	}
}

// Line ends of any kind, in chunks of any size (testing/iotest's one byte at
// a time included), come out as LF with one line end per line.
func TestLineEnds(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{"a\rb\r", "a\nb\n"},
		{"a\r\nb\r\n", "a\nb\n"},
		{"a\r\nb\rc\nd", "a\nb\nc\nd"},
		{"a\r\r\nb\r", "a\n\nb\n"},
		{"plain\n", "plain\n"},
	} {
		t.Run(strings.NewReplacer("\r", `\r`, "\n", `\n`).Replace(tc.in), func(t *testing.T) {
			for _, r := range []io.Reader{strings.NewReader(tc.in), iotest.OneByteReader(strings.NewReader(tc.in)), iotest.HalfReader(strings.NewReader(tc.in))} {
				got, err := io.ReadAll(&lineEnds{r: r})
				if err != nil || string(got) != tc.want {
					t.Errorf("%q: %q %v", tc.in, got, err)
				}
			}
			if got := string(LineEnds([]byte(tc.in))); got != tc.want {
				t.Errorf("LineEnds(%q) = %q", tc.in, got)
			}
		})
	}
}

// A weather log with its lines ended by a bare CR is read whole; one with its
// header repeated mid-file (two files joined) says so at that line.
func TestReadLogLineEndsAndRepeatedHeader(t *testing.T) {
	head := "date,time,temp_f,baro_inhg,humidity_pct"
	rows := []string{"2026-06-13,14:00,88,28.9,40", "2026-06-13,14:30,87,28.9,41"}
	log, err := ReadLog(strings.NewReader(head+"\r"+rows[0]+"\r"+rows[1]+"\r"), "weather.csv", 0, time.UTC)
	if err != nil || len(log) != 2 {
		t.Errorf("CR: %d readings, %v", len(log), err)
	}
	_, err = ReadLog(strings.NewReader(head+"\n"+rows[0]+"\n"+head+"\n"+rows[1]+"\n"), "weather.csv", 0, time.UTC)
	if err == nil || !strings.Contains(err.Error(), "weather.csv line 3") || !strings.Contains(err.Error(), "header line again") {
		t.Errorf("repeated header: %v", err)
	}
}

// SortLog puts readings in time order and keeps the order of readings of
// the same time (pitcard's own rule: a log's row order breaks a tie).
func TestSortLog(t *testing.T) {
	at := func(h int, note string) Reading {
		return Reading{Time: time.Date(2026, 6, 13, h, 0, 0, 0, time.UTC), Note: note}
	}
	log := []Reading{at(20, "c"), at(18, "a"), at(20, "d"), at(19, "b")}
	SortLog(log)
	var got string
	for _, r := range log {
		got += r.Note
	}
	if got != "abcd" {
		t.Errorf("sorted %q, want abcd", got)
	}
}
