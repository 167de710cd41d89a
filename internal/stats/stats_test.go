package stats

import (
	"fmt"
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
		t.Run(fmt.Sprintf("NIST z = %g", tc.z), func(t *testing.T) {
			if got := NormalCDF(tc.z); math.Abs(got-tc.p) > 0.00006 {
				t.Errorf("Φ(%v) = %.5f, table %.4f", tc.z, got, tc.p)
			}
			if tc.p > 0.001 && tc.p < 0.999 {
				if back := NormalQuantile(NormalCDF(tc.z)); math.Abs(back-tc.z) > 1e-9 {
					t.Errorf("Φ⁻¹(Φ(%v)) = %v", tc.z, back)
				}
			}
		})
	}
}

// The median by definition: the middle value, or the mean of the two
// middle ones; the input is left in its order.
func TestMedian(t *testing.T) {
	for _, tc := range []struct {
		name string
		v    []float64
		want float64
	}{
		{"one", []float64{11.5}, 11.5},
		{"odd, unsorted", []float64{3, 1, 2}, 2},
		{"even", []float64{4, 1, 3, 2}, 2.5},
		{"repeats", []float64{1, 1, 1, 5}, 1},
		{"negative", []float64{-0.02, 0.01, -0.01}, -0.01},
	} {
		t.Run(tc.name, func(t *testing.T) {
			in := append([]float64(nil), tc.v...)
			if got := Median(in); got != tc.want {
				t.Errorf("Median(%v) = %v, want %v", tc.v, got, tc.want)
			}
			for i := range in {
				if in[i] != tc.v[i] {
					t.Fatalf("Median reordered its input: %v, was %v", in, tc.v)
				}
			}
		})
	}
}
