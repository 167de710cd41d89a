package main

import (
	"encoding/json"
	"math"
	"testing"
)

// The numbers of `air --format json`, each worked out here from its formula
// (Buck for the vapour pressure, the ideal-gas mix
// with Rd 287.058 and Rv 461.495 for the density, the NWS pressure- and
// density-altitude formulas, the ASHRAE humidity ratio, SAE J1349 and J607
// on dry pressure, DIN 70020 on total pressure). Each tolerance is half the
// last digit the JSON shows, plus 1e-9.
func TestAirJSONNumbers(t *testing.T) {
	out := mustRun(t, "air", "--temp", "88F", "--baro", "28.92inHg", "--humidity", "40%", "--elevation", "900ft", "--format", "json")
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatal(err)
	}
	c := (88 - 32) / 1.8
	tk := c + 273.15
	p := 28.92 * 3386.389 / 100                                  // hPa, station (conventional inHg)
	e := 0.40 * 6.1121 * math.Exp((18.678-c/234.5)*c/(257.14+c)) // hPa, Buck
	dry := p - e
	rho := dry*100/(287.058*tk) + e*100/(461.495*tk)
	tv := tk / (1 - e/p*(1-287.058/461.495))
	cases := []struct {
		key        string
		want, half float64
	}{
		{"vapor_pressure_hpa", e, 0.005},
		{"dry_air_pressure_hpa", dry, 0.005},
		{"air_density_kg_m3", rho, 0.000005},
		{"relative_air_density_pct", 100 * rho / 1.2250, 0.005},                        // U.S. Standard Atmosphere 1976 sea level
		{"density_altitude_ft", 145442.16 * (1 - math.Pow(rho/1.2250, 0.234969)), 5},   // NWS; shown to 10 ft (weather.DensityAltitudeStep)
		{"pressure_altitude_ft", 145366.45 * (1 - math.Pow(p/1013.25, 0.190284)), 0.5}, // NWS
		{"grains_per_lb", 7000 * 0.621945 * e / (p - e), 0.5},                          // ASHRAE
		{"cf_sae_j1349", 1.18*(99/(dry/10))*math.Sqrt((c+273)/298) - 0.18, 0.00005},
		{"cf_sae_j1349_2004", 1.176*(99/(dry/10))*math.Sqrt((c+273)/298) - 0.176, 0.00005},
		{"cf_std", 29.92 / (dry * 100 / 3386.389) * math.Sqrt((88+459.67)/519.67), 0.00005},
		{"cf_din70020", 1013 / p * math.Sqrt((c+273)/293), 0.00005},
		{"virtual_temp_f", (tv-273.15)*1.8 + 32, 0.05},
	}
	for _, tc := range cases {
		got, ok := m[tc.key].(float64)
		if !ok {
			t.Errorf("%s: not a number in %v", tc.key, m[tc.key])
			continue
		}
		if !(math.Abs(got-tc.want) <= tc.half+1e-9) {
			t.Errorf("%s = %v, from its formula %.6f (± %g)", tc.key, got, tc.want, tc.half)
		}
	}
}
