package gamma

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
)

// Shapes outside [MinShape, MaxShape] are rejected: the special-function
// routines lose accuracy or stall there, and no real sample needs them.
const (
	// MinShape is the smallest shape a valid Dist may have.
	MinShape = 1e-10
	// MaxShape is the largest shape a valid Dist may have; Fit returns
	// ErrNoSpread for samples that would need more.
	MaxShape = 1e6
)

// Dist is a gamma distribution with location 0, shape k and scale θ. Its
// mean is kθ and its variance kθ². The zero value is not a valid
// distribution; the methods of an invalid Dist (see Validate) return NaN.
type Dist struct {
	// Shape is k, in [MinShape, MaxShape].
	Shape float64
	// Scale is θ, finite and positive.
	Scale float64
}

// Validate returns ErrBadDist unless Shape is in [MinShape, MaxShape] and
// Scale is finite and positive.
func (d Dist) Validate() error {
	if !d.valid() {
		return fmt.Errorf("%w (shape %v, scale %v)", ErrBadDist, d.Shape, d.Scale)
	}
	return nil
}

// valid reports whether d passes Validate.
func (d Dist) valid() bool {
	return d.Shape >= MinShape && d.Shape <= MaxShape && d.Scale > 0 && !math.IsInf(d.Scale, 1)
}

// Mean returns kθ, or NaN for an invalid distribution.
func (d Dist) Mean() float64 {
	if !d.valid() {
		return math.NaN()
	}
	return d.Shape * d.Scale
}

// CDF returns P(X <= x): 0 for x <= 0 and 1 for x = +Inf. It returns NaN
// when x is NaN or the distribution is invalid.
func (d Dist) CDF(x float64) float64 {
	switch {
	case !d.valid() || math.IsNaN(x):
		return math.NaN()
	case x <= 0:
		return 0
	case math.IsInf(x/d.Scale, 1):
		return 1
	}
	return mathext.GammaIncReg(d.Shape, x/d.Scale)
}

// Survival returns P(X > x) = 1 - CDF(x), computed directly so that it
// keeps its relative accuracy far into the upper tail. It returns NaN
// when x is NaN or the distribution is invalid.
func (d Dist) Survival(x float64) float64 {
	switch {
	case !d.valid() || math.IsNaN(x):
		return math.NaN()
	case x <= 0:
		return 1
	case math.IsInf(x/d.Scale, 1):
		return 0
	}
	return mathext.GammaIncRegComp(d.Shape, x/d.Scale)
}

// Quantile returns the x with CDF(x) = p, the inverse of CDF: 0 for p = 0
// and +Inf for p = 1. It returns NaN when p is outside [0, 1] or NaN, or
// the distribution is invalid. A typical alarm level is Quantile(0.999).
func (d Dist) Quantile(p float64) float64 {
	switch {
	case !d.valid() || !(p >= 0 && p <= 1):
		return math.NaN()
	case p == 0:
		return 0
	case p == 1:
		return math.Inf(1)
	}
	return standardQuantile(d.Shape, p) * d.Scale
}
