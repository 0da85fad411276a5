package gamma

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mathext"
)

func TestLogMinusDigamma(t *testing.T) {
	const eulerGamma = 0.57721566490153286061
	tests := []struct {
		name string
		x    float64
		want float64
		tol  float64
	}{
		// DLMF 5.4.12: ψ(1) = -γ.
		{"one", 1, eulerGamma, 1e-15},
		// DLMF 5.4.13: ψ(1/2) = -γ - 2 ln 2.
		{"half", 0.5, math.Log(0.5) + eulerGamma + 2*math.Ln2, 1e-15},
		// ψ(10) = H₉ - γ.
		{"ten", 10, math.Log(10) - (7129.0/2520 - eulerGamma), 1e-15},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := logMinusDigamma(tt.x); math.Abs(got-tt.want) > tt.tol {
				t.Errorf("logMinusDigamma(%v) = %.17g, want %.17g", tt.x, got, tt.want)
			}
		})
	}
	// Agreement with gonum's digamma over a range of arguments.
	for _, x := range []float64{0.01, 0.3, 2.5, 9.99, 10, 37, 1e4} {
		want := math.Log(x) - mathext.Digamma(x)
		if got := logMinusDigamma(x); math.Abs(got-want) > 1e-10*math.Max(1, want) {
			t.Errorf("logMinusDigamma(%v) = %.17g, gonum %.17g", x, got, want)
		}
	}
}

func TestLogMinusDigammaDeriv(t *testing.T) {
	// DLMF 5.15.2: ψ'(1) = π²/6.
	if got, want := logMinusDigammaDeriv(1), 1-math.Pi*math.Pi/6; math.Abs(got-want) > 1e-15 {
		t.Errorf("at 1: %.17g, want %.17g", got, want)
	}
	// Central differences of logMinusDigamma.
	for _, x := range []float64{0.2, 1.7, 9.5, 10.5, 120} {
		h := 1e-5 * x
		num := (logMinusDigamma(x+h) - logMinusDigamma(x-h)) / (2 * h)
		if got := logMinusDigammaDeriv(x); math.Abs(got-num) > 1e-6*math.Abs(num) {
			t.Errorf("at %v: %.12g, numerical %.12g", x, got, num)
		}
	}
}
