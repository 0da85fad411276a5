package audio

import "math"

// kaiserBeta returns the Kaiser window shape parameter for a stopband
// attenuation of a dB, by Kaiser's empirical formula (J. F. Kaiser 1974, as
// given in Oppenheim & Schafer, Discrete-Time Signal Processing, from
// memory; it is also scipy.signal.kaiser_beta, which
// TestResampleDesignMatchesKaiserord compares against).
func kaiserBeta(a float64) float64 {
	switch {
	case a > 50:
		return 0.1102 * (a - 8.7)
	case a >= 21:
		return 0.5842*math.Pow(a-21, 0.4) + 0.07886*(a-21)
	default:
		return 0
	}
}

// kaiserLength returns the number of taps a Kaiser-window lowpass needs for
// a stopband attenuation of a dB and a transition width of width, given as
// a fraction of the Nyquist frequency: ceil((a-7.95)/(2.285*pi*width) + 1)
// (Kaiser's length formula with the filter order M = N-1, as in
// scipy.signal.kaiserord, which the tests compare against), made odd
// so that the filter has an integer group delay of (N-1)/2 samples.
func kaiserLength(a, width float64) int {
	n := int(math.Ceil((a-7.95)/(2.285*math.Pi*width) + 1))
	if n%2 == 0 {
		n++
	}
	return n
}

// besselI0 returns the modified Bessel function of the first kind, order
// zero, by its power series sum_k ((x/2)^k / k!)^2, summed until the terms
// no longer change the result.
func besselI0(x float64) float64 {
	sum, term := 1.0, 1.0
	q := x * x / 4
	for k := 1.0; k < 500; k++ {
		term *= q / (k * k)
		sum += term
		if term < sum*1e-17 {
			break
		}
	}
	return sum
}

// kaiserLowpass returns an n-tap (n odd) linear-phase lowpass FIR filter:
// the ideal impulse response cutoff*sinc(cutoff*(i-(n-1)/2)) times a Kaiser
// window of shape beta, scaled to unit gain at DC. cutoff is the -6 dB
// frequency as a fraction of the Nyquist frequency (0 < cutoff < 1). This
// is the same construction as scipy.signal.firwin(n, cutoff,
// window=("kaiser", beta)).
func kaiserLowpass(n int, cutoff, beta float64) []float64 {
	h := make([]float64, n)
	mid := float64(n-1) / 2
	i0b := besselI0(beta)
	var sum float64
	for i := range h {
		m := float64(i) - mid
		r := 2*float64(i)/float64(n-1) - 1
		w := besselI0(beta*math.Sqrt(max(0, 1-r*r))) / i0b
		h[i] = cutoff * sinc(cutoff*m) * w
		sum += h[i]
	}
	for i := range h {
		h[i] /= sum
	}
	return h
}

// sinc returns sin(pi*x)/(pi*x), with sinc(0) = 1.
func sinc(x float64) float64 {
	if x == 0 {
		return 1
	}
	return math.Sin(math.Pi*x) / (math.Pi * x)
}
