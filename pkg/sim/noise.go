package sim

import (
	"math"
	"math/rand/v2"
)

// white returns n samples of zero-mean unit-variance Gaussian noise.
func white(r *rand.Rand, n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = gauss(r)
	}
	return x
}

// pinkFilter shapes white noise towards a 1/f power spectrum (-3.01 dB per
// octave, the definition of pink noise) between loHz and the Nyquist
// frequency. It cascades first-order pole-zero sections whose poles and zeros
// alternate at equal logarithmic spacing, so the -6 dB/octave slope of each
// pole is cancelled half the way to the next one and the average slope is
// -3 dB/octave (common practice, no source). Sections are discretised by the
// matched-z transform (poles and zeros mapped by z = exp(-2 pi f / rate)).
func pinkFilter(x []float64, rate int, loHz float64) {
	const ratio = 3.0 // frequency ratio between successive poles
	nyq := 0.5 * float64(rate)
	for p := loHz; p < nyq; p *= ratio {
		z := p * math.Sqrt(ratio)
		ap := math.Exp(-2 * math.Pi * p / float64(rate))
		az := math.Exp(-2 * math.Pi * math.Min(z, 0.49*float64(rate)) / float64(rate))
		var x1, y1 float64
		for i, v := range x {
			y := v - az*x1 + ap*y1
			x1, y1 = v, y
			x[i] = y
		}
	}
}

// brownFilter integrates x with a leaky integrator whose corner is cornerHz,
// giving a 1/f^2 (-6 dB/octave) power spectrum above the corner.
func brownFilter(x []float64, rate int, cornerHz float64) {
	a := math.Exp(-2 * math.Pi * cornerHz / float64(rate))
	var y float64
	for i, v := range x {
		y = a*y + v
		x[i] = y
	}
}

// meanPower returns the mean of the squares of x (0 for an empty slice).
func meanPower(x []float64) float64 {
	if len(x) == 0 {
		return 0
	}
	var s float64
	for _, v := range x {
		s += v * v
	}
	return s / float64(len(x))
}

// normalise scales x in place to unit mean power measured over x[lo:hi] and
// returns x. A silent window leaves x unchanged.
func normalise(x []float64, lo, hi int) []float64 {
	p := meanPower(x[lo:hi])
	if p <= 0 {
		return x
	}
	scale(x, 1/math.Sqrt(p))
	return x
}

// scale multiplies x in place by g.
func scale(x []float64, g float64) {
	for i := range x {
		x[i] *= g
	}
}

// addScaled adds g*src to dst element by element.
func addScaled(dst, src []float64, g float64) {
	for i := range dst {
		dst[i] += g * src[i]
	}
}

// slowWobble returns n samples of a smooth random fluctuation with unit
// standard deviation and energy mostly below about cornerHz: white noise at a
// coarse rate, linearly interpolated and smoothed.
func slowWobble(r *rand.Rand, rate, n int, cornerHz float64) []float64 {
	step := max(1, int(float64(rate)/(4*cornerHz)))
	knots := n/step + 2
	k := make([]float64, knots)
	// one-pole smoothing of the knots keeps the wobble from looking like steps
	var y float64
	a := 0.6
	for i := range k {
		y = a*y + (1-a)*gauss(r)
		k[i] = y
	}
	x := make([]float64, n)
	for i := range x {
		j := i / step
		f := float64(i%step) / float64(step)
		x[i] = k[j]*(1-f) + k[j+1]*f
	}
	p := meanPower(x)
	if p > 0 {
		scale(x, 1/math.Sqrt(p))
	}
	return x
}

func dbToAmp(db float64) float64 { return math.Pow(10, db/20) }
func dbToPow(db float64) float64 { return math.Pow(10, db/10) }
