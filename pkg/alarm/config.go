package alarm

import (
	"fmt"
	"time"
)

// MaxN is the largest usable Config.N: the window history is one 64-bit
// word per level.
const MaxN = 64

// Config sets the thresholds, the debounce and the operator limits. The
// zero value is not usable; start from DefaultConfig and set the
// thresholds from the baseline calibration.
type Config struct {
	// AlarmThreshold is the score (cosine distance) at or above which a
	// running window is over the alarm level; 0 < AlarmThreshold <= 1.
	// DefaultConfig leaves it 0, so Validate fails until it is set.
	AlarmThreshold float64
	// WarnThreshold is the same for the warning level; it must be below
	// AlarmThreshold. Zero disables the warning level: only alarms are
	// raised.
	WarnThreshold float64
	// ClearFraction sets each level's clear level, ClearFraction ×
	// threshold, below which a score counts towards clearing; 0 <
	// ClearFraction <= 1, 1 meaning no hysteresis. Default 0.9 (a 10 %
	// deadband: common practice, no source).
	ClearFraction float64
	// K and N are the on-delay: a level's condition becomes present when K
	// of the last N running windows were over; 1 <= K <= N <= MaxN.
	// Default 3 of 5, the debounce the baseline calibration assumes.
	K, N int
	// OffDelay is how long the score must stay below the clear level,
	// without interruption by a window at or above it or a stopped window,
	// before a condition clears; >= 0. Default 20 s (common practice, no
	// source). Zero clears at the first window below the clear level.
	OffDelay time.Duration
	// Latch keeps a raised alarm annunciated after its condition clears
	// until an operator acknowledges it (default false).
	Latch bool
	// MaxShelve is the longest a single Shelve may last; > 0. Default 8 h,
	// one shift (common practice, no source).
	MaxShelve time.Duration
}

// DefaultConfig returns the defaults documented on Config, with both
// thresholds zero: the caller sets them from the baseline calibration.
func DefaultConfig() Config {
	return Config{
		ClearFraction: 0.9,
		K:             3,
		N:             5,
		OffDelay:      20 * time.Second,
		MaxShelve:     8 * time.Hour,
	}
}

// Validate returns nil when c can build a Tracker. Otherwise it returns an
// error wrapping ErrConfig that names the first offending field.
func (c Config) Validate() error {
	switch {
	case !(c.AlarmThreshold > 0 && c.AlarmThreshold <= 1):
		return fmt.Errorf("%w: AlarmThreshold = %g, want 0 < AlarmThreshold <= 1 (set it from the baseline calibration)",
			ErrConfig, c.AlarmThreshold)
	case c.WarnThreshold != 0 && !(c.WarnThreshold > 0 && c.WarnThreshold < c.AlarmThreshold):
		return fmt.Errorf("%w: WarnThreshold = %g, want 0 (no warning level) or 0 < WarnThreshold < AlarmThreshold = %g",
			ErrConfig, c.WarnThreshold, c.AlarmThreshold)
	case !(c.ClearFraction > 0 && c.ClearFraction <= 1):
		return fmt.Errorf("%w: ClearFraction = %g, want 0 < ClearFraction <= 1", ErrConfig, c.ClearFraction)
	case c.N < 1 || c.N > MaxN:
		return fmt.Errorf("%w: N = %d, want 1 <= N <= %d", ErrConfig, c.N, MaxN)
	case c.K < 1 || c.K > c.N:
		return fmt.Errorf("%w: K = %d, want 1 <= K <= N = %d", ErrConfig, c.K, c.N)
	case c.OffDelay < 0:
		return fmt.Errorf("%w: OffDelay = %v, want >= 0", ErrConfig, c.OffDelay)
	case c.MaxShelve <= 0:
		return fmt.Errorf("%w: MaxShelve = %v, want > 0", ErrConfig, c.MaxShelve)
	}
	return nil
}
