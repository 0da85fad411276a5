package sim

import (
	"math"
)

// neighbour synthesises another rotating machine nearby (a fan or blower on a
// direct-on-line motor) that starts and/or stops during the clip: its speed
// runs up over 1-4 s after switch-on and coasts down exponentially after
// switch-off, its blade-pass tones follow the speed, its mains hum stops
// with the power, and its broadband noise follows the affinity-law level.
func (s *scene) neighbour() []float64 {
	r := newRand(s.c.Seed, streamNeighbour)
	T := float64(s.n) / float64(s.rate)
	poles := []int{2, 4, 6}[r.IntN(3)]
	full := ShaftHz(s.m.LineHz, poles, uniform(r, 0.01, 0.04))
	blades := 3 + r.IntN(10)
	tOn, tOff := math.Inf(-1), math.Inf(1)
	switch r.IntN(3) {
	case 0:
		tOn = uniform(r, 0.1, 0.6) * T
	case 1:
		tOff = uniform(r, 0.3, 0.9) * T
	default:
		tOn = uniform(r, 0.05, 0.4) * T
		tOff = tOn + uniform(r, 0.3, 0.5)*T
	}
	up, tau := uniform(r, 1, 4), uniform(r, 1.5, 4)
	blocks := (s.total + s.block - 1) / s.block
	hz := make([]float64, blocks)
	speedAtOff := 1.0
	if !math.IsInf(tOn, 0) && !math.IsInf(tOff, 0) {
		speedAtOff = math.Min(1, (tOff-tOn)/up)
	}
	for b := range hz {
		t := float64(b*s.block-s.pre) / float64(s.rate)
		var sp float64
		switch {
		case t < tOn:
			sp = 0
		case t < tOff:
			sp = math.Min(1, (t-tOn)/up)
		default:
			sp = speedAtOff * math.Exp(-(t-tOff)/tau)
		}
		hz[b] = full * sp
	}
	tr := newTrack(s.rate, s.block, hz, r.Float64())
	ph := func() float64 { return 2 * math.Pi * r.Float64() }
	bl := float64(blades)
	tones := make([]float64, s.total)
	tr.add(tones, groupPartials(1,
		[]partial{{mult: 1, phase: ph()}, {mult: bl, phase: ph()}, {mult: 2 * bl, phase: ph()}, {mult: 3 * bl, phase: ph()}},
		[]float64{0.1, 0.55, 0.25, 0.1}))
	broad := white(r, s.total)
	pinkFilter(broad, s.rate, 20)
	lp := lowpass(s.rate, uniform(r, 2000, 5000), math.Sqrt2/2)
	lp.run(broad)
	normalise(broad, 0, s.total)
	hum := make([]float64, s.total)
	mains := newTrack(s.rate, s.total, []float64{s.m.LineHz}, 0)
	mains.add(hum, []partial{{mult: 2, amp: math.Sqrt2, phase: ph()}})
	x := make([]float64, s.total)
	active := make([]bool, s.total)
	wt, wb, wh := math.Sqrt(uniform(r, 0.3, 0.6)), math.Sqrt(uniform(r, 0.3, 0.6)), math.Sqrt(uniform(r, 0.02, 0.1))
	for i := range x {
		sp := tr.hzAt(i) / full
		g := math.Pow(sp, 1.5)
		t := float64(i-s.pre) / float64(s.rate)
		powered := boolf(t >= tOn && t < tOff)
		x[i] = g*(wt*tones[i]+wb*broad[i]) + powered*wh*hum[i]
		active[i] = sp > 0.5 && i >= s.pre
	}
	setActiveLevel(x, active, uniform(r, -3, 9))
	return x
}
