package gamma

import (
	"fmt"
	"math"
)

// MinSamples is the fewest values Fit accepts.
const MinSamples = 10

// Fit returns the maximum-likelihood gamma distribution with location 0
// for x, the same estimate as SciPy's scipy.stats.gamma.fit(x, floc=0).
//
// With s = ln(mean x) - mean(ln x), the shape k solves
// ln(k) - ψ(k) = s and the scale is mean(x)/k. The equation is solved by
// Newton's method started from the closed-form approximation
// k₀ = (3 - s + √((s-3)² + 24s)) / (12s) given by Minka (2002),
// "Estimating a Gamma distribution"; it usually converges in three or
// four steps.
//
// It returns ErrTooFew for fewer than MinSamples values, ErrNotFinite or
// ErrNotPositive for a value that is NaN, infinite, zero or negative,
// ErrNoSpread when all values are equal (or so close that the shape would
// exceed MaxShape) and ErrNoConvergence if Newton's method fails.
func Fit(x []float64) (Dist, error) {
	if len(x) < MinSamples {
		return Dist{}, fmt.Errorf("%w (%d values, need %d)", ErrTooFew, len(x), MinSamples)
	}
	var sum, sumLog float64
	allEqual := true
	for i, v := range x {
		switch {
		case math.IsNaN(v) || math.IsInf(v, 0):
			return Dist{}, fmt.Errorf("%w (value %d is %v)", ErrNotFinite, i, v)
		case v <= 0:
			return Dist{}, fmt.Errorf("%w (value %d is %v)", ErrNotPositive, i, v)
		}
		sum += v
		sumLog += math.Log(v)
		allEqual = allEqual && v == x[0]
	}
	if math.IsInf(sum, 1) {
		return Dist{}, fmt.Errorf("%w (sum of values overflows)", ErrNotFinite)
	}
	n := float64(len(x))
	mean := sum / n
	s := math.Log(mean) - sumLog/n
	if allEqual || !(s > 0) {
		return Dist{}, fmt.Errorf("%w (%d values)", ErrNoSpread, len(x))
	}
	k, err := solveShape(s)
	if err != nil {
		return Dist{}, err
	}
	if k > MaxShape {
		return Dist{}, fmt.Errorf("%w (shape %.3g exceeds %g)", ErrNoSpread, k, float64(MaxShape))
	}
	return Dist{Shape: k, Scale: mean / k}, nil
}

// solveShape solves ln(k) - ψ(k) = s for k > 0 by Newton's method.
// The left side is positive, decreasing and convex, so from below the
// root the iteration approaches it monotonically; a step that would leave
// k <= 0 is replaced by halving k.
func solveShape(s float64) (float64, error) {
	const maxIter = 100
	k := (3 - s + math.Sqrt((s-3)*(s-3)+24*s)) / (12 * s)
	for i := 0; i < maxIter; i++ {
		f := logMinusDigamma(k) - s
		next := k - f/logMinusDigammaDeriv(k)
		if !(next > 0) {
			next = k / 2
		}
		if math.Abs(next-k) <= 1e-12*k {
			// Newton converges quadratically: the error left after a
			// step this small is far below rounding.
			return next, nil
		}
		k = next
	}
	return 0, fmt.Errorf("%w (s = %v)", ErrNoConvergence, s)
}
