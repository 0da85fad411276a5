package sim

import (
	"math"
	"math/rand/v2"
)

// clanks synthesises one to four impacts: dropped tools that ring a few
// metal modes and bounce, or valve slams with a low thump. Each is a sum of
// exponentially decaying sinusoids (modal synthesis; common practice, no
// source) with a short noise click, its peak set 10-22 dB above the ambient
// rms.
func (s *scene) clanks() []float64 {
	r := newRand(s.c.Seed, streamClank)
	T := float64(s.n) / float64(s.rate)
	x := make([]float64, s.total)
	for range 1 + r.IntN(4) {
		ev := make([]float64, s.total)
		start := s.sec(uniform(r, 0.02, 0.95) * T)
		if r.Float64() < 0.3 { // valve slam
			s.mode(ev, start, uniform(r, 50, 150), uniform(r, 0.06, 0.2), 1)
			for range 2 {
				s.mode(ev, start, uniform(r, 300, 1500), uniform(r, 0.02, 0.08), uniform(r, 0.2, 0.6))
			}
			s.click(r, ev, start, 0.5)
		} else { // dropped tool, bouncing
			modes := 3 + r.IntN(4)
			fs := make([]float64, modes)
			taus := make([]float64, modes)
			amps := make([]float64, modes)
			for k := range fs {
				fs[k] = math.Exp(uniform(r, math.Log(400), math.Log(6000)))
				taus[k] = uniform(r, 0.01, 0.15)
				amps[k] = uniform(r, 0.3, 1)
			}
			at, a := start, 1.0
			for range 1 + r.IntN(3) {
				for k := range fs {
					s.mode(ev, at, fs[k], taus[k], a*amps[k])
				}
				s.click(r, ev, at, a)
				at += int(uniform(r, 0.08, 0.25) * float64(s.rate) * a)
				a *= uniform(r, 0.3, 0.5)
			}
		}
		var peak float64
		for _, v := range ev {
			peak = math.Max(peak, math.Abs(v))
		}
		if peak > 0 {
			addScaled(x, ev, dbToAmp(uniform(r, 10, 22))/peak)
		}
	}
	return x
}

// mode adds a decaying sinusoid at fHz with time constant tau seconds and
// amplitude a, starting at sample start, computed by a two-term recursion.
func (s *scene) mode(x []float64, start int, fHz, tau, a float64) {
	if fHz >= 0.45*float64(s.rate) {
		return
	}
	w := 2 * math.Pi * fHz / float64(s.rate)
	d := math.Exp(-1 / (tau * float64(s.rate)))
	n := int(6 * tau * float64(s.rate))
	// y[k] = a d^k sin(w k): y[k] = 2 d cos(w) y[k-1] - d^2 y[k-2]
	c1, c2 := 2*d*math.Cos(w), -d*d
	y1, y2 := a*d*math.Sin(w), 0.0
	for k := 1; k < n && start+k < len(x); k++ {
		x[start+k] += y1
		y1, y2 = c1*y1+c2*y2, y1
	}
}

// click adds a 1-2 ms burst of decaying noise of amplitude a at start.
func (s *scene) click(r *rand.Rand, x []float64, start int, a float64) {
	l := int(uniform(r, 0.001, 0.002) * float64(s.rate))
	for k := 0; k < l && start+k < len(x); k++ {
		x[start+k] += a * 0.5 * gauss(r) * math.Exp(-4*float64(k)/float64(l))
	}
}
