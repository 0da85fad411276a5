package gamma

import "math"

// asymptoticFrom is where the asymptotic series below are accurate to
// about 1e-17; smaller arguments are shifted up with the recurrences
// ψ(x) = ψ(x+1) - 1/x and ψ'(x) = ψ'(x+1) + 1/x².
const asymptoticFrom = 10

// logMinusDigamma returns ln(x) - ψ(x) for x > 0, where ψ is the digamma
// function. This is the left side of the maximum-likelihood equation for
// the gamma shape; for large x it is computed from its own asymptotic
// series (DLMF 5.11.2) to avoid cancelling ln(x) against ψ(x).
func logMinusDigamma(x float64) float64 {
	var sum float64
	y := x
	for ; y < asymptoticFrom; y++ {
		sum += 1 / y
	}
	r := 1 / (y * y)
	tail := 1/(2*y) + r*(1.0/12+r*(-1.0/120+r*(1.0/252+r*(-1.0/240+r*(1.0/132+r*(-691.0/32760+r*(1.0/12)))))))
	if y == x {
		return tail
	}
	// ln x - ψ(x) = ln x - ψ(y) + Σ 1/(x+i) = ln(x/y) + (ln y - ψ(y)) + Σ.
	return math.Log(x/y) + tail + sum
}

// logMinusDigammaDeriv returns the derivative of logMinusDigamma,
// 1/x - ψ'(x), for x > 0 (ψ' is the trigamma function, DLMF 5.15.8 for the
// series). It is negative for all x > 0.
func logMinusDigammaDeriv(x float64) float64 {
	var sum float64
	y := x
	for ; y < asymptoticFrom; y++ {
		sum += 1 / (y * y)
	}
	r := 1 / (y * y)
	// 1/y - ψ'(y), negated series without the leading 1/y.
	tail := -(r/2 + r/y*(1.0/6+r*(-1.0/30+r*(1.0/42+r*(-1.0/30+r*(5.0/66+r*(-691.0/2730+r*(7.0/6))))))))
	if y == x {
		return tail
	}
	// 1/x - ψ'(x) = 1/x - 1/y + (1/y - ψ'(y)) - Σ 1/(x+i)².
	return 1/x - 1/y + tail - sum
}
