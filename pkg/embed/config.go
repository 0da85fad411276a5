package embed

import "fmt"

// Config shapes the sub-windows and analysis windows. The zero value is not
// usable; start from DefaultConfig.
type Config struct {
	// SubHops is the sub-window length in feature hops (default 32, which is
	// 16384 samples = 1.024 s at 16 kHz with a 512-sample hop). SubHops*hop
	// must be a power of two: it is also the long FFT's length.
	SubHops int `json:"sub_hops"`
	// Window is the number of sub-windows in one analysis window (default 5).
	Window int `json:"window"`
	// Step is the number of sub-windows between the starts of consecutive
	// analysis windows (default 2, one decision about every 2 s).
	Step int `json:"step"`
	// Trim is how many values are dropped at each end of a dimension's
	// sorted sub-window values before averaging (default 1). 2*Trim < Window.
	Trim int `json:"trim"`
	// Mean adds the per-band mean over frames (default false: the low
	// quantile carries the same information with less nuisance).
	Mean bool `json:"mean"`
	// Low adds a low quantile over frames of every band (default true): the
	// steady floor under intermittent sounds such as speech or beeps.
	Low bool `json:"low"`
	// LowQuantile is that quantile, in (0, 1) (default 0.1).
	LowQuantile float64 `json:"low_quantile"`
	// Std adds the per-band standard deviation over frames (default false:
	// speech, clanks and beeps dominate it).
	Std bool `json:"std"`
	// Fine adds the fine low-frequency view (default true).
	Fine bool `json:"fine"`
	// FineFMin and FineFMax bound the fine view in Hz (defaults 25 and 1200).
	FineFMin float64 `json:"fine_fmin_hz"`
	FineFMax float64 `json:"fine_fmax_hz"`
	// FineBandsPerOctave sets the fine view's relative band width (default 12).
	FineBandsPerOctave int `json:"fine_bands_per_octave"`
	// LevelNorm subtracts each sub-window's mean log-mel level (default true).
	LevelNorm bool `json:"level_norm"`
	// LevelRMS takes the sub-window's RMS level instead of its mean log-mel
	// level as the level to subtract (experimental, default false).
	LevelRMS bool `json:"level_rms,omitempty"`
}

// DefaultConfig returns the configuration used unless a baseline says otherwise.
func DefaultConfig() Config {
	return Config{SubHops: 32, Window: 5, Step: 2, Trim: 1, Mean: false, Low: true, LowQuantile: 0.1, Std: false, Fine: true,
		FineFMin: 25, FineFMax: 1200, FineBandsPerOctave: 12, LevelNorm: true}
}

// Validate reports the first field that cannot work, by name.
func (c Config) Validate(hop int) error {
	switch {
	case c.SubHops < 1:
		return fmt.Errorf("embed: sub_hops must be at least 1, got %d", c.SubHops)
	case !isPow2(c.SubHops * hop):
		return fmt.Errorf("embed: sub_hops*hop = %d samples must be a power of two", c.SubHops*hop)
	case c.Window < 1:
		return fmt.Errorf("embed: window must be at least 1 sub-window, got %d", c.Window)
	case c.Step < 1 || c.Step > c.Window:
		return fmt.Errorf("embed: step must be between 1 and window (%d), got %d", c.Window, c.Step)
	case c.Trim < 0 || 2*c.Trim >= c.Window:
		return fmt.Errorf("embed: trim must leave at least one value of %d, got %d", c.Window, c.Trim)
	case c.Fine && !(c.FineFMin > 0 && c.FineFMax > c.FineFMin):
		return fmt.Errorf("embed: fine band %g..%g Hz is empty", c.FineFMin, c.FineFMax)
	case c.Low && !(c.LowQuantile > 0 && c.LowQuantile < 1):
		return fmt.Errorf("embed: low_quantile must be in (0, 1), got %g", c.LowQuantile)
	case c.Fine && c.FineBandsPerOctave < 1:
		return fmt.Errorf("embed: fine_bands_per_octave must be at least 1, got %d", c.FineBandsPerOctave)
	}
	return nil
}

func isPow2(n int) bool { return n > 0 && n&(n-1) == 0 }
