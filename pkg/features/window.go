package features

import "math"

// Hann returns the periodic Hann window of length n as float32:
// w[k] = 0.5 - 0.5 cos(2 pi k / n), k = 0..n-1. The periodic form (the
// denominator is n, not n-1) tiles exactly at 50 % overlap and is the
// usual choice for spectral analysis. It panics if n <= 0.
func Hann(n int) []float32 {
	if n <= 0 {
		panic("features: Hann: length must be positive")
	}
	w := make([]float32, n)
	for k := range w {
		w[k] = float32(0.5 - 0.5*math.Cos(2*math.Pi*float64(k)/float64(n)))
	}
	return w
}
