package sim

import (
	"math"
	"math/rand/v2"
)

// roomIR returns a room impulse response of rt60 seconds (the tail is then 60
// dB down), normalised to unit energy, whose direct-to-reverberant energy ratio
// is drrDB. It is a direct path, a handful of early reflections and a tail of
// Gaussian noise under an exponential envelope exp(-3 ln(10) t / RT60), the
// 60 dB energy decay that defines reverberation time (W. C. Sabine), a
// standard cheap model of a diffuse hall (J. A. Moorer, "About this
// reverberation business", Computer Music Journal 3(2), 1979; from memory).
// A one-pole low-pass on the tail stands in for air and wall absorption,
// which take the highs first.
func roomIR(r *rand.Rand, rate int, rt60, drrDB float64) []float64 {
	n := max(1, int(rt60*float64(rate)))
	h := make([]float64, n)
	decay := 3 * math.Ln10 / rt60 // amplitude decay rate, 1/s
	onset := int(uniform(r, 0.004, 0.010) * float64(rate))
	lp := math.Exp(-2 * math.Pi * uniform(r, 3000, 6000) / float64(rate))
	var y float64
	for i := onset; i < n; i++ {
		t := float64(i) / float64(rate)
		ramp := math.Min(1, float64(i-onset)/(0.005*float64(rate)))
		y = lp*y + (1-lp)*gauss(r)
		h[i] = y * ramp * math.Exp(-decay*t)
	}
	for range 6 {
		i := int(uniform(r, 0.002, 0.025) * float64(rate))
		if i < n {
			a := uniform(r, 0.2, 0.6)
			if r.IntN(2) == 0 {
				a = -a
			}
			h[i] += a * 0.5 * math.Sqrt(uniform(r, 0.5, 1))
		}
	}
	// h[0] is the direct path; scale the rest to meet the ratio.
	erev := meanPower(h[1:]) * float64(n-1)
	want := 1 / dbToPow(drrDB) // reverberant energy for a unit direct path
	if erev > 0 {
		scale(h[1:], math.Sqrt(want/erev))
	}
	h[0] = 1
	scale(h, 1/math.Sqrt(1+want))
	return h
}
