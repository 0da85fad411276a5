package sim

import "math"

// nominalDBFS is the healthy machine's level, in dB re full scale, at the
// source when running at line frequency; the room, the microphone's roll-off,
// the affinity law and the gain offset then move it (a calibration choice so
// that typical clips sit near -26 dBFS rms with room for impacts).
const nominalDBFS = -27.0

// scene gathers what every part of one clip's synthesis shares.
type scene struct {
	m     Machine
	c     Clip
	rate  int
	n     int // visible samples
	pre   int // pre-roll samples, dropped after the room
	total int // pre + n
	block int // samples per speed block (10 ms)
	drive track
	shaft track
	aff   []float64 // affinity amplitude factor per sample
	cont  *continuation
}

// continuation carries the state that must run on from one rendered chunk
// to the next for a seamless stream: rotation phases and drive wander at the
// first visible sample, and the microphone's gain seed and time origin.
type continuation struct {
	driveCycles, shaftCycles float64
	wander                   float64
	gainSeed                 uint64
	gainOrigin               int // samples since the stream began
}

// newScene lays out one clip: pre-roll as long as the room response so the
// reverberation is in steady state when the visible part starts. A non-nil
// cont continues a stream.
func newScene(m Machine, c Clip, rate int, seconds float64, cont *continuation) *scene {
	n := int(math.Round(float64(rate) * seconds))
	pre := max(1, int(m.RT60*float64(rate)))
	block := max(1, rate/100)
	total := n + pre
	blocks := (total + block - 1) / block
	r := newRand(c.Seed, streamSpeed)
	w0 := uniform(r, -0.6, 0.6) * wanderLimit
	if cont != nil {
		w0 = cont.wander
	}
	dhz := driveHzPerBlock(r, blocks, c.SetpointHz, w0)
	drive := newTrack(rate, block, dhz, r.Float64())
	shz := make([]float64, blocks)
	for i, f := range dhz {
		shz[i] = m.ShaftHz(f)
	}
	shaft := newTrack(rate, block, shz, r.Float64())
	if cont != nil {
		drive.shift(cont.driveCycles - drive.cyclesAt(pre))
		shaft.shift(cont.shaftCycles - shaft.cyclesAt(pre))
	}
	return &scene{m: m, c: c, rate: rate, n: n, pre: pre, total: total, block: block,
		drive: drive, shaft: shaft, aff: affinityPerSample(drive, total, m.LineHz), cont: cont}
}

// next returns the continuation for a chunk whose first visible sample is
// this scene's visible sample i.
func (s *scene) next(i int) continuation {
	j := s.pre + i
	c := continuation{driveCycles: s.drive.cyclesAt(j), shaftCycles: s.shaft.cyclesAt(j),
		wander: s.drive.hzAt(j)/s.c.SetpointHz - 1, gainSeed: s.c.Seed, gainOrigin: i}
	if s.cont != nil {
		c.gainSeed, c.gainOrigin = s.cont.gainSeed, s.cont.gainOrigin+i
	}
	return c
}

// visible returns the window of a full-length buffer that ends up in the clip.
func (s *scene) visible(x []float64) []float64 { return x[s.pre:s.total] }
