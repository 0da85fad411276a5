package sim

import "math"

// track is a rotation (or any periodic process) whose rate in Hz is constant
// within blocks of samples and may change from block to block. It keeps the
// accumulated number of cycles at every block start so that partials of any
// multiple stay phase-coherent however the rate wanders.
type track struct {
	rate  int       // sample rate, Hz
	block int       // samples per block
	hz    []float64 // rotation rate in each block, Hz
	cyc   []float64 // cycles completed at the start of each block
}

// newTrack builds a track from the per-block rates, starting at startCycles.
func newTrack(rate, block int, hz []float64, startCycles float64) track {
	cyc := make([]float64, len(hz)+1)
	cyc[0] = startCycles
	for i, f := range hz {
		cyc[i+1] = cyc[i] + f*float64(block)/float64(rate)
	}
	return track{rate: rate, block: block, hz: hz, cyc: cyc}
}

// shift adds delta cycles to the whole track (a change of starting phase).
func (t track) shift(delta float64) {
	for i := range t.cyc {
		t.cyc[i] += delta
	}
}

// hzAt returns the rate at sample i, Hz.
func (t track) hzAt(i int) float64 { return t.hz[min(i/t.block, len(t.hz)-1)] }

// cyclesAt returns the accumulated cycles at sample i.
func (t track) cyclesAt(i int) float64 {
	b := min(i/t.block, len(t.hz)-1)
	return t.cyc[b] + float64(i-b*t.block)*t.hz[b]/float64(t.rate)
}

// partial is one sinusoid locked to a track: frequency mult*track + offsetHz,
// amplitude amp, phase offset phase radians.
type partial struct {
	mult, offsetHz float64
	amp, phase     float64
}

// add adds the partials to dst (whose length sets the number of samples).
// Within a block each partial is a rotating phasor; at every block start its
// phase is recomputed exactly from the accumulated cycles, so no error builds
// up. Partials at or above 0.45 of the sample rate are skipped.
func (t track) add(dst []float64, ps []partial) {
	nyq := 0.45 * float64(t.rate)
	for _, p := range ps {
		if p.amp == 0 {
			continue
		}
		for b := 0; b*t.block < len(dst); b++ {
			bi := min(b, len(t.hz)-1)
			f := p.mult*t.hz[bi] + p.offsetHz
			if math.Abs(f) >= nyq {
				continue
			}
			start := b * t.block
			end := min(start+t.block, len(dst))
			tsec := float64(start) / float64(t.rate)
			c := p.mult*t.cyclesAt(start) + p.offsetHz*tsec
			c -= math.Floor(c)
			s0, c0 := math.Sincos(2*math.Pi*c + p.phase)
			sr, cr := math.Sincos(2 * math.Pi * f / float64(t.rate))
			re, im := c0, s0
			for i := start; i < end; i++ {
				dst[i] += p.amp * im
				re, im = re*cr-im*sr, re*sr+im*cr
			}
		}
	}
}
