package weather

import "math"

// The engine power correction factors. Each turns power observed in the given
// air into power at the standard's reference air: corrected = observed × CF.
// A CF above 1 means the air is worse than the standard's (the engine made less
// than it would have at standard). Each is exactly 1 at its own standard.

// CFSAEJ1349 is the SAE J1349 (1990) factor, referenced to 25 °C and 99 kPa
// of dry air: CF = 1.18 · (99/Pd_kPa) · √((T_°C + 273)/298) − 0.18.
func CFSAEJ1349(t Temperature, dry Pressure) float64 {
	return 1.18*(99/dry.KPa())*math.Sqrt((t.Celsius()+273)/298) - 0.18
}

// CFSAEJ1349v2004 is the 2004 revision of SAE J1349, with 1.176 and 0.176 in
// place of 1.18 and 0.18; same reference air.
func CFSAEJ1349v2004(t Temperature, dry Pressure) float64 {
	return 1.176*(99/dry.KPa())*math.Sqrt((t.Celsius()+273)/298) - 0.176
}

// CFSTD is the "STD" factor of SAE J607, referenced to 60 °F and 29.92 inHg of
// dry air: CF = (29.92/Pd_inHg) · √((T_°F + 459.67)/519.67).
func CFSTD(t Temperature, dry Pressure) float64 {
	return 29.92 / dry.InHg() * math.Sqrt(t.Rankine()/519.67)
}

// CFDIN70020 is the DIN 70020 factor, referenced to 20 °C and 1013 hPa of total
// pressure (humidity is ignored by the standard): CF = (1013/P_hPa) · √((T_°C + 273)/293).
func CFDIN70020(t Temperature, total Pressure) float64 {
	return 1013 / total.HPa() * math.Sqrt((t.Celsius()+273)/293)
}
