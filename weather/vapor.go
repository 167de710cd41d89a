package weather

import "math"

// SaturationVaporPressure is the saturation vapor pressure of water over a flat
// water surface at temperature t, from the Buck equation (Buck 1981, revised
// 1996): es = 6.1121 · exp((18.678 − T/234.5) · T/(257.14 + T)) hPa, T in °C.
// It stays within 0.1 % of the CRC Handbook table from 0 to 50 °C. Below 0 °C
// it is the value over supercooled water, which is what a hygrometer reports.
func SaturationVaporPressure(t Temperature) Pressure {
	c := t.Celsius()
	return HPa(6.1121 * math.Exp((18.678-c/234.5)*c/(257.14+c)))
}

// DewPoint is the temperature at which e is the saturation vapor pressure: the
// exact inverse of SaturationVaporPressure (the Buck equation solved as a
// quadratic in T). e must be positive; for e ≤ 0 it returns the lowest
// temperature the equation allows meaningfully, −80 °C.
func DewPoint(e Pressure) Temperature {
	if e <= 0 {
		return Celsius(-80)
	}
	// (18.678 − T/234.5)·T = L·(257.14 + T), L = ln(e/6.1121)
	// ⇒ T²/234.5 − (18.678 − L)·T + 257.14·L = 0; the smaller root is the physical one.
	l := math.Log(e.HPa() / 6.1121)
	b := 18.678 - l
	disc := b*b - 4*257.14*l/234.5
	if disc < 0 {
		disc = 0
	}
	return Celsius(234.5 / 2 * (b - math.Sqrt(disc)))
}

// VaporPressureRH is the partial pressure of water vapor at temperature t and
// relative humidity rh (a fraction, 0..1): e = rh · es(t).
func VaporPressureRH(t Temperature, rh float64) Pressure {
	return Pressure(rh * float64(SaturationVaporPressure(t)))
}

// HumidityRatio is the mass of water per mass of dry air (kg/kg) for vapor
// pressure e in air of total pressure p: W = 0.621945 · e/(p − e)
// (ASHRAE Handbook — Fundamentals, psychrometrics).
func HumidityRatio(e, p Pressure) float64 {
	return 0.621945 * float64(e) / float64(p-e)
}

// GrainsPerLb is the humidity ratio in grains of water per pound of dry air
// (7000 grains = 1 lb), the unit racers' weather stations show.
func GrainsPerLb(e, p Pressure) float64 { return 7000 * HumidityRatio(e, p) }
