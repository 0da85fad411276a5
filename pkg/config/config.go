package config

// Config is the whole agent configuration. Zero values in a file are not
// defaults: Default fills every field, and the file overrides what it names.
type Config struct {
	// Site names the plant (free text, e.g. "obrinvale"); it becomes part of
	// message topics, so letters, digits, '-' and '_' only.
	Site string `yaml:"site"`
	// Asset is the machine's tag (e.g. "P-492B"), required; same characters.
	Asset string `yaml:"asset"`
	// Baseline is the path of the enrolled baseline file, required for run.
	Baseline string   `yaml:"baseline"`
	Source   Source   `yaml:"source"`
	Alarm    Alarm    `yaml:"alarm"`
	Evidence Evidence `yaml:"evidence"`
	Log      Log      `yaml:"log"`
	MQTT     MQTT     `yaml:"mqtt"`
}

// MQTT names the plant's broker. Empty URL: no broker (the local log only).
type MQTT struct {
	// URL is the broker, e.g. tcp://10.20.0.5:1883 or ssl://broker.site:8883.
	URL string `yaml:"url"`
}

// Source kinds.
const (
	SourceDevice = "device" // a PortAudio input device
	SourceWAV    = "wav"    // a WAV file or a folder of them, replayed
	SourceStdin  = "stdin"  // raw signed 16-bit little-endian PCM on stdin
)

// Source says where the sound comes from.
type Source struct {
	// Kind is "device" (default), "wav" or "stdin".
	Kind string `yaml:"kind"`
	// Device picks the input device by a substring of its name or by its
	// index as listed by `auscult devices`; empty means the system default.
	Device string `yaml:"device"`
	// Path is the WAV file or folder for kind "wav".
	Path string `yaml:"path"`
	// Speed is the replay speed of kind "wav": 1 is real time (default), 60
	// an hour a minute, 0 as fast as the CPU allows.
	Speed float64 `yaml:"speed"`
	// RateHz is the capture rate of a device or of stdin (default 16000);
	// a WAV file carries its own.
	RateHz int `yaml:"rate_hz"`
	// Channels is how many channels a device or stdin delivers (default 1).
	Channels int `yaml:"channels"`
	// Channel is the channel to listen to, from 0; -1 mixes all (default 0).
	Channel int `yaml:"channel"`
}

// Alarm tunes the alarm logic. The thresholds themselves come from the
// baseline's calibration.
type Alarm struct {
	// DebounceK and DebounceN raise an alarm when K of the last N running
	// windows are over the threshold; 0 takes the baseline's (default 3 of 5).
	DebounceK int `yaml:"debounce_k"`
	DebounceN int `yaml:"debounce_n"`
	// ClearFraction sets the clear level as a fraction of the threshold
	// (default 0.9): hysteresis against chattering.
	ClearFraction float64 `yaml:"clear_fraction"`
	// OffDelayS is how long, in seconds, the score must stay below the clear
	// level before the alarm clears (default 20).
	OffDelayS float64 `yaml:"off_delay_s"`
	// Latch keeps a cleared alarm annunciated until acknowledged (default
	// false).
	Latch bool `yaml:"latch"`
	// MaxShelveH bounds a shelve request, in hours (default 8).
	MaxShelveH float64 `yaml:"max_shelve_h"`
}

// Evidence sizes the sound clips kept around each raised alarm.
type Evidence struct {
	// BeforeS and AfterS are the seconds kept before and after the raise
	// (defaults 10 and 10).
	BeforeS float64 `yaml:"before_s"`
	AfterS  float64 `yaml:"after_s"`
}

// Log configures the local log (a bbolt database).
type Log struct {
	// Path is the database file (default /var/lib/auscult/auscult.db).
	Path string `yaml:"path"`
	// MaxMB caps the stored data in MiB (default 256); oldest trend and
	// clips go first, events last.
	MaxMB float64 `yaml:"max_mb"`
	// FlushS is how often, in seconds, trend points are written in one batch
	// (default 10); events are written at once.
	FlushS float64 `yaml:"flush_s"`
	// TrendDays, ClipDays and EventDays are the ages after which trend
	// points, evidence clips and events are deleted (defaults 400, 90, 1000).
	TrendDays int `yaml:"trend_days"`
	ClipDays  int `yaml:"clip_days"`
	EventDays int `yaml:"event_days"`
	// SummaryMin is the summary period in minutes (default 60).
	SummaryMin int `yaml:"summary_min"`
}

// Default returns the configuration used for every key a file leaves out.
func Default() Config {
	return Config{
		Source:   Source{Kind: SourceDevice, Speed: 1, RateHz: 16000, Channels: 1},
		Alarm:    Alarm{ClearFraction: 0.9, OffDelayS: 20, MaxShelveH: 8},
		Evidence: Evidence{BeforeS: 10, AfterS: 10},
		Log: Log{Path: "/var/lib/auscult/auscult.db", MaxMB: 256, FlushS: 10,
			TrendDays: 400, ClipDays: 90, EventDays: 1000, SummaryMin: 60},
	}
}
