package capture

import (
	"fmt"
	"math"
	"time"
)

// Defaults applied by New to zero Config fields.
const (
	DefaultRate             = 16000            // Hz
	DefaultRingSeconds      = 10.0             // seconds of audio the ring holds
	DefaultReopenMin        = time.Second      // first back-off after a failure
	DefaultReopenMax        = 30 * time.Second // back-off cap
	DefaultDiagnosticBuffer = 64               // Diagnostics channel capacity
	minSlowRead             = time.Second      // floor of the default SlowRead
)

// Config says which device to open and how. The zero value opens the
// default input device, mono, at DefaultRate, in 100 ms reads.
type Config struct {
	// Device selects the input: empty for PortAudio's default input
	// device, an index as listed by Devices (all digits), or otherwise a
	// case-insensitive substring of the device name (an exact name wins
	// over substrings; a substring must match exactly one input device).
	Device string
	// Rate is the sample rate in Hz; 0 means DefaultRate. Through ALSA's
	// "default" or "plughw" devices any rate works (ALSA converts); a raw
	// "hw" device accepts only its native rates.
	Rate int
	// Channels is how many interleaved channels to open, at least as many
	// as Channel needs; 0 means 1.
	Channels int
	// Channel is the 0-based channel to keep, or -1 to mix all channels
	// (their mean, rounded half up). The zero value keeps the first.
	Channel int
	// FramesPerRead is the size of one blocking device read in frames; 0
	// means Rate/10 (100 ms). Smaller reads lower latency and raise CPU
	// use; Close waits for at most one read.
	FramesPerRead int
	// RingSeconds is how much audio the ring buffer between the device and
	// the consumer holds (rounded up to a power of two samples): the
	// longest consumer stall survived without loss. 0 means
	// DefaultRingSeconds.
	RingSeconds float64
	// WaitForDevice makes New succeed even if the device cannot be opened
	// yet: the capture goroutine keeps trying with back-off, reporting
	// each failure. When false, New returns the first open's error.
	WaitForDevice bool
	// ReopenMin is the wait before the first retry after a failure; it
	// doubles with each failed attempt up to ReopenMax. It resets once a
	// stream has run for ReopenMax. 0 means DefaultReopenMin and
	// DefaultReopenMax.
	ReopenMin, ReopenMax time.Duration
	// SlowRead is how long a device read may take before it is reported
	// as slow; 0 means four times the read's duration, at least 1 s.
	SlowRead time.Duration
	// DiagnosticBuffer is the capacity of the Diagnostics channel; when it
	// is full, further diagnostics are counted, not queued. 0 means
	// DefaultDiagnosticBuffer.
	DiagnosticBuffer int
}

// withDefaults validates c and returns it with every zero field set.
func (c Config) withDefaults() (Config, error) {
	if c.Rate == 0 {
		c.Rate = DefaultRate
	}
	if c.Channels == 0 {
		c.Channels = 1
	}
	if c.FramesPerRead == 0 {
		c.FramesPerRead = max(c.Rate/10, 1)
	}
	if c.RingSeconds == 0 {
		c.RingSeconds = DefaultRingSeconds
	}
	if c.ReopenMin == 0 {
		c.ReopenMin = DefaultReopenMin
	}
	if c.ReopenMax == 0 {
		c.ReopenMax = max(DefaultReopenMax, c.ReopenMin)
	}
	if c.DiagnosticBuffer == 0 {
		c.DiagnosticBuffer = DefaultDiagnosticBuffer
	}
	bad := func(format string, args ...any) (Config, error) {
		return Config{}, fmt.Errorf("%w: "+format, append([]any{ErrConfig}, args...)...)
	}
	switch {
	case c.Rate < 1000 || c.Rate > 384000:
		return bad("Rate is %d Hz, want 1000..384000", c.Rate)
	case c.Channels < 1 || c.Channels > 64:
		return bad("Channels is %d, want 1..64", c.Channels)
	case c.Channel < -1 || c.Channel >= c.Channels:
		return bad("Channel is %d but Channels is %d: use 0..%d, or -1 to mix", c.Channel, c.Channels, c.Channels-1)
	case c.FramesPerRead < 1 || c.FramesPerRead > c.Rate*10:
		return bad("FramesPerRead is %d, want 1..%d (10 s)", c.FramesPerRead, c.Rate*10)
	case math.IsNaN(c.RingSeconds) || c.RingSeconds < 0 || c.RingSeconds*float64(c.Rate) > 1<<30:
		return bad("RingSeconds is %v, want a positive number of seconds up to %.0f at %d Hz", c.RingSeconds, float64(1<<30)/float64(c.Rate), c.Rate)
	case c.RingSeconds*float64(c.Rate) < float64(c.FramesPerRead):
		return bad("RingSeconds %v holds fewer samples than one read of FramesPerRead %d", c.RingSeconds, c.FramesPerRead)
	case c.ReopenMin < 0 || c.ReopenMax < c.ReopenMin:
		return bad("ReopenMin %v and ReopenMax %v: want 0 <= ReopenMin <= ReopenMax", c.ReopenMin, c.ReopenMax)
	case c.SlowRead < 0:
		return bad("SlowRead is %v, want a positive duration", c.SlowRead)
	case c.DiagnosticBuffer < 0:
		return bad("DiagnosticBuffer is %d, want 0 or more", c.DiagnosticBuffer)
	}
	if c.SlowRead == 0 {
		c.SlowRead = max(4*c.readDuration(), minSlowRead)
	}
	return c, nil
}

// readDuration is how long one device read of FramesPerRead frames lasts.
func (c Config) readDuration() time.Duration {
	return time.Duration(c.FramesPerRead) * time.Second / time.Duration(c.Rate)
}

// ringSamples is the ring capacity New asks for.
func (c Config) ringSamples() int {
	return int(math.Ceil(c.RingSeconds * float64(c.Rate)))
}
