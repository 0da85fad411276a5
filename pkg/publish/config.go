package publish

import (
	"crypto/tls"
	"crypto/x509"
	"fmt"
	"log/slog"
	"net/url"
	"os"
	"time"
)

// Defaults applied by New to zero Config fields.
const (
	DefaultPrefix         = "auscult"
	DefaultKeepAlive      = 30 * time.Second
	DefaultConnectTimeout = 10 * time.Second
	DefaultReconnectMin   = time.Second
	DefaultReconnectMax   = 2 * time.Minute
	DefaultInFlight       = 32
	DefaultStatusEvery    = 15 * time.Minute
	DefaultAckTimeout     = 30 * time.Second
	DefaultCommandMaxAge  = 10 * time.Minute
	// MaxCommandBytes is the largest command payload accepted.
	MaxCommandBytes = 4096
)

// TLSFiles names the PEM files of a TLS connection. All optional: an
// empty CAFile trusts the system's roots.
type TLSFiles struct {
	CAFile     string
	CertFile   string // client certificate, with KeyFile
	KeyFile    string
	ServerName string // overrides the host name checked in the certificate
}

// Config configures a Publisher. URLs, Site and Asset are required.
type Config struct {
	// URLs lists brokers, tried in order on each connect (fail-over):
	// tcp://, ssl:// or tls://, ws://, wss://.
	URLs []string
	// ClientID is the MQTT client id; keep it stable (default
	// "auscult-<host>-<asset>").
	ClientID string
	// Username and Password authenticate; Password is never logged.
	Username, Password string
	// TLS is used for ssl://, tls:// and wss:// URLs.
	TLS TLSFiles
	// KeepAlive, ConnectTimeout: MQTT keep-alive and the bound on one
	// connect attempt.
	KeepAlive, ConnectTimeout time.Duration
	// ReconnectMin and ReconnectMax bound the back-off between attempts:
	// it doubles from Min up to Max, with jitter.
	ReconnectMin, ReconnectMax time.Duration
	// Prefix, Site and Asset make the topics (see NewTopics).
	Prefix, Site, Asset string
	// InFlight is how many messages may await their PUBACK at once.
	InFlight int
	// AckTimeout bounds the wait for one PUBACK before the connection is
	// dropped and made again.
	AckTimeout time.Duration
	// StatusEvery is how often the retained status is refreshed while
	// connected (it is also sent on every connect and on request).
	StatusEvery time.Duration
	// Commands subscribes to the command topic; off, commands are
	// ignored by this agent.
	Commands bool
	// CommandMaxAge refuses commands issued longer ago (or further in the
	// future) than this, by the command's own "issued" time; negative
	// disables the check (for sites whose clocks disagree).
	CommandMaxAge time.Duration
	// SummaryPeriod is the length of the summaries the monitor writes,
	// stated in each summary message.
	SummaryPeriod time.Duration
	// Info is what the status message says about the agent.
	Info Info
	// Now is the clock (default time.Now).
	Now func() time.Time
	// Logger gets one line per connection change, drop and command.
	Logger *slog.Logger
}

// Info describes the agent in its status message.
type Info struct {
	Version       string
	Started       time.Time
	BaselineID    string
	Enrolled      time.Time     // when the baseline was enrolled
	EnrolledFor   time.Duration // how much sound it was enrolled from
	Threshold     float64
	WarnThreshold float64
	ConfigSHA256  string
}

func (c *Config) fill() error {
	if len(c.URLs) == 0 {
		return fmt.Errorf("%w: no broker URL", ErrConfig)
	}
	for _, u := range c.URLs {
		p, err := url.Parse(u)
		if err != nil || p.Host == "" {
			return fmt.Errorf("%w: broker URL %q: want scheme://host:port", ErrConfig, u)
		}
		switch p.Scheme {
		case "tcp", "mqtt", "ssl", "tls", "mqtts", "ws", "wss":
		default:
			return fmt.Errorf("%w: broker URL %q: scheme %q is not tcp, ssl, tls, ws or wss", ErrConfig, u, p.Scheme)
		}
	}
	if c.Prefix == "" {
		c.Prefix = DefaultPrefix
	}
	if c.ClientID == "" {
		host, _ := os.Hostname()
		c.ClientID = "auscult-" + host + "-" + c.Asset
	}
	if len(c.ClientID) > 128 {
		return fmt.Errorf("%w: client id is %d bytes, at most 128", ErrConfig, len(c.ClientID))
	}
	def := func(d *time.Duration, v time.Duration) {
		if *d == 0 {
			*d = v
		}
	}
	def(&c.KeepAlive, DefaultKeepAlive)
	def(&c.ConnectTimeout, DefaultConnectTimeout)
	def(&c.ReconnectMin, DefaultReconnectMin)
	def(&c.ReconnectMax, DefaultReconnectMax)
	def(&c.AckTimeout, DefaultAckTimeout)
	def(&c.StatusEvery, DefaultStatusEvery)
	def(&c.CommandMaxAge, DefaultCommandMaxAge)
	def(&c.SummaryPeriod, time.Hour)
	if c.ReconnectMax < c.ReconnectMin {
		return fmt.Errorf("%w: reconnect ceiling %v is below its start %v", ErrConfig, c.ReconnectMax, c.ReconnectMin)
	}
	if c.InFlight == 0 {
		c.InFlight = DefaultInFlight
	}
	if c.InFlight < 1 || c.InFlight > 1000 {
		return fmt.Errorf("%w: in-flight window %d: want 1 to 1000", ErrConfig, c.InFlight)
	}
	if c.Now == nil {
		c.Now = time.Now
	}
	if c.Logger == nil {
		c.Logger = slog.New(slog.DiscardHandler)
	}
	return nil
}

// TLSConfig builds the tls.Config of f, reading its files; nil error and
// a nil config when f names nothing.
func (f TLSFiles) TLSConfig() (*tls.Config, error) {
	if f == (TLSFiles{}) {
		return nil, nil
	}
	tc := &tls.Config{MinVersion: tls.VersionTLS12, ServerName: f.ServerName}
	if f.CAFile != "" {
		pem, err := os.ReadFile(f.CAFile)
		if err != nil {
			return nil, fmt.Errorf("%w: tls ca_file: %v", ErrConfig, err)
		}
		pool := x509.NewCertPool()
		if !pool.AppendCertsFromPEM(pem) {
			return nil, fmt.Errorf("%w: tls ca_file %s holds no PEM certificate", ErrConfig, f.CAFile)
		}
		tc.RootCAs = pool
	}
	if (f.CertFile == "") != (f.KeyFile == "") {
		return nil, fmt.Errorf("%w: tls cert_file and key_file go together", ErrConfig)
	}
	if f.CertFile != "" {
		cert, err := tls.LoadX509KeyPair(f.CertFile, f.KeyFile)
		if err != nil {
			return nil, fmt.Errorf("%w: tls client certificate %s / %s: %v", ErrConfig, f.CertFile, f.KeyFile, err)
		}
		tc.Certificates = []tls.Certificate{cert}
	}
	return tc, nil
}
