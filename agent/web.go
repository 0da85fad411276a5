package main

import (
	"context"
	"fmt"
	"log/slog"
	"net"
	"os"
	"strings"
	"time"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/config"
	"github.com/auscult/auscult/pkg/monitor"
	"github.com/auscult/auscult/pkg/site"
	"github.com/auscult/auscult/pkg/store"
)

// readSecret reads a secret from the first line of file, or from the
// environment variable env; what names the config keys in errors. The
// secret itself is never logged.
func readSecret(file, env, what string) (string, error) {
	switch {
	case file != "":
		b, err := os.ReadFile(file)
		if err != nil {
			return "", fmt.Errorf("%s_file: %w", what, err)
		}
		v, _, _ := strings.Cut(string(b), "\n")
		v = strings.TrimRight(v, "\r")
		if v == "" {
			return "", fmt.Errorf("%s_file %s: the first line is empty", what, file)
		}
		return v, nil
	case env != "":
		v, ok := os.LookupEnv(env)
		if !ok || v == "" {
			return "", fmt.Errorf("%s_env: the variable %s is not set (for systemd: an Environment= or EnvironmentFile= line)", what, env)
		}
		return v, nil
	}
	return "", nil
}

// liveView builds the status page's view of the running agent.
func liveView(cfg config.Config, b *baseline.Baseline, mon *monitor.Monitor, src *liveSource, lk *link, started time.Time) func() site.Live {
	return func() site.Live {
		s := mon.Status()
		l := site.Live{Asset: cfg.Asset, Site: cfg.Site, Machine: s.Machine, Score: s.Score, Threshold: s.Threshold,
			WarnThreshold: s.WarnThreshold, LastWindow: s.Time, Alarm: s.Alarm, Severity: s.Severity, ShelvedUntil: s.ShelvedUntil,
			SensorFaults: s.SensorFaults, Windows: s.Windows, LagMean: s.LagMean, BaselineID: b.ID, Enrolled: b.Created,
			EnrolledFor: seconds(b.Enrolled.Seconds), Started: started, Version: version}
		if src.capture != nil {
			cs := src.capture.Stats()
			l.Overruns = int64(cs.InputOverflows + cs.RingOverruns)
		}
		if lk != nil {
			ps := lk.pub.Stats()
			l.Broker, l.BrokerConnected, l.BrokerError = strings.Join(cfg.MQTT.Brokers(), ", "), ps.Connected, ps.LastError
		}
		return l
	}
}

// web is the running site-visit server.
type web struct {
	cancel context.CancelFunc
	done   chan error
}

// startWeb listens on web.listen (failing at once if it cannot) and serves
// the site-visit pages; nil when the pages are off.
func startWeb(cfg config.Config, st *store.Store, live func() site.Live, log *slog.Logger) (*web, error) {
	w := cfg.Web
	if w.Listen == "" {
		return nil, nil
	}
	token, err := readSecret(w.TokenFile, w.TokenEnv, "web.token")
	if err != nil {
		return nil, err
	}
	srv, err := site.New(site.Config{Store: st, Token: token, Live: live, Logger: log.With("part", "web")})
	if err != nil {
		return nil, err
	}
	ln, err := net.Listen("tcp", w.Listen)
	if err != nil {
		return nil, fmt.Errorf("web.listen: %w", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	s := &web{cancel: cancel, done: make(chan error, 1)}
	scheme := "http"
	if w.TLSCertFile != "" {
		scheme = "https"
	}
	log.Info("site-visit pages up", "url", fmt.Sprintf("%s://%s/", scheme, ln.Addr()))
	go func() { s.done <- srv.Serve(ctx, ln, w.TLSCertFile, w.TLSKeyFile) }()
	return s, nil
}

// stop shuts the server down.
func (s *web) stop(log *slog.Logger) {
	if s == nil {
		return
	}
	s.cancel()
	if err := <-s.done; err != nil {
		log.Error("site-visit pages", "err", err)
	}
}
