package sim

import (
	"math"
	"math/rand/v2"
)

// impactTrain returns unit impulses placed where ratio x (shaft cycles)
// crosses an integer, i.e. at ratio times the shaft rate, each displaced by a
// Gaussian jitter of jitterFrac of the period (rolling elements slip, which
// makes bearing impacts 1-2 % irregular: R. B. Randall and J. Antoni, "Rolling
// element bearing diagnostics - a tutorial", MSSP 25(2), 2011; from memory).
// amp(i) gives each impact's amplitude from its sample index; skip is the
// probability that an impact is missing. Fractional positions are shared
// linearly between two samples.
func (s *scene) impactTrain(r *rand.Rand, ratio, jitterFrac, skip float64, amp func(i int) float64) []float64 {
	x := make([]float64, s.total)
	off := r.Float64()
	prev := math.Floor(ratio*s.shaft.cyclesAt(0) + off)
	for i := 1; i < s.total; i++ {
		c := ratio*s.shaft.cyclesAt(i) + off
		k := math.Floor(c)
		if k == prev {
			continue
		}
		prev = k
		if r.Float64() < skip {
			continue
		}
		perSample := ratio * s.shaft.hzAt(i) / float64(s.rate) // cycles per sample
		period := 1 / perSample                                // samples
		pos := float64(i) - (c-k)/perSample + jitterFrac*period*gauss(r)
		j := int(math.Floor(pos))
		if j < 0 || j+1 >= s.total {
			continue
		}
		f := pos - float64(j)
		a := amp(j)
		x[j] += a * (1 - f)
		x[j+1] += a * f
	}
	return x
}

// ring passes x through a structural resonance at fHz with quality q plus a
// weaker second mode, as a struck housing rings (common practice, no source).
func (s *scene) ring(x []float64, fHz, q float64, second float64) []float64 {
	y := make([]float64, len(x))
	copy(y, x)
	a := bandpass(s.rate, fHz, q)
	a.run(y)
	if second > 0 && fHz*second < 0.45*float64(s.rate) {
		z := make([]float64, len(x))
		copy(z, x)
		b := bandpass(s.rate, fHz*second, q*0.8)
		b.run(z)
		addScaled(y, z, 0.5)
	}
	return y
}

// bursts returns a Poisson train of short decaying noise bursts whose rate at
// sample i is rateHz(i) per second; each burst lasts 0.5 to 3 ms and has a
// log-normal amplitude (a crackle; common practice, no source).
func (s *scene) bursts(r *rand.Rand, rateHz func(i int) float64) []float64 {
	x := make([]float64, s.total)
	fs := float64(s.rate)
	for i := range x {
		if r.Float64() >= rateHz(i)/fs {
			continue
		}
		l := int(uniform(r, 0.0005, 0.003) * fs)
		a := math.Exp(0.7 * gauss(r))
		for j := 0; j < l && i+j < len(x); j++ {
			x[i+j] += a * gauss(r) * math.Exp(-3*float64(j)/float64(l))
		}
	}
	return x
}
