package config

import (
	"fmt"
	"net"
	"regexp"
	"slices"
	"strings"
)

// tagPattern is what site and asset names may hold: they become MQTT topic
// levels and file names, so no '/', '+', '#', spaces or dots.
var tagPattern = regexp.MustCompile(`^[A-Za-z0-9_-]{1,64}$`)

// validate checks ranges and relations; lines maps key paths to the line
// where the file set them.
func (c Config) validate(file string, lines map[string]int) []error {
	var errs []error
	bad := func(path, format string, a ...any) {
		errs = append(errs, &FieldError{File: file, Line: lines[path], Path: path, Msg: fmt.Sprintf(format, a...)})
	}
	if c.Asset == "" {
		bad("asset", "is required: the machine's tag, for example P-492B")
	} else if !tagPattern.MatchString(c.Asset) {
		bad("asset", "%q may hold only letters, digits, '-' and '_' (it names message topics)", c.Asset)
	}
	if c.Site != "" && !tagPattern.MatchString(c.Site) {
		bad("site", "%q may hold only letters, digits, '-' and '_' (it names message topics)", c.Site)
	}
	s := c.Source
	switch s.Kind {
	case SourceDevice, SourceStdin:
	case SourceWAV:
		if s.Path == "" {
			bad("source.path", "is required when source.kind is wav")
		}
	default:
		bad("source.kind", "must be device, wav or stdin, got %q", s.Kind)
	}
	if s.Speed < 0 || s.Speed > 10000 {
		bad("source.speed", "must be between 0 (as fast as possible) and 10000, got %g", s.Speed)
	}
	if s.RateHz < 8000 || s.RateHz > 48000 {
		bad("source.rate_hz", "must be between 8000 and 48000, got %d", s.RateHz)
	}
	if s.Channels < 1 || s.Channels > 32 {
		bad("source.channels", "must be between 1 and 32, got %d", s.Channels)
	}
	if s.Channel < -1 || s.Channel >= s.Channels {
		bad("source.channel", "must be -1 (mix) or from 0 to %d (source.channels - 1), got %d", s.Channels-1, s.Channel)
	}
	a := c.Alarm
	if (a.DebounceK == 0) != (a.DebounceN == 0) {
		bad("alarm.debounce_k", "set debounce_k and debounce_n together, or neither (then the baseline's apply)")
	} else if a.DebounceK < 0 || a.DebounceN > 60 || a.DebounceK > a.DebounceN {
		bad("alarm.debounce_k", "must satisfy 1 <= debounce_k <= debounce_n <= 60, got %d of %d", a.DebounceK, a.DebounceN)
	}
	if a.ClearFraction <= 0 || a.ClearFraction > 1 {
		bad("alarm.clear_fraction", "must be above 0 and at most 1, got %g", a.ClearFraction)
	}
	if a.OffDelayS < 0 || a.OffDelayS > 3600 {
		bad("alarm.off_delay_s", "must be between 0 and 3600 seconds, got %g", a.OffDelayS)
	}
	if a.MaxShelveH <= 0 || a.MaxShelveH > 24*7 {
		bad("alarm.max_shelve_h", "must be above 0 and at most 168 hours (a week), got %g", a.MaxShelveH)
	}
	e := c.Evidence
	if e.BeforeS < 0 || e.BeforeS > 60 {
		bad("evidence.before_s", "must be between 0 and 60 seconds, got %g", e.BeforeS)
	}
	if e.AfterS < 0 || e.AfterS > 60 {
		bad("evidence.after_s", "must be between 0 and 60 seconds, got %g", e.AfterS)
	}
	l := c.Log
	if l.Path == "" {
		bad("log.path", "is required: the local log's database file")
	}
	if l.MaxMB < 1 || l.MaxMB > 1<<20 {
		bad("log.max_mb", "must be between 1 and 1048576 MiB, got %g", l.MaxMB)
	}
	if l.FlushS < 1 || l.FlushS > 600 {
		bad("log.flush_s", "must be between 1 and 600 seconds, got %g", l.FlushS)
	}
	for _, d := range []struct {
		path string
		v    int
	}{{"log.trend_days", l.TrendDays}, {"log.clip_days", l.ClipDays}, {"log.event_days", l.EventDays}} {
		if d.v < 1 || d.v > 36500 {
			bad(d.path, "must be between 1 and 36500 days, got %d", d.v)
		}
	}
	if l.SummaryMin < 1 || l.SummaryMin > 1440 || 1440%l.SummaryMin != 0 {
		bad("log.summary_min", "must divide a day (e.g. 15, 60, 1440 minutes), got %d", l.SummaryMin)
	}
	errs = append(errs, c.MQTT.validate(file, lines)...)
	if w := c.Web; w.Listen != "" {
		if _, port, err := net.SplitHostPort(w.Listen); err != nil || port == "" {
			bad("web.listen", "%q: want HOST:PORT, e.g. 0.0.0.0:8440", w.Listen)
		}
		if (w.TokenFile == "") == (w.TokenEnv == "") {
			bad("web.token_file", "set token_file or token_env (exactly one): the pages need a token")
		}
		if (w.TLSCertFile == "") != (w.TLSKeyFile == "") {
			bad("web.tls_cert_file", "tls_cert_file and tls_key_file go together")
		}
	}
	return errs
}

// validate checks the mqtt section.
func (m MQTT) validate(file string, lines map[string]int) []error {
	var errs []error
	bad := func(path, format string, a ...any) {
		errs = append(errs, &FieldError{File: file, Line: lines[path], Path: path, Msg: fmt.Sprintf(format, a...)})
	}
	checkURL := func(path, u string) {
		scheme, rest, ok := strings.Cut(u, "://")
		if !ok || rest == "" || !slices.Contains([]string{"tcp", "ssl", "tls", "ws", "wss", "mqtt", "mqtts"}, scheme) {
			bad(path, "%q: want SCHEME://HOST:PORT with scheme tcp, ssl, tls, ws, wss, mqtt or mqtts", u)
		}
	}
	if m.URL != "" {
		checkURL("mqtt.url", m.URL)
	}
	for i, u := range m.URLs {
		checkURL(fmt.Sprintf("mqtt.urls[%d]", i), u)
	}
	if m.PasswordFile != "" && m.PasswordEnv != "" {
		bad("mqtt.password_file", "set password_file or password_env, not both")
	}
	if (m.PasswordFile != "" || m.PasswordEnv != "") && m.Username == "" {
		bad("mqtt.username", "is required with a password")
	}
	if (m.TLS.CertFile == "") != (m.TLS.KeyFile == "") {
		bad("mqtt.tls.cert_file", "cert_file and key_file go together")
	}
	if p := m.TopicPrefix; p == "" || strings.ContainsAny(p, "+#") || strings.HasPrefix(p, "/") || strings.HasSuffix(p, "/") {
		bad("mqtt.topic_prefix", "%q: want a non-empty topic path without '+', '#' or a leading or trailing '/'", p)
	}
	for _, r := range []struct {
		path   string
		v      float64
		lo, hi float64
	}{
		{"mqtt.keepalive_s", m.KeepAliveS, 5, 3600}, {"mqtt.connect_timeout_s", m.ConnectTimeoutS, 1, 300},
		{"mqtt.reconnect_min_s", m.ReconnectMinS, 0.1, 3600}, {"mqtt.reconnect_max_s", m.ReconnectMaxS, 0.1, 86400},
		{"mqtt.status_min", m.StatusMin, 0.1, 1440}, {"mqtt.command_max_age_s", m.CommandMaxAgeS, 0, 86400},
		{"mqtt.outbox_mb", m.OutboxMB, 0.0625, 4096}, {"mqtt.outbox_days", m.OutboxDays, 0.01, 3650},
	} {
		if r.v < r.lo || r.v > r.hi {
			bad(r.path, "must be between %g and %g, got %g", r.lo, r.hi, r.v)
		}
	}
	if m.ReconnectMaxS < m.ReconnectMinS {
		bad("mqtt.reconnect_max_s", "must not be below reconnect_min_s (%g), got %g", m.ReconnectMinS, m.ReconnectMaxS)
	}
	return errs
}
