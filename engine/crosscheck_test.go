package engine

import (
	"math"
	"testing"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/logbook"
	"pitcard/weather"
)

// The plain cross-check scales each pass by the cube root of the ratio of
// SAE J1349 factors: CF = 1.18·(99/Pd_kPa)·√((T_°C+273)/298) − 0.18 (SAE
// J1349, 1990), power ∝ 1/CF, ET ∝ (W/P)^(1/3) (Huntington, Rod & Custom
// 1958; Fox, Am. J. Physics 1973). The expected values are worked here from
// those formulas, not from pitcard's weather package.
func TestAirCarried(t *testing.T) {
	j1349 := func(tC, pdKPa float64) float64 { return 1.18*(99/pdKPa)*math.Sqrt((tC+273)/298) - 0.18 }
	dry := func(tm time.Time, tC, kPa float64) weather.Reading {
		return weather.Reading{Time: tm, Temp: weather.Celsius(tC), Baro: weather.KPa(kPa), BaroKind: weather.StationPressure}
	}
	day := time.Date(2026, 6, 13, 18, 0, 0, 0, time.UTC)
	pass := func(min int, et float64, air weather.Reading, notes string) logbook.Pass {
		p := logbook.Pass{Time: day.Add(time.Duration(min) * time.Minute), Track: "Test Strip", Air: air, HasAir: true, Notes: notes}
		p.ET[4] = decimal.NewNullDecimal(decimal.NewFromFloat(et))
		return p
	}
	std := dry(day, 25, 99) // J1349's own standard: CF = 1 exactly
	passes := []logbook.Pass{
		pass(0, 11.50, std, ""),
		pass(30, 11.00, std, ""),
		pass(60, 11.02, std, ""),
		pass(90, 9.00, std, "lifted, tire spin"), // aborted: not carried
		pass(120, 11.04, std, ""),
	}
	today := dry(day.Add(3*time.Hour), 35, 95)
	want := 11.02 * math.Cbrt(j1349(35, 95)/j1349(25, 99)) // the median of 11.00, 11.02, 11.04, carried alike
	elev := func(string) weather.Length { return weather.Feet(0) }
	cc, ok := AirCarried(passes, 1320, today, weather.Feet(0), elev)
	if !ok || len(cc.Passes) != CrossCheckPasses || math.Abs(cc.ET-want) > 1e-6 {
		t.Errorf("carried %.5f from %d passes, want %.5f", cc.ET, len(cc.Passes), want)
	}
	// in its own air a pass carries to itself
	if cc, _ := AirCarried(passes[:1], 1320, std, weather.Feet(0), elev); math.Abs(cc.ET-11.50) > 1e-9 {
		t.Errorf("same air: %.5f", cc.ET)
	}
	// thinner air is slower, as the cube-root law says
	if cc.ET <= 11.02 {
		t.Errorf("35 °C, 95 kPa is not slower: %.4f", cc.ET)
	}
	if _, ok := AirCarried(passes[3:4], 1320, today, weather.Feet(0), elev); ok {
		t.Error("an aborted pass alone gave a cross-check")
	}
}
