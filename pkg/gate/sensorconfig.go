package gate

import (
	"fmt"
	"math"
)

// SensorConfig sets the limits and debouncing of the sensor diagnostics.
// The defaults are common practice for acoustic monitoring front ends, not
// values from a standard; start from DefaultSensorConfig.
type SensorConfig struct {
	// Rate is the sample rate in Hz (default 16000); it turns sample
	// counts into seconds.
	Rate int `json:"rate"`
	// SilencePeak is the largest |sample|, in LSB, of an interval that
	// counts as digital silence (default 4 LSB, about -78 dBFS peak; common
	// practice, no source: a live analogue front end shows more noise than
	// that).
	SilencePeak int `json:"silence_peak_lsb"`
	// ClipFraction is the largest share of samples at full scale that is
	// still healthy (default 0.001, 0.1 %, the same limit enrolment applies;
	// common practice, no source).
	ClipFraction float64 `json:"clip_fraction"`
	// DCFraction is the largest healthy |mean| as a fraction of full scale
	// (default 0.05, 5 %; common practice, no source: AC-coupled
	// microphone inputs sit well below 1 %).
	DCFraction float64 `json:"dc_fraction"`
	// StuckSeconds is the shortest run of one repeated sample value that
	// counts as stuck, in seconds (default 0.1; common practice, no source).
	StuckSeconds float64 `json:"stuck_s"`
	// FewLevels is the largest number of distinct sample values in an
	// interval that counts as a flat or square pattern (default 4; common
	// practice, no source).
	FewLevels int `json:"few_levels"`
	// RaiseSeconds is how long a fault must persist before it is raised
	// (default 3 s; common practice, no source).
	RaiseSeconds float64 `json:"raise_s"`
	// ClearSeconds is how long a raised fault must be gone before it
	// clears (default 3 s; common practice, no source).
	ClearSeconds float64 `json:"clear_s"`
}

// DefaultSensorConfig returns the limits used unless configured otherwise.
func DefaultSensorConfig() SensorConfig {
	return SensorConfig{Rate: 16000, SilencePeak: 4, ClipFraction: 0.001, DCFraction: 0.05,
		StuckSeconds: 0.1, FewLevels: 4, RaiseSeconds: 3, ClearSeconds: 3}
}

// Validate reports the first field that cannot work, by name.
func (c SensorConfig) Validate() error {
	pos := func(v float64) bool { return v > 0 && !math.IsInf(v, 0) }
	switch {
	case c.Rate < 1000 || c.Rate > 384000:
		return fmt.Errorf("%w: rate %d Hz, want 1000 to 384000", ErrConfig, c.Rate)
	case c.SilencePeak < 0 || c.SilencePeak > 32767:
		return fmt.Errorf("%w: silence_peak_lsb %d, want 0 to 32767", ErrConfig, c.SilencePeak)
	case !(c.ClipFraction >= 0 && c.ClipFraction < 1):
		return fmt.Errorf("%w: clip_fraction %g, want 0 to below 1", ErrConfig, c.ClipFraction)
	case !(c.DCFraction > 0 && c.DCFraction < 1):
		return fmt.Errorf("%w: dc_fraction %g, want above 0 and below 1", ErrConfig, c.DCFraction)
	case !pos(c.StuckSeconds):
		return fmt.Errorf("%w: stuck_s %g, want a positive number of seconds", ErrConfig, c.StuckSeconds)
	case c.FewLevels < 1 || c.FewLevels > 65535:
		return fmt.Errorf("%w: few_levels %d, want 1 to 65535", ErrConfig, c.FewLevels)
	case !(c.RaiseSeconds >= 0) || math.IsInf(c.RaiseSeconds, 0):
		return fmt.Errorf("%w: raise_s %g, want 0 or more seconds", ErrConfig, c.RaiseSeconds)
	case !(c.ClearSeconds >= 0) || math.IsInf(c.ClearSeconds, 0):
		return fmt.Errorf("%w: clear_s %g, want 0 or more seconds", ErrConfig, c.ClearSeconds)
	}
	return nil
}
