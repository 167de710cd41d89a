package weather

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Conversion constants (exact or conventional definitions).
const (
	PaPerInHg   = 3386.389 // conventional inch of mercury at 0 °C, Pa
	MetrePerFt  = 0.3048   // international foot, exact
	MpsPerMph   = 0.44704  // exact
	MpsPerKmh   = 1 / 3.6  // exact
	MpsPerKnot  = 1852.0 / 3600
	KgPerLb     = 0.45359237 // exact
	GravitySI   = 9.80665    // standard gravity, m/s², exact
	kelvinAt0C  = 273.15
	rankineAt0F = 459.67
)

// Temperature is an absolute temperature in kelvin. Build one with Celsius,
// Fahrenheit or Kelvin and read it back with the methods of the same names.
type Temperature float64

// Celsius returns the temperature t °C.
func Celsius(t float64) Temperature { return Temperature(t + kelvinAt0C) }

// Fahrenheit returns the temperature t °F.
func Fahrenheit(t float64) Temperature { return Temperature((t-32)/1.8 + kelvinAt0C) }

// Kelvin returns the temperature t K.
func Kelvin(t float64) Temperature { return Temperature(t) }

// Kelvin is the temperature in K.
func (t Temperature) Kelvin() float64 { return float64(t) }

// Celsius is the temperature in °C.
func (t Temperature) Celsius() float64 { return float64(t) - kelvinAt0C }

// Fahrenheit is the temperature in °F.
func (t Temperature) Fahrenheit() float64 { return (float64(t)-kelvinAt0C)*1.8 + 32 }

// Rankine is the temperature in °R.
func (t Temperature) Rankine() float64 { return t.Fahrenheit() + rankineAt0F }

// TempUnit is a unit a temperature is typed or printed in.
type TempUnit int

// Temperature units.
const (
	DegF TempUnit = iota
	DegC
)

// String is the unit's symbol.
func (u TempUnit) String() string {
	if u == DegC {
		return "°C"
	}
	return "°F"
}

// In returns the temperature as a number in unit u.
func (t Temperature) In(u TempUnit) float64 {
	if u == DegC {
		return t.Celsius()
	}
	return t.Fahrenheit()
}

// Format prints the temperature in unit u with the given decimals, e.g. "88.0 °F".
func (t Temperature) Format(u TempUnit, decimals int) string {
	return strconv.FormatFloat(t.In(u), 'f', decimals, 64) + " " + u.String()
}

// String prints the temperature in °F with one decimal.
func (t Temperature) String() string { return t.Format(DegF, 1) }

// ParseTemperature reads a temperature as a racer types it: "88F", "88 °F",
// "31.5C", "31.5degC". A bare number is taken in unit bare. Kelvin is not
// accepted: no track meter reads it, and "300" in K is a typo in any other unit.
func ParseTemperature(s string, bare TempUnit) (Temperature, error) {
	v, unit, err := splitNumber("temperature", s)
	if err != nil {
		return 0, err
	}
	switch strings.TrimPrefix(strings.TrimPrefix(unit, "°"), "deg") {
	case "":
		if bare == DegC {
			return Celsius(v), nil
		}
		return Fahrenheit(v), nil
	case "f":
		return Fahrenheit(v), nil
	case "c":
		return Celsius(v), nil
	}
	return 0, inputErr("temperature", s, "has unknown unit %q (use F or C, e.g. 88F or 31.5C)", unit)
}

// Pressure is a pressure in pascal.
type Pressure float64

// InHg returns the pressure p inches of mercury (conventional, 0 °C).
func InHg(p float64) Pressure { return Pressure(p * PaPerInHg) }

// HPa returns the pressure p hectopascal (= millibar).
func HPa(p float64) Pressure { return Pressure(p * 100) }

// KPa returns the pressure p kilopascal.
func KPa(p float64) Pressure { return Pressure(p * 1000) }

// Pa is the pressure in Pa.
func (p Pressure) Pa() float64 { return float64(p) }

// HPa is the pressure in hPa (= mbar).
func (p Pressure) HPa() float64 { return float64(p) / 100 }

// KPa is the pressure in kPa.
func (p Pressure) KPa() float64 { return float64(p) / 1000 }

// InHg is the pressure in inHg.
func (p Pressure) InHg() float64 { return float64(p) / PaPerInHg }

// PressureUnit is a unit a pressure is typed or printed in.
type PressureUnit int

// Pressure units.
const (
	UnitInHg PressureUnit = iota
	UnitHPa
	UnitMbar
	UnitKPa
)

// String is the unit's symbol.
func (u PressureUnit) String() string {
	switch u {
	case UnitHPa:
		return "hPa"
	case UnitMbar:
		return "mbar"
	case UnitKPa:
		return "kPa"
	}
	return "inHg"
}

// In returns the pressure as a number in unit u.
func (p Pressure) In(u PressureUnit) float64 {
	switch u {
	case UnitHPa, UnitMbar:
		return p.HPa()
	case UnitKPa:
		return p.KPa()
	}
	return p.InHg()
}

// Format prints the pressure in unit u with the decimals a meter shows in it
// (inHg 2, hPa and mbar 1, kPa 2).
func (p Pressure) Format(u PressureUnit) string {
	d := 1
	if u == UnitInHg || u == UnitKPa {
		d = 2
	}
	return strconv.FormatFloat(p.In(u), 'f', d, 64) + " " + u.String()
}

// String prints the pressure in inHg.
func (p Pressure) String() string { return p.Format(UnitInHg) }

// ParsePressure reads a pressure: "29.12inHg", "29.12in", "986hPa", "986mbar",
// "986mb", "98.6kPa". A bare number is taken in unit bare.
func ParsePressure(s string, bare PressureUnit) (Pressure, error) {
	v, unit, err := splitNumber("pressure", s)
	if err != nil {
		return 0, err
	}
	if unit == "" {
		unit = strings.ToLower(bare.String())
	}
	switch unit {
	case "inhg", "in", `"hg`, "inches":
		return InHg(v), nil
	case "hpa", "mbar", "mb":
		return HPa(v), nil
	case "kpa":
		return KPa(v), nil
	}
	return 0, inputErr("pressure", s, "has unknown unit %q (use inHg, hPa, mbar or kPa, e.g. 29.12inHg or 986hPa)", unit)
}

// Length is a length or altitude in meters.
type Length float64

// Feet returns the length f feet.
func Feet(f float64) Length { return Length(f * MetrePerFt) }

// Metres returns the length m meters.
func Metres(m float64) Length { return Length(m) }

// Feet is the length in ft.
func (l Length) Feet() float64 { return float64(l) / MetrePerFt }

// Metres is the length in m.
func (l Length) Metres() float64 { return float64(l) }

// LengthUnit is a unit a length is typed or printed in.
type LengthUnit int

// Length units.
const (
	UnitFt LengthUnit = iota
	UnitM
)

// String is the unit's symbol.
func (u LengthUnit) String() string {
	if u == UnitM {
		return "m"
	}
	return "ft"
}

// In returns the length as a number in unit u.
func (l Length) In(u LengthUnit) float64 {
	if u == UnitM {
		return l.Metres()
	}
	return l.Feet()
}

// Format prints the length in unit u, rounded to whole units.
func (l Length) Format(u LengthUnit) string {
	return strconv.FormatFloat(math.Round(l.In(u)), 'f', 0, 64) + " " + u.String()
}

// DensityAltitudeStep is the step a density altitude is shown in: 10 ft, or
// 5 m in metric. A handheld meter's ±1 °F and ±0.01 inHg move density
// altitude by about ±70 ft (NWS density-altitude formula, worked through),
// so a figure to the foot claims a precision no reading has; ten feet is
// also how racers quote it (common practice, no source).
var DensityAltitudeStep = map[LengthUnit]float64{UnitFt: 10, UnitM: 5}

// FormatDensityAltitude prints a density altitude in unit u to its
// DensityAltitudeStep: "4430 ft", "1350 m". The one formatter of the figure
// on every screen.
func (l Length) FormatDensityAltitude(u LengthUnit) string {
	return strconv.FormatFloat(RoundDensityAltitude(l.In(u), u), 'f', 0, 64) + " " + u.String()
}

// RoundDensityAltitude rounds a density altitude v, in unit u, to its step
// (for the JSON figures: density_altitude_ft).
func RoundDensityAltitude(v float64, u LengthUnit) float64 {
	step := DensityAltitudeStep[u]
	if step == 0 {
		step = 1
	}
	return math.Round(v/step) * step
}

// String prints the length in ft.
func (l Length) String() string { return l.Format(UnitFt) }

// ParseLength reads a length or altitude: "1850ft", "1850'", "564m".
// A bare number is taken in unit bare.
func ParseLength(s string, bare LengthUnit) (Length, error) {
	v, unit, err := splitNumber("length", s)
	if err != nil {
		return 0, err
	}
	if unit == "" {
		unit = bare.String()
	}
	switch unit {
	case "ft", "'", "feet", "foot":
		return Feet(v), nil
	case "m", "metres", "meters":
		return Metres(v), nil
	}
	return 0, inputErr("length", s, "has unknown unit %q (use ft or m, e.g. 1850ft or 564m)", unit)
}

// Speed is a speed in meters per second.
type Speed float64

// MPH returns the speed v miles per hour.
func MPH(v float64) Speed { return Speed(v * MpsPerMph) }

// KMH returns the speed v kilometres per hour.
func KMH(v float64) Speed { return Speed(v * MpsPerKmh) }

// MPS returns the speed v meters per second.
func MPS(v float64) Speed { return Speed(v) }

// MPH is the speed in mph.
func (v Speed) MPH() float64 { return float64(v) / MpsPerMph }

// KMH is the speed in km/h.
func (v Speed) KMH() float64 { return float64(v) / MpsPerKmh }

// MPS is the speed in m/s.
func (v Speed) MPS() float64 { return float64(v) }

// SpeedUnit is a unit a speed is typed or printed in.
type SpeedUnit int

// Speed units.
const (
	UnitMPH SpeedUnit = iota
	UnitKMH
	UnitMPS
)

// String is the unit's symbol.
func (u SpeedUnit) String() string {
	switch u {
	case UnitKMH:
		return "km/h"
	case UnitMPS:
		return "m/s"
	}
	return "mph"
}

// In returns the speed as a number in unit u.
func (v Speed) In(u SpeedUnit) float64 {
	switch u {
	case UnitKMH:
		return v.KMH()
	case UnitMPS:
		return v.MPS()
	}
	return v.MPH()
}

// Format prints the speed in unit u with the given decimals.
func (v Speed) Format(u SpeedUnit, decimals int) string {
	return strconv.FormatFloat(v.In(u), 'f', decimals, 64) + " " + u.String()
}

// String prints the speed in mph with one decimal.
func (v Speed) String() string { return v.Format(UnitMPH, 1) }

// ParseSpeed reads a speed: "8mph", "12km/h", "12kph", "3.5m/s", "7kt".
// A bare number is taken in unit bare.
func ParseSpeed(s string, bare SpeedUnit) (Speed, error) {
	v, unit, err := splitNumber("speed", s)
	if err != nil {
		return 0, err
	}
	if unit == "" {
		unit = bare.String()
	}
	switch unit {
	case "mph":
		return MPH(v), nil
	case "km/h", "kmh", "kph":
		return KMH(v), nil
	case "m/s", "mps":
		return MPS(v), nil
	case "kt", "kts", "kn", "knots":
		return Speed(v * MpsPerKnot), nil
	}
	return 0, inputErr("speed", s, "has unknown unit %q (use mph, km/h, m/s or kt, e.g. 8mph)", unit)
}

// Weight is a mass in kilograms (a car and driver as weighed on a
// scale; the trade says weight). Build one with Pounds or Kilograms.
type Weight float64

// Pounds returns the weight v lb.
func Pounds(v float64) Weight { return Weight(v * KgPerLb) }

// Kilograms returns the weight v kg.
func Kilograms(v float64) Weight { return Weight(v) }

// Lb is the weight in pounds.
func (w Weight) Lb() float64 { return float64(w) / KgPerLb }

// Kg is the weight in kilograms.
func (w Weight) Kg() float64 { return float64(w) }

// WeightUnit is a unit a weight is typed or printed in.
type WeightUnit int

// Weight units.
const (
	UnitLb WeightUnit = iota
	UnitKg
)

// String is the unit's symbol.
func (u WeightUnit) String() string {
	if u == UnitKg {
		return "kg"
	}
	return "lb"
}

// In returns the weight as a number in unit u.
func (w Weight) In(u WeightUnit) float64 {
	if u == UnitKg {
		return w.Kg()
	}
	return w.Lb()
}

// ParseWeight reads a weight as a racer types it: "3300lb", "3300 lbs",
// "1500kg". A bare number is taken in unit bare. The range is not checked
// here.
func ParseWeight(s string, bare WeightUnit) (Weight, error) {
	v, unit, err := splitNumber("weight", s)
	if err != nil {
		return 0, err
	}
	if unit == "" {
		unit = bare.String()
	}
	switch unit {
	case "lb", "lbs", "pound", "pounds", "#":
		return Pounds(v), nil
	case "kg", "kgs", "kilo", "kilos":
		return Kilograms(v), nil
	}
	return 0, inputErr("weight", s, "has unknown unit %q (use lb or kg, e.g. 3300lb or 1500kg)", unit)
}

// ParsePercent reads a relative humidity in percent, "45", "45%" or "45 %RH",
// and returns it as a fraction (0.45). The range is not checked here.
func ParsePercent(s string) (float64, error) {
	v, unit, err := splitNumber("humidity", s)
	if err != nil {
		return 0, err
	}
	switch unit {
	case "", "%", "%rh", "rh", "pct":
		return v / 100, nil
	}
	return 0, inputErr("humidity", s, "has unknown unit %q (give percent, e.g. 45%%)", unit)
}

// ParseDirection reads a compass direction: degrees 0..360 ("200", "200°",
// "200deg") or a 16-point compass name ("SW", "nne").
func ParseDirection(s string) (float64, error) {
	if d, ok := compassPoints[strings.ToUpper(strings.TrimSpace(s))]; ok {
		return d, nil
	}
	v, unit, err := splitNumber("direction", s)
	if err == nil && unit != "" && unit != "°" && unit != "deg" {
		err = inputErr("direction", s, "has unknown unit %q", unit)
	}
	if err != nil {
		return 0, inputErr("direction", s, "is not a compass direction (degrees 0..360, or N, NE, SW ...)")
	}
	return v, nil
}

var compassPoints = map[string]float64{"N": 0, "NNE": 22.5, "NE": 45, "ENE": 67.5, "E": 90, "ESE": 112.5,
	"SE": 135, "SSE": 157.5, "S": 180, "SSW": 202.5, "SW": 225, "WSW": 247.5, "W": 270, "WNW": 292.5,
	"NW": 315, "NNW": 337.5}

// splitNumber splits "29.12 inHg" into 29.12 and the lower-cased unit "inhg".
// The number is plain decimal notation: an optional sign, digits, an optional
// fraction. Exponents, hex, NaN and Inf are refused.
func splitNumber(quantity, s string) (float64, string, error) {
	t := strings.TrimSpace(s)
	i := 0
	if i < len(t) && (t[i] == '+' || t[i] == '-') {
		i++
	}
	digits := 0
	for i < len(t) && t[i] >= '0' && t[i] <= '9' {
		i++
		digits++
	}
	if i < len(t) && t[i] == '.' {
		i++
		for i < len(t) && t[i] >= '0' && t[i] <= '9' {
			i++
			digits++
		}
	}
	// A decimal comma (what a phone set to many languages offers) is not
	// read as one: "82,5" could as well be a slip of the finger, so the
	// racer is shown the figure with a point to type.
	if i < len(t) && t[i] == ',' && digits > 0 && i+1 < len(t) && t[i+1] >= '0' && t[i+1] <= '9' {
		return 0, "", inputErr(quantity, s, "has a decimal comma: type a decimal point, %s", t[:i]+"."+t[i+1:])
	}
	if digits == 0 {
		if t == "" {
			return 0, "", inputErr(quantity, s, "is empty (give a number with its unit)")
		}
		return 0, "", inputErr(quantity, s, "is not a number with a unit")
	}
	v, err := strconv.ParseFloat(t[:i], 64)
	if err != nil {
		return 0, "", inputErr(quantity, s, "is not a number: %v", err)
	}
	unit := strings.ToLower(strings.TrimSpace(t[i:]))
	return v, unit, nil
}

// Units is the set of units a crew types and reads.
type Units struct {
	Temp     TempUnit
	Pressure PressureUnit
	Length   LengthUnit
	Speed    SpeedUnit
	Weight   WeightUnit
}

// Imperial is the set of units of U.S. tracks: °F, inHg, ft, mph, lb.
var Imperial = Units{DegF, UnitInHg, UnitFt, UnitMPH, UnitLb}

// Metric is °C, hPa, m, km/h, kg.
var Metric = Units{DegC, UnitHPa, UnitM, UnitKMH, UnitKg}

// ParseUnits reads a unit system by name: "imperial" or "metric".
func ParseUnits(name string) (Units, error) {
	switch strings.ToLower(strings.TrimSpace(name)) {
	case "imperial", "us", "":
		return Imperial, nil
	case "metric", "si":
		return Metric, nil
	}
	return Units{}, inputErr("units", name, "is not a unit system (use imperial or metric)")
}

// Name is "imperial" or "metric" for the presets, "mixed" otherwise.
func (u Units) Name() string {
	switch u {
	case Imperial:
		return "imperial"
	case Metric:
		return "metric"
	}
	return fmt.Sprintf("mixed (%s, %s, %s, %s)", u.Temp, u.Pressure, u.Length, u.Speed)
}
