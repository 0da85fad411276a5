package gamma

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// standardQuantile returns z > 0 with P(k, z) = p, where P is the
// regularised lower incomplete gamma function (the CDF for scale 1), for
// k > 0 and 0 < p < 1. It returns 0 when z underflows.
//
// Upper quantiles come straight from gonum's inverse of the upper
// function Q = 1 - P, evaluated at 1 - p (exact for p >= 1/2). For
// p < 1/2 that loses the relative accuracy of tiny quantiles, so the
// result is refined by lowerQuantile. (gonum's GammaIncRegInv is not used:
// for tiny p it can panic inside its root finder.)
func standardQuantile(k, p float64) float64 {
	z := mathext.GammaIncRegCompInv(k, 1-p)
	if p >= 0.5 {
		return z
	}
	return lowerQuantile(k, p, z)
}

// lowerQuantile solves P(k, z) = p for p < 1/2 from the starting guess z
// by Newton's method on h(u) = ln P(k, eᵘ) - ln p, safeguarded by
// bisection. h is increasing and concave (it is the log of the CDF of
// ln Z, whose density is log-concave), and the root lies below u = ln k
// because P(k, k) > 1/2 (the median is below the mean).
func lowerQuantile(k, p, z float64) float64 {
	lo, hi := math.Inf(-1), math.Log(k)
	if !(z > 0 && z < k) {
		// Leading term of the series P(k, z) ≈ z^k / Γ(k+1).
		lg, _ := math.Lgamma(k + 1)
		z = math.Min(math.Exp((math.Log(p)+lg)/k), k/2)
	}
	if z == 0 {
		return 0
	}
	u := math.Log(z)
	lgk, _ := math.Lgamma(k)
	logP := math.Log(p)
	for i := 0; i < 200; i++ {
		z = math.Exp(u)
		f := mathext.GammaIncReg(k, z)
		if f <= p {
			lo = u
		} else {
			hi = u
		}
		next := math.NaN()
		if f > 0 {
			logF := math.Log(f)
			// h'(u) = z g(z) / P(k, z) with g the unit-scale density.
			slope := math.Exp(k*math.Log(z) - z - lgk - logF)
			next = u - (logF-logP)/slope
			if math.Abs(next-u) < 1e-14 {
				return math.Exp(next)
			}
		}
		if !(next > lo && next < hi) {
			if math.IsInf(lo, -1) {
				next = hi - 1
			} else {
				next = lo + (hi-lo)/2
			}
		}
		if hi-lo < 1e-15 {
			break
		}
		u = next
	}
	return math.Exp(u)
}
