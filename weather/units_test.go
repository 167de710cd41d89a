package weather

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// Unit definitions: 1 inHg = 3386.389 Pa (conventional), 1 ft = 0.3048 m,
// 1 mph = 0.44704 m/s (exact), °F = °C·1.8 + 32 (standard definitions).
func TestParseQuantities(t *testing.T) {
	near := func(a, b float64) bool { return math.Abs(a-b) < 1e-9*math.Max(1, math.Abs(b)) }
	temps := []struct {
		in   string
		bare TempUnit
		f    float64
	}{
		{"88F", DegC, 88}, {"88 °F", DegC, 88}, {"31.5C", DegF, 88.7}, {"31.5 degC", DegF, 88.7},
		{"-40f", DegF, -40}, {"-40C", DegF, -40}, {"72", DegF, 72}, {"20", DegC, 68}, {" 100c ", DegF, 212},
	}
	for _, tc := range temps {
		t.Run(tc.in, func(t *testing.T) {
			got, err := ParseTemperature(tc.in, tc.bare)
			if err != nil || !near(got.Fahrenheit(), tc.f) {
				t.Errorf("ParseTemperature(%q) = %v °F, %v; want %v °F", tc.in, got.Fahrenheit(), err, tc.f)
			}
		})
	}
	pressures := []struct {
		in   string
		bare PressureUnit
		pa   float64
	}{
		{"29.12inHg", UnitHPa, 29.12 * 3386.389}, {"29.12 in", UnitHPa, 29.12 * 3386.389},
		{"986hPa", UnitInHg, 98600}, {"986 mbar", UnitInHg, 98600}, {"986mb", UnitInHg, 98600},
		{"98.6kPa", UnitInHg, 98600}, {"29.92", UnitInHg, 29.92 * 3386.389}, {"1013.25", UnitHPa, 101325},
	}
	for _, tc := range pressures {
		t.Run(tc.in, func(t *testing.T) {
			got, err := ParsePressure(tc.in, tc.bare)
			if err != nil || !near(got.Pa(), tc.pa) {
				t.Errorf("ParsePressure(%q) = %v Pa, %v; want %v", tc.in, got.Pa(), err, tc.pa)
			}
		})
	}
	lengths := []struct {
		in   string
		bare LengthUnit
		m    float64
	}{
		{"1850ft", UnitM, 1850 * 0.3048}, {"1850 ft", UnitM, 563.88}, {"564m", UnitFt, 564}, {"1000", UnitFt, 304.8},
	}
	for _, tc := range lengths {
		t.Run(tc.in, func(t *testing.T) {
			got, err := ParseLength(tc.in, tc.bare)
			if err != nil || !near(got.Metres(), tc.m) {
				t.Errorf("ParseLength(%q) = %v m, %v; want %v", tc.in, got.Metres(), err, tc.m)
			}
		})
	}
	speeds := []struct {
		in   string
		bare SpeedUnit
		mps  float64
	}{
		{"10mph", UnitKMH, 4.4704}, {"36km/h", UnitMPH, 10}, {"36 kph", UnitMPH, 10}, {"3.5m/s", UnitMPH, 3.5},
		{"10kt", UnitMPH, 10 * 1852.0 / 3600}, {"5", UnitMPH, 2.2352},
	}
	for _, tc := range speeds {
		t.Run(tc.in, func(t *testing.T) {
			got, err := ParseSpeed(tc.in, tc.bare)
			if err != nil || !near(got.MPS(), tc.mps) {
				t.Errorf("ParseSpeed(%q) = %v m/s, %v; want %v", tc.in, got.MPS(), err, tc.mps)
			}
		})
	}
	for in, want := range map[string]float64{"45": 0.45, "45%": 0.45, "45 %RH": 0.45, "0": 0} {
		t.Run(in, func(t *testing.T) {
			if got, err := ParsePercent(in); err != nil || !near(got, want) {
				t.Errorf("ParsePercent(%q) = %v, %v", in, got, err)
			}
		})
	}
}

func TestParseErrorsNameTheProblem(t *testing.T) {
	cases := []struct {
		in   string
		fn   func(string) error
		want string
	}{
		{"88K", func(s string) error { _, err := ParseTemperature(s, DegF); return err }, "unknown unit \"k\""},
		{"hot", func(s string) error { _, err := ParseTemperature(s, DegF); return err }, "not a number"},
		{"", func(s string) error { _, err := ParseTemperature(s, DegF); return err }, "empty"},
		{"29.9psi", func(s string) error { _, err := ParsePressure(s, UnitInHg); return err }, "inHg, hPa"},
		{"1e3ft", func(s string) error { _, err := ParseLength(s, UnitFt); return err }, "unknown unit"},
		{"NaN", func(s string) error { _, err := ParseSpeed(s, UnitMPH); return err }, "not a number"},
		{"5furlongs", func(s string) error { _, err := ParseLength(s, UnitFt); return err }, "ft or m"},
		{"50g/kg", func(s string) error { _, err := ParsePercent(s); return err }, "percent"},
	}
	for _, tc := range cases {
		t.Run(fmt.Sprintf("%q", tc.in), func(t *testing.T) {
			err := tc.fn(tc.in)
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Errorf("%q: error %v is not an InputError", tc.in, err)
				return
			}
			if !strings.Contains(err.Error(), tc.want) || ie.Value != tc.in {
				t.Errorf("%q: error %q should contain %q and quote the value", tc.in, err, tc.want)
			}
		})
	}
}

func TestFormatRoundTrip(t *testing.T) {
	for _, u := range []Units{Imperial, Metric} {
		t.Run(u.Name(), func(t *testing.T) {
			temp := Fahrenheit(88.3)
			back, err := ParseTemperature(temp.Format(u.Temp, 1), DegF)
			if err != nil || math.Abs(back.Fahrenheit()-88.3) > 0.1 {
				t.Errorf("%s: temperature %q came back as %v (%v)", u.Name(), temp.Format(u.Temp, 1), back, err)
			}
			p := InHg(29.12)
			pb, err := ParsePressure(p.Format(u.Pressure), UnitInHg)
			if err != nil || math.Abs(pb.HPa()-p.HPa()) > 0.06 {
				t.Errorf("%s: pressure %q came back as %v (%v)", u.Name(), p.Format(u.Pressure), pb, err)
			}
			l := Feet(1850)
			lb, err := ParseLength(l.Format(u.Length), UnitFt)
			if err != nil || math.Abs(lb.Metres()-l.Metres()) > 0.5 {
				t.Errorf("%s: length %q came back as %v (%v)", u.Name(), l.Format(u.Length), lb, err)
			}
			v := MPH(8)
			vb, err := ParseSpeed(v.Format(u.Speed, 1), UnitMPH)
			if err != nil || math.Abs(vb.MPH()-8) > 0.05 {
				t.Errorf("%s: speed %q came back as %v (%v)", u.Name(), v.Format(u.Speed, 1), vb, err)
			}
		})
	}
}

func FuzzParseTemperature(f *testing.F) {
	for _, s := range []string{"88F", "31.5C", "-40", "", "°F", "1.2.3C", "+5 degC", "9999999999999999999999F"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseTemperature(s, DegF)
		checkParsed(t, s, float64(v), err, "temperature")
	})
}

func FuzzParsePressure(f *testing.F) {
	for _, s := range []string{"29.12inHg", "986hPa", "98.6kPa", "29.92", "in", "-0mb"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParsePressure(s, UnitInHg)
		checkParsed(t, s, float64(v), err, "pressure")
	})
}

func FuzzParseLength(f *testing.F) {
	for _, s := range []string{"1850ft", "564m", "1850'", "12", "ftm"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseLength(s, UnitFt)
		checkParsed(t, s, float64(v), err, "length")
	})
}

func FuzzParseSpeed(f *testing.F) {
	for _, s := range []string{"8mph", "12km/h", "3m/s", "7kt", "x"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseSpeed(s, UnitMPH)
		checkParsed(t, s, float64(v), err, "speed")
	})
}

func FuzzParsePercent(f *testing.F) {
	for _, s := range []string{"45", "45%", "101 %RH", "%"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParsePercent(s)
		checkParsed(t, s, v, err, "humidity")
	})
}

// checkParsed: a parser either returns a finite number or an InputError that
// names its quantity and quotes the input.
func checkParsed(t *testing.T, s string, v float64, err error, field string) {
	t.Helper()
	if err != nil {
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != field || !strings.Contains(err.Error(), field) {
			t.Fatalf("%q: error %q does not name %s", s, err, field)
		}
		return
	}
	if math.IsNaN(v) {
		t.Fatalf("%q parsed to NaN", s)
	}
}

func FuzzParseDirection(f *testing.F) {
	for _, s := range []string{"200", "SW", "nne", "200°", "200deg", "-5", "N W"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseDirection(s)
		checkParsed(t, s, v, err, "direction")
	})
}

// 1 lb = 0.45359237 kg exactly (the international pound, by definition).
func TestParseWeight(t *testing.T) {
	for _, tc := range []struct {
		in     string
		bare   WeightUnit
		wantLb float64
		bad    string // words of the error, "" for none
	}{
		{"3300lb", UnitKg, 3300, ""},
		{"3300 lbs", UnitLb, 3300, ""},
		{"1500kg", UnitLb, 1500 / 0.45359237, ""},
		{"1500", UnitKg, 1500 / 0.45359237, ""},
		{"3300", UnitLb, 3300, ""},
		{"3300abc", UnitLb, 0, `unknown unit "abc"`},
		{"heavy", UnitLb, 0, "not a number"},
	} {
		t.Run(tc.in, func(t *testing.T) {
			w, err := ParseWeight(tc.in, tc.bare)
			if tc.bad != "" {
				if err == nil || !strings.Contains(err.Error(), tc.bad) {
					t.Fatalf("ParseWeight(%q) = %v, %v; want an error with %q", tc.in, w, err, tc.bad)
				}
				return
			}
			if err != nil || math.Abs(w.Lb()-tc.wantLb) > 1e-9 {
				t.Errorf("ParseWeight(%q) = %v lb, %v; want %v", tc.in, w.Lb(), err, tc.wantLb)
			}
		})
	}
}
