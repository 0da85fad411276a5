package publish

import (
	"fmt"
	"os"
	"time"

	mqtt "github.com/eclipse/paho.mqtt.golang"
)

// ProbeResult is the outcome of one broker's link check.
type ProbeResult struct {
	URL  string
	Took time.Duration
	Err  error
}

// Probe connects to each configured broker in turn with the configured
// credentials and TLS, under a throw-away client id (so it does not knock
// a running agent off), and disconnects: the link check of `auscult
// check`. It publishes nothing.
func Probe(cfg Config) ([]ProbeResult, error) {
	if err := cfg.fill(); err != nil {
		return nil, err
	}
	tc, err := cfg.TLS.TLSConfig()
	if err != nil {
		return nil, err
	}
	out := make([]ProbeResult, 0, len(cfg.URLs))
	for _, u := range cfg.URLs {
		opts := mqtt.NewClientOptions().AddBroker(u).SetClientID(fmt.Sprintf("%s-check-%d", cfg.ClientID, os.Getpid())).
			SetConnectTimeout(cfg.ConnectTimeout).SetAutoReconnect(false).SetConnectRetry(false).SetCleanSession(true)
		if cfg.Username != "" {
			opts.SetUsername(cfg.Username).SetPassword(cfg.Password)
		}
		if tc != nil {
			opts.SetTLSConfig(tc)
		}
		c := mqtt.NewClient(opts)
		start := time.Now()
		tok := c.Connect()
		r := ProbeResult{URL: u}
		switch {
		case !tok.WaitTimeout(cfg.ConnectTimeout + time.Second):
			r.Err = fmt.Errorf("no answer within %v", cfg.ConnectTimeout)
		case tok.Error() != nil:
			r.Err = tok.Error()
		default:
			r.Took = time.Since(start)
			c.Disconnect(100)
		}
		out = append(out, r)
	}
	return out, nil
}
