package main

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"log/slog"
	"os"
	"sync/atomic"
	"time"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/config"
	"github.com/auscult/auscult/pkg/monitor"
	"github.com/auscult/auscult/pkg/publish"
	"github.com/auscult/auscult/pkg/store"
)

// drainGrace bounds how long a stopping agent keeps sending what is queued
// while it is connected; the rest waits in the outbox for the next start.
const drainGrace = 3 * time.Second

// brokerPassword reads the password named by the mqtt section: the first
// line of password_file, or the variable password_env. It is never logged.
func brokerPassword(m config.MQTT) (string, error) {
	return readSecret(m.PasswordFile, m.PasswordEnv, "mqtt.password")
}

// publishConfig turns the mqtt section into the publisher's config.
func publishConfig(cfg config.Config, cfgPath string, b *baseline.Baseline, log *slog.Logger) (publish.Config, error) {
	m := cfg.MQTT
	pw, err := brokerPassword(m)
	if err != nil {
		return publish.Config{}, err
	}
	raw, err := os.ReadFile(cfgPath)
	if err != nil {
		return publish.Config{}, err
	}
	sum := sha256.Sum256(raw)
	site := cfg.Site
	if site == "" {
		site = "site"
	}
	maxAge := seconds(m.CommandMaxAgeS)
	if maxAge == 0 {
		maxAge = -1 // the config's 0 turns the check off
	}
	return publish.Config{URLs: m.Brokers(), ClientID: m.ClientID, Username: m.Username, Password: pw,
		TLS:       publish.TLSFiles{CAFile: m.TLS.CAFile, CertFile: m.TLS.CertFile, KeyFile: m.TLS.KeyFile, ServerName: m.TLS.ServerName},
		KeepAlive: seconds(m.KeepAliveS), ConnectTimeout: seconds(m.ConnectTimeoutS),
		ReconnectMin: seconds(m.ReconnectMinS), ReconnectMax: seconds(m.ReconnectMaxS),
		Prefix: m.TopicPrefix, Site: site, Asset: cfg.Asset, StatusEvery: seconds(m.StatusMin * 60),
		Commands: m.Commands, CommandMaxAge: maxAge, SummaryPeriod: time.Duration(cfg.Log.SummaryMin) * time.Minute,
		Info: publish.Info{Version: version, Started: time.Now().UTC(), BaselineID: b.ID, Enrolled: b.Created,
			EnrolledFor: seconds(b.Enrolled.Seconds), Threshold: b.Calib.Threshold, WarnThreshold: b.Calib.WarnThreshold,
			ConfigSHA256: hex.EncodeToString(sum[:])},
		Logger: log.With("part", "mqtt")}, nil
}

// outboxOptions sizes the store's outbox from the mqtt section; notify is
// called for each queued message. Without a broker the outbox is off.
func outboxOptions(m config.MQTT, notify func()) store.OutboxOptions {
	if len(m.Brokers()) == 0 {
		return store.OutboxOptions{}
	}
	return store.OutboxOptions{Enabled: true, MaxBytes: int64(m.OutboxMB * (1 << 20)),
		MaxAge: time.Duration(m.OutboxDays * float64(24*time.Hour)), Notify: notify}
}

// operator lets commands act on the monitor, at the monitor's own time.
type operator struct{ mon *monitor.Monitor }

func (o operator) at() time.Time {
	if t := o.mon.Status().Time; !t.IsZero() {
		return t
	}
	return time.Now().UTC()
}

func (o operator) Acknowledge(by string) error { return o.mon.Acknowledge(o.at(), by) }
func (o operator) Unshelve(by string) error    { return o.mon.Unshelve(o.at(), by) }
func (o operator) Shelve(d time.Duration, reason, by string) error {
	return o.mon.Shelve(o.at(), d, reason, by)
}

func (o operator) Live() publish.Live {
	s := o.mon.Status()
	return publish.Live{Machine: s.Machine, Alarm: s.Alarm, Severity: s.Severity, ShelvedUntil: s.ShelvedUntil,
		Score: s.Score, LastWindow: s.Time, SensorFaults: s.SensorFaults}
}

// link runs the publisher beside the monitor.
type link struct {
	pub    *publish.Publisher
	st     *store.Store
	cancel context.CancelFunc
	done   chan struct{}
}

// startLink starts publishing st's outbox; nil when no broker is
// configured. wake is the store's notify hook, pointed at the publisher.
func startLink(cfg config.Config, cfgPath string, b *baseline.Baseline, st *store.Store, mon *monitor.Monitor,
	wake *atomic.Pointer[publish.Publisher], log *slog.Logger) (*link, error) {
	if len(cfg.MQTT.Brokers()) == 0 {
		return nil, nil
	}
	pc, err := publishConfig(cfg, cfgPath, b, log)
	if err != nil {
		return nil, err
	}
	pub, err := publish.New(pc, st, operator{mon})
	if err != nil {
		return nil, err
	}
	wake.Store(pub)
	ctx, cancel := context.WithCancel(context.Background())
	l := &link{pub: pub, st: st, cancel: cancel, done: make(chan struct{})}
	go func() {
		defer close(l.done)
		pub.Run(ctx)
	}()
	return l, nil
}

// stop sends what is queued while the broker is connected (up to
// drainGrace), then says offline and disconnects.
func (l *link) stop(log *slog.Logger) {
	if l == nil {
		return
	}
	if err := l.st.Flush(); err != nil {
		log.Error("flushing the log before the last messages", "err", err)
	}
	l.pub.Notify()
	for end := time.Now().Add(drainGrace); time.Now().Before(end) && l.pub.Stats().Connected; time.Sleep(50 * time.Millisecond) {
		if ob, err := l.st.OutboxStats(); err != nil || ob.Depth == 0 {
			break
		}
	}
	l.cancel()
	<-l.done
	if ob, err := l.st.OutboxStats(); err == nil && ob.Depth > 0 {
		log.Warn("messages left in the outbox for the next start", "queued", ob.Depth)
	}
}
