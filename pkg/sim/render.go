package sim

import (
	"math"
	"math/rand/v2"
)

// micGainRangeDB bounds the per-clip microphone gain offset (uniform in
// +-3 dB); micDriftDB bounds the slow drift within a clip.
const (
	micGainRangeDB = 3.0
	micDriftDB     = 0.75
)

// parts are the separately measurable pieces of one clip, visible window
// only, in full-scale units before the microphone gain. Tests use them to
// check the SNR and the fault level; Render mixes them.
type parts struct {
	healthy      []float64 // healthy machine at the source
	healthyPower float64   // its mean power
	fault        []float64 // fault component at the source, nil if healthy
	machine      []float64 // machine after the room and microphone response
	background   []float64 // background after room, microphone and SNR scaling
	gain         []float64 // microphone gain, amplitude factor
}

// renderParts synthesises one clip into its parts.
func renderParts(m Machine, c Clip, rate int, seconds float64) parts {
	p, _ := renderChunk(m, c, rate, seconds, nil)
	return p
}

// renderChunk synthesises one clip, or one chunk of a stream when cont is not
// nil, and also returns the scene for continuing after it.
func renderChunk(m Machine, c Clip, rate int, seconds float64, cont *continuation) (parts, *scene) {
	s := newScene(m, c, rate, seconds, cont)
	h := s.healthy()
	f := s.fault(h)
	dry := make([]float64, s.total)
	for i := range dry {
		dry[i] = h.rest[i] + f.turbGain*h.turb[i]
	}
	if f.add != nil {
		addScaled(dry, f.add, 1)
	}
	bg := s.background()

	hm := roomIR(newRand(uint64(m.Seed), streamRoom), rate, m.RT60, m.MachineDRRdB)
	rr := newRand(c.Seed, streamNuisanceRoom)
	hn := roomIR(rr, rate, m.RT60, uniform(rr, -10, -2))
	wet, nw := convolve2(dry, hm, bg.sources, hn)
	addScaled(nw, bg.ambient, 1)

	// Microphone low-frequency roll-off: second-order Butterworth high-pass
	// (Audio EQ Cookbook HPF with Q = 1/sqrt 2).
	for _, x := range [][]float64{wet, nw} {
		f := highpass(rate, m.MicHighPassHz, math.Sqrt2/2)
		f.run(x)
	}
	wet, nw = s.visible(wet), s.visible(nw)
	pm, pb := meanPower(wet), meanPower(nw)
	if pb > 0 {
		scale(nw, math.Sqrt(pm/(pb*dbToPow(c.SNRdB))))
	}

	p := parts{healthy: make([]float64, s.n), machine: wet, background: nw}
	for i := range p.healthy {
		p.healthy[i] = h.at(s.pre + i)
	}
	p.healthyPower = meanPower(p.healthy)
	if f.add != nil {
		p.fault = s.visible(f.add)
	}
	p.gain = s.micGain()
	return p, s
}

// micGain returns the microphone gain per visible sample: a per-clip offset
// uniform in +-micGainRangeDB plus a slow drift of two random sinusoids with
// periods of 8 to 40 s, together within +-micDriftDB.
func (s *scene) micGain() []float64 {
	seed, origin := s.c.Seed, 0
	if s.cont != nil {
		seed, origin = s.cont.gainSeed, s.cont.gainOrigin
	}
	r := newRand(seed, streamGain)
	off := uniform(r, -micGainRangeDB, micGainRangeDB)
	a1 := uniform(r, 0, micDriftDB)
	a2 := uniform(r, 0, micDriftDB-a1)
	p1, p2 := uniform(r, 8, 40), uniform(r, 8, 40)
	q1, q2 := 2*math.Pi*r.Float64(), 2*math.Pi*r.Float64()
	at := func(i int) float64 {
		t := float64(i+origin) / float64(s.rate)
		db := off + a1*math.Sin(2*math.Pi*t/p1+q1) + a2*math.Sin(2*math.Pi*t/p2+q2)
		return math.Exp(db * math.Ln10 / 20)
	}
	// The drift is slow, so it is evaluated every 64 samples and
	// interpolated linearly in between.
	const step = 64
	g := make([]float64, s.n)
	for i0 := 0; i0 < s.n; i0 += step {
		g0, g1 := at(i0), at(i0+step)
		for i := i0; i < min(i0+step, s.n); i++ {
			g[i] = g0 + (g1-g0)*float64(i-i0)/step
		}
	}
	return g
}

// Render synthesises clip c of machine m at rate Hz for the given seconds
// into dst, which should hold rate*seconds samples (extra samples are left
// alone, missing ones are not rendered). Levels are fixed, not normalised per
// clip: the healthy machine sits at nominalDBFS at the source at line
// frequency, moves with speed by the affinity law, passes the room and the
// microphone, and the microphone gain offset (+-3 dB) and drift apply to
// everything. Samples beyond int16 are hard-clipped, as a recorder would;
// the level plan keeps that well under 0.1 % of samples. The result is a
// deterministic function of m.Seed and c.
func Render(m Machine, c Clip, rate int, seconds float64, dst []int16) {
	p := renderParts(m, c, rate, seconds)
	r := newRand(c.Seed, streamGain+0x100)
	for i := range min(len(dst), len(p.machine)) {
		dst[i] = quantise(p.sample(i), r)
	}
}

// sample returns the microphone signal at visible sample i in int16 units,
// before quantisation.
func (p parts) sample(i int) float64 {
	return (p.machine[i] + p.background[i]) * p.gain[i] * 32767
}

// quantise adds recorder self-noise of about 0.5 LSB rms, rounds, and
// hard-clips to the int16 range as a recorder does.
func quantise(v float64, r *rand.Rand) int16 {
	v += 0.5 * gauss(r)
	return int16(math.Max(-32768, math.Min(32767, math.Round(v))))
}
