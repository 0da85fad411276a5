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
	Web      Web      `yaml:"web"`
}

// Web configures the site-visit pages. No listen address: off.
type Web struct {
	// Listen is the address to serve on, e.g. 0.0.0.0:8440 or
	// 127.0.0.1:8440; empty turns the pages off.
	Listen string `yaml:"listen"`
	// TokenFile (first line) or TokenEnv (an environment variable) holds
	// the token every page asks for; at least 16 characters.
	TokenFile string `yaml:"token_file"`
	TokenEnv  string `yaml:"token_env"`
	// TLSCertFile and TLSKeyFile serve HTTPS instead of HTTP.
	TLSCertFile string `yaml:"tls_cert_file"`
	TLSKeyFile  string `yaml:"tls_key_file"`
}

// MQTT names the plant's broker. No URL: no broker (the local log only).
type MQTT struct {
	// URL is the broker, e.g. tcp://10.20.0.5:1883 or ssl://broker.site:8883.
	URL string `yaml:"url"`
	// URLs lists several brokers instead, tried in order (fail-over).
	URLs []string `yaml:"urls"`
	// ClientID is the MQTT client id (default auscult-<host>-<asset>);
	// keep it stable across restarts.
	ClientID string `yaml:"client_id"`
	// Username, with the password read from PasswordFile (first line) or
	// the environment variable PasswordEnv; never written in this file.
	Username     string `yaml:"username"`
	PasswordFile string `yaml:"password_file"`
	PasswordEnv  string `yaml:"password_env"`
	// TLS for ssl://, tls:// and wss:// brokers.
	TLS TLS `yaml:"tls"`
	// TopicPrefix starts every topic: <prefix>/<site>/<asset>/<kind>
	// (default auscult).
	TopicPrefix string `yaml:"topic_prefix"`
	// KeepAliveS and ConnectTimeoutS in seconds (defaults 30 and 10).
	KeepAliveS      float64 `yaml:"keepalive_s"`
	ConnectTimeoutS float64 `yaml:"connect_timeout_s"`
	// ReconnectMinS and ReconnectMaxS bound the reconnect back-off, in
	// seconds (defaults 1 and 120).
	ReconnectMinS float64 `yaml:"reconnect_min_s"`
	ReconnectMaxS float64 `yaml:"reconnect_max_s"`
	// StatusMin is how often the retained status is refreshed, in minutes
	// (default 15).
	StatusMin float64 `yaml:"status_min"`
	// Commands accepts operator commands from the broker (default true).
	Commands bool `yaml:"commands"`
	// CommandMaxAgeS refuses commands issued longer ago than this, in
	// seconds (default 600); 0 turns the check off.
	CommandMaxAgeS float64 `yaml:"command_max_age_s"`
	// OutboxMB and OutboxDays bound the messages kept while the broker is
	// away (defaults 8 MiB and 30 days); summaries are dropped first.
	OutboxMB   float64 `yaml:"outbox_mb"`
	OutboxDays float64 `yaml:"outbox_days"`
}

// TLS names the PEM files of a TLS connection to the broker.
type TLS struct {
	// CAFile is the authority that signed the broker's certificate
	// (default: the system's).
	CAFile string `yaml:"ca_file"`
	// CertFile and KeyFile are this agent's client certificate and key.
	CertFile string `yaml:"cert_file"`
	KeyFile  string `yaml:"key_file"`
	// ServerName is the name checked in the broker's certificate when it
	// differs from the URL's host.
	ServerName string `yaml:"server_name"`
}

// Brokers returns the configured broker URLs, URL first.
func (m MQTT) Brokers() []string {
	var out []string
	if m.URL != "" {
		out = append(out, m.URL)
	}
	return append(out, m.URLs...)
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
		MQTT: MQTT{TopicPrefix: "auscult", KeepAliveS: 30, ConnectTimeoutS: 10, ReconnectMinS: 1, ReconnectMaxS: 120,
			StatusMin: 15, Commands: true, CommandMaxAgeS: 600, OutboxMB: 8, OutboxDays: 30},
	}
}
