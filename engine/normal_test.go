package engine

import (
	"math"
	"testing"
)

// Source: standard normal distribution table (e.g. NIST/SEMATECH e-Handbook of
// Statistical Methods, "Cumulative distribution function of the standard normal").
func TestNormalTable(t *testing.T) {
	cases := []struct{ z, p float64 }{
		{0, 0.5000}, {1, 0.8413}, {-1, 0.1587}, {1.645, 0.9500}, {-1.28, 0.1003}, {2, 0.9772}, {-2.326, 0.0100}, {3, 0.99865},
	}
	for _, tc := range cases {
		if got := NormalCDF(tc.z); math.Abs(got-tc.p) > 0.00006 {
			t.Errorf("Φ(%v) = %.5f, table %.4f", tc.z, got, tc.p)
		}
		if tc.p > 0.001 && tc.p < 0.999 {
			if back := NormalQuantile(NormalCDF(tc.z)); math.Abs(back-tc.z) > 1e-9 {
				t.Errorf("Φ⁻¹(Φ(%v)) = %v", tc.z, back)
			}
		}
	}
}
