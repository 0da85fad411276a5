package ring

import (
	"fmt"
	"math/bits"
)

// Limits of Config.
const (
	// MaxSamples is the largest capacity New accepts: 2^30 samples (2 GiB,
	// about 9 hours at 32 kHz).
	MaxSamples = 1 << 30
	// MaxGaps is the largest gap queue New accepts.
	MaxGaps = 1 << 20
	// DefaultGaps is the gap queue size used when Config.Gaps is 0.
	DefaultGaps = 64
)

// Config sizes a Buffer.
type Config struct {
	// Samples is the minimum capacity in samples, 1..MaxSamples; New rounds
	// it up to a power of two (Buffer.Cap reports the result). There is no
	// default: a capture of R Hz that must survive a consumer stall of T
	// seconds needs R*T.
	Samples int
	// Gaps is how many ended but unread gaps are kept, rounded up to a
	// power of two; 0 means DefaultGaps.
	Gaps int
}

// sizes validates c and returns the rounded capacities.
func (c Config) sizes() (samples, gaps int, err error) {
	if c.Samples < 1 || c.Samples > MaxSamples {
		return 0, 0, fmt.Errorf("%w: Samples is %d, want 1..%d", ErrCapacity, c.Samples, MaxSamples)
	}
	if c.Gaps < 0 || c.Gaps > MaxGaps {
		return 0, 0, fmt.Errorf("%w: Gaps is %d, want 0..%d (0 means %d)", ErrGapQueue, c.Gaps, MaxGaps, DefaultGaps)
	}
	gaps = c.Gaps
	if gaps == 0 {
		gaps = DefaultGaps
	}
	return pow2(c.Samples), pow2(gaps), nil
}

// pow2 returns the smallest power of two >= n, for 1 <= n <= 1<<30.
func pow2(n int) int {
	return 1 << bits.Len(uint(n-1))
}
