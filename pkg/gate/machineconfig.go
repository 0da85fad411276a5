package gate

import (
	"fmt"
	"math"
)

// MachineConfig tunes the running/stopped decision. The defaults are chosen
// values, common practice with no source, checked on the project's
// simulator only; start from DefaultMachineConfig.
type MachineConfig struct {
	// LevelSpanDB and LevelSpanStd set the healthy level range: the
	// enrolled mean level plus or minus max(LevelSpanDB, LevelSpanStd times
	// the enrolled standard deviation) (defaults 6 dB and 3). A window
	// louder than the range is never evidence of a stop; a window quieter
	// than it is, unless the machine's lines are clearly present.
	LevelSpanDB  float64 `json:"level_span_db"`
	LevelSpanStd float64 `json:"level_span_std"`
	// StopMatch and RunMatch are the line-match thresholds as fractions of
	// Lines.MatchP10 (defaults 0.55 and 0.8): below StopMatch the lines are
	// gone, at or above RunMatch they are present, in between the window
	// says nothing (hysteresis).
	StopMatch float64 `json:"stop_match"`
	RunMatch  float64 `json:"run_match"`
	// LevelHysteresisDB is, for a machine without lines, how far above the
	// bottom of the healthy range a window must be to count as running
	// (default 2 dB).
	LevelHysteresisDB float64 `json:"level_hysteresis_db"`
	// StopWindows is how many windows of stop evidence, with no running
	// evidence between them, turn Running into Stopped (default 3, about
	// 6 s at the default step).
	StopWindows int `json:"stop_windows"`
	// RunWindows is the same for Stopped to Running (default 3).
	RunWindows int `json:"run_windows"`
	// StartWindows is the same for leaving Unknown either way (default 3).
	StartWindows int `json:"start_windows"`
}

// DefaultMachineConfig returns the settings used unless configured
// otherwise.
func DefaultMachineConfig() MachineConfig {
	return MachineConfig{LevelSpanDB: 6, LevelSpanStd: 3, StopMatch: 0.55, RunMatch: 0.8,
		LevelHysteresisDB: 2, StopWindows: 3, RunWindows: 3, StartWindows: 3}
}

// Validate reports the first field that cannot work, by name.
func (c MachineConfig) Validate() error {
	fin := func(v float64) bool { return v >= 0 && !math.IsInf(v, 0) }
	switch {
	case !fin(c.LevelSpanDB) || c.LevelSpanDB == 0:
		return fmt.Errorf("%w: level_span_db %g, want a positive number of dB", ErrConfig, c.LevelSpanDB)
	case !fin(c.LevelSpanStd):
		return fmt.Errorf("%w: level_span_std %g, want 0 or more", ErrConfig, c.LevelSpanStd)
	case !(c.StopMatch > 0 && c.StopMatch < c.RunMatch && c.RunMatch <= 1):
		return fmt.Errorf("%w: stop_match %g and run_match %g, want 0 < stop_match < run_match <= 1", ErrConfig, c.StopMatch, c.RunMatch)
	case !fin(c.LevelHysteresisDB) || c.LevelHysteresisDB >= max(c.LevelSpanDB, 0):
		return fmt.Errorf("%w: level_hysteresis_db %g, want 0 to below level_span_db (%g)", ErrConfig, c.LevelHysteresisDB, c.LevelSpanDB)
	case c.StopWindows < 1 || c.RunWindows < 1 || c.StartWindows < 1:
		return fmt.Errorf("%w: stop_windows %d, run_windows %d, start_windows %d: want at least 1 each", ErrConfig,
			c.StopWindows, c.RunWindows, c.StartWindows)
	}
	return nil
}
