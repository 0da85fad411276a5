package gate

import "fmt"

// Reading is what one closed interval measured. The zero value means no
// interval has been closed yet.
type Reading struct {
	// Samples is the interval's length in samples.
	Samples int
	// Peak is the largest |sample| in LSB (32768 for a sample of -32768).
	Peak int
	// ClipFraction is the share of samples at full scale (x >= 32767 or
	// x <= -32767, the convention embed.Window.ClipFraction uses).
	ClipFraction float64
	// DCFraction is the mean sample value as a signed fraction of full
	// scale (32768).
	DCFraction float64
	// LongestRunSeconds is the longest run of one repeated sample value
	// with at least one sample in the interval, in seconds, counted from
	// the run's first sample (which may lie in an earlier interval).
	LongestRunSeconds float64
	// Levels is the number of distinct sample values in the interval,
	// counted up to SensorConfig.FewLevels+1 (larger counts read as that).
	Levels int
	// Faulty is the raw, undebounced verdict of the interval per Kind.
	// Silence excludes stuck, few-levels and DC offset (a dead input has no
	// meaningful pattern or mean), and stuck excludes few-levels and DC
	// offset, so one cause raises one of them; clipping is judged on its
	// own.
	Faulty [NumKinds]bool
}

// Sensor is the sensor-health accumulator: it watches every raw sample
// block and, each time the agent closes an interval, judges the interval and
// debounces each diagnostic. It does not allocate after NewSensor and is not
// safe for concurrent use; one Sensor serves one stream.
type Sensor struct {
	cfg        SensorConfig
	stuckRun   int   // samples
	minSamples int   // shortest interval Close judges
	raise      int64 // samples
	clear      int64 // samples

	// accumulators of the open interval
	n       int
	peak    int32
	sum     int64
	clipped int
	levels  int
	seen    [65536 / 64]uint64 // which sample values occurred
	longest int
	// the run of equal values, which continues across blocks and intervals
	cur     int16
	run     int
	started bool

	deb  [NumKinds]debounce
	last Reading
}

// NewSensor returns a Sensor with every diagnostic ok.
func NewSensor(cfg SensorConfig) (*Sensor, error) {
	if err := cfg.Validate(); err != nil {
		return nil, err
	}
	s := &Sensor{cfg: cfg,
		stuckRun:   max(1, int(cfg.StuckSeconds*float64(cfg.Rate)+0.5)),
		minSamples: max(1, cfg.Rate/10),
		raise:      int64(cfg.RaiseSeconds*float64(cfg.Rate) + 0.5),
		clear:      int64(cfg.ClearSeconds*float64(cfg.Rate) + 0.5),
	}
	for k := range s.deb {
		s.deb[k] = newDebounce(s.raise, s.clear)
	}
	return s, nil
}

// Config returns the configuration the Sensor was built with.
func (s *Sensor) Config() SensorConfig { return s.cfg }

// Observe adds a block of raw samples, in stream order, to the open
// interval. Blocks may have any length; results do not depend on how the
// stream is cut.
func (s *Sensor) Observe(block []int16) {
	few := s.cfg.FewLevels
	for _, x := range block {
		v := int32(x)
		if v < 0 {
			v = -v
		}
		s.peak = max(s.peak, v)
		s.sum += int64(x)
		if x >= 32767 || x <= -32767 {
			s.clipped++
		}
		if s.levels <= few {
			u := uint16(x)
			if bit := uint64(1) << (u & 63); s.seen[u>>6]&bit == 0 {
				s.seen[u>>6] |= bit
				s.levels++
			}
		}
		if s.started && x == s.cur {
			s.run++
		} else {
			s.cur, s.run, s.started = x, 1, true
		}
		s.longest = max(s.longest, s.run)
	}
	s.n += len(block)
}

// Close ends the open interval at stream position samplePos (in samples,
// the position just after the interval's last sample), judges it, steps
// every diagnostic's debouncing and appends an event to dst for each
// diagnostic that was raised or cleared. It returns dst. An interval
// shorter than a tenth of a second is not judged: its samples carry over
// into the next interval and dst is returned unchanged. The agent
// typically closes once a second or once per analysis window.
func (s *Sensor) Close(samplePos int64, dst []SensorEvent) []SensorEvent {
	if s.n < s.minSamples {
		return dst
	}
	r := Reading{
		Samples:           s.n,
		Peak:              int(s.peak),
		ClipFraction:      float64(s.clipped) / float64(s.n),
		DCFraction:        float64(s.sum) / float64(s.n) / 32768,
		LongestRunSeconds: float64(s.longest) / float64(s.cfg.Rate),
		Levels:            s.levels,
	}
	c := &s.cfg
	f := &r.Faulty
	f[KindSilence] = r.Peak <= c.SilencePeak
	f[KindClipping] = r.ClipFraction > c.ClipFraction
	f[KindStuck] = !f[KindSilence] && s.longest >= s.stuckRun
	f[KindFewLevels] = !f[KindSilence] && !f[KindStuck] && r.Levels <= c.FewLevels
	f[KindDCOffset] = !f[KindSilence] && !f[KindStuck] && (r.DCFraction > c.DCFraction || r.DCFraction < -c.DCFraction)
	s.last = r

	start := samplePos - int64(s.n)
	for k := KindSilence; k < NumKinds; k++ {
		if s.deb[k].step(f[k], start, samplePos) {
			dst = append(dst, SensorEvent{Kind: k, Active: s.deb[k].active, SamplePos: samplePos,
				Value: r.value(k), Limit: c.limit(k)})
		}
	}

	s.n, s.peak, s.sum, s.clipped, s.levels = 0, 0, 0, 0, 0
	s.seen = [len(s.seen)]uint64{}
	s.longest = 0 // a run in progress counts, in full, once it goes on
	return dst
}

// Healthy reports whether no diagnostic is raised: the agent marks analysis
// windows unusable (not scored, not enrolled, not fed to the machine gate)
// while it is false.
func (s *Sensor) Healthy() bool {
	for k := range s.deb {
		if s.deb[k].active {
			return false
		}
	}
	return true
}

// Active reports whether diagnostic k is raised. KindNoData is never
// raised by a Sensor.
func (s *Sensor) Active(k Kind) bool {
	if k >= NumKinds {
		panic(fmt.Sprintf("gate: Active(%d): no such Kind", k))
	}
	return s.deb[k].active
}

// Last returns the reading of the most recently judged interval.
func (s *Sensor) Last() Reading { return s.last }

func (r *Reading) value(k Kind) float64 {
	switch k {
	case KindSilence:
		return float64(r.Peak)
	case KindClipping:
		return r.ClipFraction
	case KindDCOffset:
		return r.DCFraction
	case KindStuck:
		return r.LongestRunSeconds
	case KindFewLevels:
		return float64(r.Levels)
	}
	return 0
}

func (c *SensorConfig) limit(k Kind) float64 {
	switch k {
	case KindSilence:
		return float64(c.SilencePeak)
	case KindClipping:
		return c.ClipFraction
	case KindDCOffset:
		return c.DCFraction
	case KindStuck:
		return c.StuckSeconds
	case KindFewLevels:
		return float64(c.FewLevels)
	}
	return 0
}
