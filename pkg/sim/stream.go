package sim

import (
	"math/rand/v2"
)

// Stream chunk layout: chunks of streamChunkSeconds join with a linear
// cross-fade of streamFadeSeconds.
const (
	streamChunkSeconds = 10.0
	streamFadeSeconds  = 0.05
)

// Stream is an endless recording of one machine for feeding a live agent. It
// renders consecutive chunks of about 10 s with the conditions of a template
// clip; shaft and drive phases, speed wander and the microphone gain run on
// across chunks, nuisances are drawn afresh for every chunk with the same
// odds as Plan, and chunks meet in a 50 ms linear cross-fade (tones are
// phase-continuous through it; noise dips by up to 3 dB at its middle).
// Stream has the shape of an audio source: Rate and Read. It is not safe for
// concurrent use.
type Stream struct {
	m       Machine
	rate    int
	tmpl    Clip
	r       *rand.Rand
	chunk   int // samples emitted per chunk
	fade    int
	k       int // chunks rendered
	cont    *continuation
	current Clip
	pending []int16
	tail    []float64
	stopped bool // the machine is off: only the background sounds
}

// NewStream starts an endless stream of machine m at rate Hz under the
// conditions of c (SetpointHz, SNRdB, Fault, Severity; c.Seed seeds the whole
// stream; c.Nuisance is ignored).
func NewStream(m Machine, c Clip, rate int) *Stream {
	return &Stream{m: m, rate: rate, tmpl: c, r: newRand(c.Seed, streamClip),
		chunk: int(streamChunkSeconds * float64(rate)), fade: max(1, int(streamFadeSeconds*float64(rate)))}
}

// Rate returns the sample rate in Hz.
func (s *Stream) Rate() int { return s.rate }

// SetCondition changes the set-point (Hz), fault and severity from the next
// chunk on ("" fault for healthy). The speed steps at the chunk boundary.
func (s *Stream) SetCondition(setpointHz float64, fault, severity string) {
	s.tmpl.SetpointHz, s.tmpl.Fault, s.tmpl.Severity = setpointHz, fault, severity
	s.tmpl.Label = 0
	if fault != "" {
		s.tmpl.Label = 1
	}
}

// SetStopped stops (true) or restarts (false) the machine from the next chunk
// on. A stopped machine is silent; the background plays on at the level it has
// while the machine runs, as in a hall where only this pump was switched off.
func (s *Stream) SetStopped(stopped bool) { s.stopped = stopped }

// Current returns the description of the chunk most recently started (zero
// before the first Read), for ground truth in live tests.
func (s *Stream) Current() Clip { return s.current }

// Read fills p with the next samples and returns len(p); it never fails.
func (s *Stream) Read(p []int16) (int, error) {
	n := 0
	for n < len(p) {
		if len(s.pending) == 0 {
			s.render()
		}
		c := copy(p[n:], s.pending)
		s.pending = s.pending[c:]
		n += c
	}
	return n, nil
}

// render produces the next chunk into s.pending.
func (s *Stream) render() {
	c := s.tmpl
	c.Seed = s.r.Uint64()
	c.Nuisance = drawNuisance(s.r)
	c.Name = ""
	c.Split = "stream"
	length := s.chunk + s.fade
	p, sc := renderChunk(s.m, c, s.rate, float64(length)/float64(s.rate), s.cont)
	if s.stopped {
		clear(p.machine)
	}
	next := sc.next(s.chunk)
	s.cont = &next
	noise := newRand(c.Seed, streamGain+0x100)
	out := make([]int16, s.chunk)
	for i := range out {
		v := p.sample(i)
		if s.tail != nil && i < s.fade {
			w := (float64(i) + 0.5) / float64(s.fade)
			v = (1-w)*s.tail[i] + w*v
		}
		out[i] = quantise(v, noise)
	}
	s.tail = make([]float64, s.fade)
	for i := range s.tail {
		s.tail[i] = p.sample(s.chunk + i)
	}
	s.pending = out
	s.current = c
	s.k++
}
