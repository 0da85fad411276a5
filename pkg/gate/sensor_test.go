package gate

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// signal returns the sample at position i of a synthetic test signal.
type signal func(i int) int16

// noise is Gaussian noise of the given RMS as a fraction of full scale.
func noise(rms float64, seed uint64) signal {
	r := rand.New(rand.NewPCG(seed, 7))
	var at int
	var last int16
	return func(i int) int16 {
		// the generator is stateful: called with increasing i only
		for ; at <= i; at++ {
			last = sat(r.NormFloat64() * rms * 32768)
		}
		return last
	}
}

func sat(v float64) int16 { return int16(max(-32768, min(32767, math.Round(v)))) }

func square(amp float64, period int) signal {
	return func(i int) int16 {
		if (i/(period/2))%2 == 0 {
			return sat(amp * 32768)
		}
		return sat(-amp * 32768)
	}
}

func plus(a signal, dc float64) signal {
	return func(i int) int16 { return sat(float64(a(i)) + dc*32768) }
}

func constant(v int16) signal { return func(int) int16 { return v } }

// feed runs seconds of sig through s in blocks of block samples, closing
// an interval every closeEvery samples, and returns the events.
func feed(t *testing.T, s *Sensor, sig signal, from, to, block, closeEvery int) []SensorEvent {
	t.Helper()
	var ev []SensorEvent
	buf := make([]int16, block)
	for pos := from; pos < to; {
		n := min(block, to-pos, closeEvery-pos%closeEvery)
		for i := range n {
			buf[i] = sig(pos + i)
		}
		s.Observe(buf[:n])
		pos += n
		if pos%closeEvery == 0 {
			ev = s.Close(int64(pos), ev)
		}
	}
	return ev
}

func newTestSensor(t *testing.T) *Sensor {
	t.Helper()
	s, err := NewSensor(DefaultSensorConfig())
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func activeKinds(s *Sensor) []Kind {
	var out []Kind
	for k := KindNoData; k < NumKinds; k++ {
		if s.Active(k) {
			out = append(out, k)
		}
	}
	return out
}

// Five seconds of each signal, closed once a second, raise exactly the
// expected diagnostics (defaults: raise after 3 s).
func TestSensorConditions(t *testing.T) {
	const rate = 16000
	tests := []struct {
		name string
		sig  signal
		want []Kind
	}{
		{"healthy noise -26 dBFS", noise(0.05, 1), nil},
		{"quiet but live noise -66 dBFS", noise(0.0005, 2), nil},
		{"digital silence", constant(0), []Kind{KindSilence}},
		{"dead input, +-2 LSB", func(i int) int16 { return int16(i%5 - 2) }, []Kind{KindSilence}},
		// A full-scale square wave clips on every sample and has two values.
		{"clipping square wave", square(1, 160), []Kind{KindClipping, KindFewLevels}},
		{"loud noise clipping 2 %", noise(0.45, 3), []Kind{KindClipping}},
		{"DC offset +10 % FS on noise", plus(noise(0.05, 4), 0.10), []Kind{KindDCOffset}},
		{"DC offset -8 % FS on noise", plus(noise(0.05, 5), -0.08), []Kind{KindDCOffset}},
		{"DC offset 2 % FS is healthy", plus(noise(0.05, 6), 0.02), nil},
		// One value repeated: stuck, not also DC offset or few levels.
		{"stuck at 5000", constant(5000), []Kind{KindStuck}},
		{"stuck at -32768", constant(-32768), []Kind{KindClipping, KindStuck}},
		// Runs of 8 samples are not stuck, but three values are too few.
		{"three-level pattern", func(i int) int16 { return int16(1000 * (i%3 - 1)) }, []Kind{KindFewLevels}},
		{"square 1 kHz at -20 dBFS", square(0.1, 16), []Kind{KindFewLevels}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := newTestSensor(t)
			ev := feed(t, s, tc.sig, 0, 5*rate, 1024, rate)
			if got := activeKinds(s); !slices.Equal(got, tc.want) {
				t.Errorf("active %v, want %v (last reading %+v)", got, tc.want, s.Last())
			}
			if s.Healthy() != (len(tc.want) == 0) {
				t.Errorf("Healthy() = %v with %v active", s.Healthy(), tc.want)
			}
			for _, e := range ev {
				if !e.Active || e.SamplePos != 3*rate {
					t.Errorf("event %+v, want raised at 3 s (%d)", e, 3*rate)
				}
			}
			if len(ev) != len(tc.want) {
				t.Errorf("%d events, want %d", len(ev), len(tc.want))
			}
		})
	}
}

// A glitch shorter than the raise delay raises nothing; one that lasts
// 5 s raises after 3 s and clears 3 s after it ends.
func TestSensorDebounce(t *testing.T) {
	const rate = 16000
	tests := []struct {
		name     string
		bad      signal
		from, to int // samples of the glitch
		kind     Kind
		want     []SensorEvent
	}{
		{"0.5 s of clipping across an interval boundary", noise(0.45, 10), 10*rate + rate*3/4, 11*rate + rate/4,
			KindClipping, nil},
		{"0.5 s of digital silence", constant(0), 10 * rate, 10*rate + rate/2, KindSilence, nil},
		{"5 s of clipping", noise(0.45, 11), 10 * rate, 15 * rate, KindClipping, []SensorEvent{
			{Kind: KindClipping, Active: true, SamplePos: 13 * rate, Value: -1, Limit: 0.001},
			{Kind: KindClipping, Active: false, SamplePos: 18 * rate, Value: 0, Limit: 0.001}}},
		{"5 s of digital silence", constant(0), 10 * rate, 15 * rate, KindSilence, []SensorEvent{
			{Kind: KindSilence, Active: true, SamplePos: 13 * rate, Value: 0, Limit: 4},
			{Kind: KindSilence, Active: false, SamplePos: 18 * rate, Value: -1, Limit: 4}}},
		{"5 s stuck", constant(-1234), 10 * rate, 15 * rate, KindStuck, []SensorEvent{
			{Kind: KindStuck, Active: true, SamplePos: 13 * rate, Value: 3, Limit: 0.1},
			{Kind: KindStuck, Active: false, SamplePos: 18 * rate, Value: -1, Limit: 0.1}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := newTestSensor(t)
			healthy := noise(0.05, 9)
			sig := func(i int) int16 {
				h := healthy(i) // keep the noise generator stepping
				if i >= tc.from && i < tc.to {
					return tc.bad(i)
				}
				return h
			}
			ev := feed(t, s, sig, 0, 25*rate, 1000, rate)
			var got []SensorEvent
			for _, e := range ev {
				if e.Kind != tc.kind {
					t.Errorf("unexpected event %+v", e)
					continue
				}
				got = append(got, e)
			}
			if len(got) != len(tc.want) {
				t.Fatalf("events %+v, want %+v", got, tc.want)
			}
			for i, w := range tc.want {
				g := got[i]
				// Values measured on healthy noise vary; -1 marks "any".
				if w.Value == -1 {
					w.Value = g.Value
				}
				if g.Kind != w.Kind || g.Active != w.Active || g.SamplePos != w.SamplePos || g.Limit != w.Limit ||
					math.Abs(g.Value-w.Value) > 1e-3 {
					t.Errorf("event %d = %+v, want %+v", i, g, w)
				}
			}
			if !s.Healthy() {
				t.Errorf("still unhealthy at the end: %v", activeKinds(s))
			}
		})
	}
}

// How the stream is cut into blocks does not change a reading, and runs of
// equal values are counted across blocks.
func TestSensorBlockIndependence(t *testing.T) {
	const rate = 16000
	sig := func(i int) int16 {
		if i >= 3000 && i < 6000 {
			return 77
		}
		return int16((i * 7919) % 20011)
	}
	var want Reading
	for i, block := range []int{16000, 1, 97, 1024, 2999} {
		s := newTestSensor(t)
		feed(t, s, sig, 0, rate, block, rate)
		got := s.Last()
		if i == 0 {
			want = got
			if got.LongestRunSeconds != 3000.0/rate || !got.Faulty[KindStuck] {
				t.Fatalf("reading %+v, want a 3000-sample stuck run", got)
			}
			continue
		}
		if got != want {
			t.Errorf("blocks of %d: reading %+v, want %+v", block, got, want)
		}
	}
}

// An interval shorter than 0.1 s is not judged; its samples carry over.
func TestSensorShortInterval(t *testing.T) {
	s := newTestSensor(t)
	s.Observe(make([]int16, 1000))
	if ev := s.Close(1000, nil); len(ev) != 0 || s.Last().Samples != 0 {
		t.Fatalf("judged a 1000-sample interval: %+v, %+v", ev, s.Last())
	}
	s.Observe(make([]int16, 1000))
	s.Close(2000, nil)
	if got := s.Last(); got.Samples != 2000 || !got.Faulty[KindSilence] {
		t.Errorf("reading %+v, want 2000 silent samples", got)
	}
}

func TestSensorConfigValidate(t *testing.T) {
	tests := []struct {
		name string
		edit func(*SensorConfig)
	}{
		{"rate", func(c *SensorConfig) { c.Rate = 0 }},
		{"silence peak", func(c *SensorConfig) { c.SilencePeak = -1 }},
		{"clip fraction", func(c *SensorConfig) { c.ClipFraction = 1 }},
		{"dc fraction", func(c *SensorConfig) { c.DCFraction = 0 }},
		{"stuck seconds", func(c *SensorConfig) { c.StuckSeconds = math.NaN() }},
		{"few levels", func(c *SensorConfig) { c.FewLevels = 0 }},
		{"raise", func(c *SensorConfig) { c.RaiseSeconds = -1 }},
		{"clear", func(c *SensorConfig) { c.ClearSeconds = math.Inf(1) }},
	}
	if err := DefaultSensorConfig().Validate(); err != nil {
		t.Fatalf("defaults: %v", err)
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c := DefaultSensorConfig()
			tc.edit(&c)
			if _, err := NewSensor(c); !errors.Is(err, ErrConfig) {
				t.Errorf("NewSensor = %v, want ErrConfig", err)
			}
		})
	}
}

func TestKindString(t *testing.T) {
	want := []string{"no_data", "silence", "clipping", "dc_offset", "stuck", "few_levels"}
	for k := KindNoData; k < NumKinds; k++ {
		if k.String() != want[k] {
			t.Errorf("Kind(%d) = %q, want %q", k, k.String(), want[k])
		}
	}
	if NumKinds.String() != "unknown" {
		t.Errorf("out of range Kind = %q", NumKinds.String())
	}
}
