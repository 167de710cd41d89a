// Package stats is the small numeric kit pitcard's packages share: the
// standard normal distribution, the median, the mean and spread.
//
// It holds no racing: a formula of the trade lives with its package.
package stats

import (
	"math"
	"sort"
)

// NormalCDF is the standard normal distribution function Φ(z).
func NormalCDF(z float64) float64 { return 0.5 * math.Erfc(-z/math.Sqrt2) }

// NormalPDF is the standard normal density φ(z).
func NormalPDF(z float64) float64 { return math.Exp(-z*z/2) / math.Sqrt(2*math.Pi) }

// NormalQuantile is Φ⁻¹(p), for 0 < p < 1.
func NormalQuantile(p float64) float64 { return math.Sqrt2 * math.Erfinv(2*p-1) }

// Median is the middle value of v (the mean of the two middle ones for an
// even count), v left as it is; v must not be empty. It sorts a copy:
// O(n log n), so a long logbook's residuals cost no more than their sort.
func Median(v []float64) float64 {
	s := append([]float64(nil), v...)
	sort.Float64s(s)
	if len(s)%2 == 1 {
		return s[len(s)/2]
	}
	return (s[len(s)/2-1] + s[len(s)/2]) / 2
}

// MeanSD is the mean and the sample standard deviation of v (0 for one value).
func MeanSD(v []float64) (float64, float64) {
	var m float64
	for _, x := range v {
		m += x
	}
	m /= float64(len(v))
	var ss float64
	for _, x := range v {
		ss += (x - m) * (x - m)
	}
	if len(v) < 2 {
		return m, 0
	}
	return m, math.Sqrt(ss / float64(len(v)-1))
}
