package weather

// Gas constants of dry air and water vapor, J/(kg·K).
const (
	RDry    = 287.058
	RVapor  = 461.495
	epsilon = RDry / RVapor // ≈ 0.622
)

// StandardDensity is the density of dry air at 15 °C and 1013.25 hPa, the sea
// level of the U.S. Standard Atmosphere 1976: 1.2250 kg/m³.
const StandardDensity = 1.2250

// AirDensity is the density in kg/m³ of moist air at total pressure p,
// temperature t and vapor pressure e, as an ideal mixture of dry air and water
// vapor: ρ = (p − e)/(Rd·T) + e/(Rv·T). Humid air is lighter than dry air at
// the same pressure and temperature.
func AirDensity(p Pressure, t Temperature, e Pressure) float64 {
	k := t.Kelvin()
	return float64(p-e)/(RDry*k) + float64(e)/(RVapor*k)
}

// VirtualTemperature is the temperature dry air would need to have the density
// of this moist air at the same pressure: Tv = T / (1 − (e/p)·(1 − Rd/Rv)).
func VirtualTemperature(p Pressure, t Temperature, e Pressure) Temperature {
	return Temperature(t.Kelvin() / (1 - float64(e)/float64(p)*(1-epsilon)))
}
