package gamma

import (
	"math"
	"sort"
)

// KSStat returns the one-sample Kolmogorov-Smirnov statistic of x against
// d: the largest distance between the empirical CDF of x and d.CDF,
//
//	D = max over sorted x₍ᵢ₎ of max(i/n - F(x₍ᵢ₎), F(x₍ᵢ₎) - (i-1)/n),
//
// the value SciPy's scipy.stats.kstest(x, "gamma", args=(k, 0, θ)) reports
// as its statistic. Small values mean a good fit; as a rough guide,
// D above 1.36/√n rejects the distribution at the 5% level when d was not
// fitted to x (with a fitted d the true critical value is smaller). x is
// not modified. It returns NaN for an empty x, a NaN value or an invalid
// d.
func KSStat(x []float64, d Dist) float64 {
	if len(x) == 0 || !d.valid() {
		return math.NaN()
	}
	xs := append([]float64(nil), x...)
	for _, v := range xs {
		if math.IsNaN(v) {
			return math.NaN()
		}
	}
	sort.Float64s(xs)
	n := float64(len(xs))
	var stat float64
	for i, v := range xs {
		f := d.CDF(v)
		stat = math.Max(stat, math.Max(float64(i+1)/n-f, f-float64(i)/n))
	}
	return stat
}
