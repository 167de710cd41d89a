package weather

import "math"

// U.S. Standard Atmosphere 1976, troposphere (0 to 11 km geopotential).
const (
	seaLevelTemp     = 288.15    // K
	seaLevelPressure = 101325.0  // Pa
	lapseRate        = 0.0065    // K per geopotential meter
	pressureExponent = 5.25588   // g·M/(R·L)
	earthRadius      = 6356766.0 // m, the standard's effective radius for geopotential
)

// Standard is the state of the U.S. Standard Atmosphere 1976 at one altitude.
type Standard struct {
	Temp     Temperature
	Pressure Pressure
	Density  float64 // kg/m³
}

// StandardAtmosphere is the U.S. Standard Atmosphere 1976 at geometric altitude
// h. Valid range: −1.5 km to 11 km (the troposphere); outside it the
// troposphere's formulas are extended, which is wrong above 11 km.
func StandardAtmosphere(h Length) Standard {
	z := h.Metres()
	hp := earthRadius * z / (earthRadius + z) // geopotential altitude
	t := seaLevelTemp - lapseRate*hp
	p := seaLevelPressure * math.Pow(t/seaLevelTemp, pressureExponent)
	return Standard{Temp: Kelvin(t), Pressure: Pressure(p), Density: p / (RDry * t)}
}

// PressureAltitude is the altitude of the standard atmosphere whose pressure is
// the station pressure p (NWS): PA_ft = 145366.45 · (1 − (p/1013.25 hPa)^0.190284).
func PressureAltitude(p Pressure) Length {
	return Feet(145366.45 * (1 - math.Pow(p.HPa()/1013.25, 0.190284)))
}

// StationFromPressureAltitude is the pressure whose pressure altitude is
// pa: the inverse of PressureAltitude (NWS).
func StationFromPressureAltitude(pa Length) Pressure {
	return HPa(1013.25 * math.Pow(1-pa.Feet()/145366.45, 1/0.190284))
}

// DensityAltitude is the altitude of the standard atmosphere whose density is
// rho kg/m³: DA_ft = 145442.16 · (1 − (ρ/1.2250)^0.234969). The exponent is
// 1/(g·M/(R·L) − 1), so standard air at altitude h has density altitude h.
func DensityAltitude(rho float64) Length {
	return Feet(145442.16 * (1 - math.Pow(rho/StandardDensity, 0.234969)))
}

// StationFromAltimeter is the station pressure at elevation h for an altimeter
// setting a (NWS; Smithsonian Meteorological Tables):
// P_stn = (A^0.190263 − 8.417286e-5 · H_m)^(1/0.190263), pressures in hPa.
func StationFromAltimeter(a Pressure, h Length) Pressure {
	return HPa(math.Pow(math.Pow(a.HPa(), 0.190263)-8.417286e-5*h.Metres(), 1/0.190263))
}

// AltimeterFromStation is the altimeter setting that gives station pressure p
// at elevation h: the exact inverse of StationFromAltimeter.
func AltimeterFromStation(p Pressure, h Length) Pressure {
	return HPa(math.Pow(math.Pow(p.HPa(), 0.190263)+8.417286e-5*h.Metres(), 1/0.190263))
}
