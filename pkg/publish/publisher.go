package publish

import (
	"context"
	"crypto/tls"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"net/url"
	"sync"
	"time"

	mqtt "github.com/eclipse/paho.mqtt.golang"

	"github.com/auscult/auscult/pkg/store"
)

// Store is the part of the local log the publisher uses; *store.Store
// implements it.
type Store interface {
	Outbox(after uint64, max int) ([]store.Message, error)
	Ack(seqs []uint64) error
	OutboxStats() (store.OutboxStats, error)
	ReserveSeq() (uint64, error)
	RememberRequest(id string, now time.Time, keep time.Duration) (bool, error)
}

var _ Store = (*store.Store)(nil)

// pollEvery is how often the outbox is looked at without a Notify.
const pollEvery = 2 * time.Second

// Publisher drains the outbox to the broker and answers commands. Make it
// with New, run it with Run; Notify and Stats may be called from any
// goroutine.
type Publisher struct {
	cfg    Config
	st     Store
	op     Operator
	topics Topics
	render renderer
	tls    *tls.Config

	wake chan struct{} // Notify: the outbox has something new
	cmds chan []byte   // command payloads from paho's callback

	mu    sync.Mutex // guards stats and broker
	stats Stats
}

// Stats describes the link, for status pages and logs.
type Stats struct {
	// Connected is true while a connection is up; Broker is the URL it
	// went to, Since when it was made (or lost).
	Connected bool
	Broker    string
	Since     time.Time
	// Published counts messages the broker acknowledged; Connects the
	// connections made; Failures the attempts and sessions that failed.
	Published, Connects, Failures uint64
	// Commands counts commands handled, Rejected those refused.
	Commands, Rejected uint64
	// LastError is the last connection error, empty if none.
	LastError string
}

// New checks cfg and makes a publisher for st's outbox. op carries out
// commands and reports the live state; it must not be nil.
func New(cfg Config, st Store, op Operator) (*Publisher, error) {
	if err := cfg.fill(); err != nil {
		return nil, err
	}
	topics, err := NewTopics(cfg.Prefix, cfg.Site, cfg.Asset)
	if err != nil {
		return nil, err
	}
	tc, err := cfg.TLS.TLSConfig()
	if err != nil {
		return nil, err
	}
	return &Publisher{cfg: cfg, st: st, op: op, topics: topics, tls: tc,
		render: renderer{site: cfg.Site, asset: cfg.Asset, period: cfg.SummaryPeriod},
		wake:   make(chan struct{}, 1), cmds: make(chan []byte, 16)}, nil
}

// Notify tells the publisher the outbox has a new message. It never
// blocks; give it to store.OutboxOptions.Notify.
func (p *Publisher) Notify() {
	select {
	case p.wake <- struct{}{}:
	default:
	}
}

// Topics returns the publisher's topic builder.
func (p *Publisher) Topics() Topics { return p.topics }

// Stats returns a copy of the link's figures.
func (p *Publisher) Stats() Stats {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.stats
}

func (p *Publisher) note(f func(*Stats)) {
	p.mu.Lock()
	f(&p.stats)
	p.mu.Unlock()
}

// Run connects, drains and reconnects until ctx is cancelled; then it
// publishes the offline status, disconnects and returns nil. Messages left
// in the outbox stay there for the next run.
func (p *Publisher) Run(ctx context.Context) error {
	backoff := p.cfg.ReconnectMin
	for ctx.Err() == nil {
		c, lost, broker, err := p.connect(ctx)
		if err != nil {
			p.note(func(s *Stats) { s.Failures++; s.LastError = err.Error() })
			wait := backoff/2 + rand.N(backoff/2+1)
			p.cfg.Logger.Warn("broker unreachable; messages wait in the outbox", "urls", p.cfg.URLs, "err", err, "retry_in", wait.Round(time.Millisecond))
			backoff = min(2*backoff, p.cfg.ReconnectMax)
			select {
			case <-ctx.Done():
			case <-time.After(wait):
			}
			continue
		}
		backoff = p.cfg.ReconnectMin
		now := p.cfg.Now()
		p.note(func(s *Stats) { s.Connected, s.Broker, s.Since, s.Connects = true, broker, now, s.Connects+1 })
		p.cfg.Logger.Info("connected to the broker", "broker", broker, "client_id", p.cfg.ClientID)
		err = p.session(ctx, c, lost)
		now = p.cfg.Now()
		p.note(func(s *Stats) { s.Connected, s.Since = false, now })
		if ctx.Err() != nil {
			p.goodbye(c)
			return nil
		}
		p.note(func(s *Stats) { s.Failures++; s.LastError = err.Error() })
		p.cfg.Logger.Warn("broker link lost; reconnecting", "broker", broker, "err", err)
		c.Disconnect(0)
	}
	return nil
}

// connect makes one paho client with a fresh will and connects it.
func (p *Publisher) connect(ctx context.Context) (mqtt.Client, <-chan struct{}, string, error) {
	will, err := p.statusPayload("offline", ReasonLost, false)
	if err != nil {
		return nil, nil, "", err
	}
	lost := make(chan struct{})
	var once sync.Once
	var broker string
	opts := mqtt.NewClientOptions().SetClientID(p.cfg.ClientID).SetCleanSession(true).
		SetAutoReconnect(false).SetConnectRetry(false).SetResumeSubs(false).
		SetKeepAlive(p.cfg.KeepAlive).SetConnectTimeout(p.cfg.ConnectTimeout).SetWriteTimeout(p.cfg.AckTimeout).
		SetBinaryWill(p.topics.Topic(KindStatus), will, 1, true).
		SetConnectionLostHandler(func(mqtt.Client, error) { once.Do(func() { close(lost) }) }).
		SetConnectionAttemptHandler(func(u *url.URL, tc *tls.Config) *tls.Config { broker = u.Redacted(); return tc })
	for _, u := range p.cfg.URLs {
		opts.AddBroker(u)
	}
	if p.cfg.Username != "" {
		opts.SetUsername(p.cfg.Username).SetPassword(p.cfg.Password)
	}
	if p.tls != nil {
		opts.SetTLSConfig(p.tls)
	}
	c := mqtt.NewClient(opts)
	tok := c.Connect()
	// Wait for the CONNACK, but give up at once when told to stop: a hung
	// broker must not hold up a shutdown.
	deadline := time.Now().Add(p.cfg.ConnectTimeout*time.Duration(len(p.cfg.URLs)) + time.Second)
	for !tok.WaitTimeout(100 * time.Millisecond) {
		if ctx.Err() != nil || time.Now().After(deadline) {
			c.Disconnect(0)
			if ctx.Err() != nil {
				return nil, nil, "", ctx.Err()
			}
			return nil, nil, "", fmt.Errorf("no CONNACK within %v", p.cfg.ConnectTimeout)
		}
	}
	if err := tok.Error(); err != nil {
		return nil, nil, "", err
	}
	return c, lost, broker, nil
}

// session runs one connection: subscribe, announce, drain, answer.
func (p *Publisher) session(ctx context.Context, c mqtt.Client, lost <-chan struct{}) error {
	if p.cfg.Commands {
		tok := c.Subscribe(p.topics.Topic(KindCommand), 1, func(_ mqtt.Client, m mqtt.Message) {
			select {
			case p.cmds <- append([]byte(nil), m.Payload()...):
			default:
				p.cfg.Logger.Warn("command ignored: too many waiting", "bytes", len(m.Payload()))
			}
		})
		if err := p.wait(tok, "subscribe"); err != nil {
			return err
		}
	}
	if err := p.publishStatus(c, "online", ""); err != nil {
		return err
	}
	poll := time.NewTicker(pollEvery)
	defer poll.Stop()
	status := time.NewTicker(p.cfg.StatusEvery)
	defer status.Stop()
	for {
		if err := p.drain(ctx, c, lost); err != nil {
			return err
		}
		select {
		case <-ctx.Done():
			return ctx.Err()
		case <-lost:
			return errors.New("connection lost")
		case <-p.wake:
		case <-poll.C:
		case b := <-p.cmds:
			if err := p.command(c, b); err != nil {
				return err
			}
		case <-status.C:
			if err := p.publishStatus(c, "online", ""); err != nil {
				return err
			}
		}
	}
}

// drain publishes queued messages in order, InFlight at a time, and
// deletes each one the broker acknowledged.
func (p *Publisher) drain(ctx context.Context, c mqtt.Client, lost <-chan struct{}) error {
	for {
		select {
		case <-ctx.Done():
			return nil
		case <-lost:
			return errors.New("connection lost")
		default:
		}
		msgs, err := p.st.Outbox(0, p.cfg.InFlight)
		if err != nil {
			return fmt.Errorf("read the outbox: %w", err)
		}
		if len(msgs) == 0 {
			return nil
		}
		toks := make([]mqtt.Token, len(msgs))
		var done []uint64
		for i, m := range msgs {
			kind, payload, err := p.render.render(m)
			if m.Err != nil || err != nil {
				p.cfg.Logger.Error("outbox entry cannot be sent; deleting it", "seq", m.Seq, "err", errors.Join(m.Err, err))
				done = append(done, m.Seq)
				continue
			}
			toks[i] = c.Publish(p.topics.Topic(kind), 1, false, payload)
		}
		var failed error
		for i, t := range toks {
			if t == nil {
				continue
			}
			if failed = p.wait(t, fmt.Sprintf("publish %d", msgs[i].Seq)); failed != nil {
				break
			}
			done = append(done, msgs[i].Seq)
		}
		if err := p.st.Ack(done); err != nil {
			return err
		}
		n := uint64(len(done))
		p.note(func(s *Stats) { s.Published += n })
		if failed != nil {
			return failed
		}
	}
}

// wait waits for a token within AckTimeout.
func (p *Publisher) wait(t mqtt.Token, what string) error {
	if !t.WaitTimeout(p.cfg.AckTimeout) {
		return fmt.Errorf("%s: no acknowledgement within %v", what, p.cfg.AckTimeout)
	}
	if err := t.Error(); err != nil {
		return fmt.Errorf("%s: %w", what, err)
	}
	return nil
}

// statusPayload builds a status message; live adds the present state and
// the outbox figures.
func (p *Publisher) statusPayload(state, reason string, live bool) ([]byte, error) {
	seq, err := p.st.ReserveSeq()
	if err != nil {
		return nil, err
	}
	i := p.cfg.Info
	s := Status{Envelope: p.render.envelope(KindStatus, seq, p.cfg.Now()), State: state, Reason: reason,
		AgentVersion: i.Version, ClientID: p.cfg.ClientID, Started: Stamp(i.Started),
		Baseline:   StatusBaseline{ID: i.BaselineID, EnrolledS: i.EnrolledFor.Seconds()},
		Thresholds: StatusThresholds{Alarm: i.Threshold, Warning: i.WarnThreshold}, ConfigSHA256: i.ConfigSHA256}
	if !i.Enrolled.IsZero() {
		s.Baseline.Enrolled = Stamp(i.Enrolled)
	}
	if live {
		l := p.op.Live()
		s.Machine, s.AlarmState, s.Severity, s.SensorFaults = l.Machine, l.Alarm, l.Severity, l.SensorFaults
		if !l.ShelvedUntil.IsZero() {
			s.ShelvedUntil = Stamp(l.ShelvedUntil)
		}
		if !l.LastWindow.IsZero() && !math.IsNaN(l.Score) && !math.IsInf(l.Score, 0) {
			score := l.Score
			s.Score, s.LastWindow = &score, Stamp(l.LastWindow)
		}
		ob, err := p.st.OutboxStats()
		if err != nil {
			return nil, err
		}
		s.Outbox = &StatusOutbox{Depth: ob.Depth, Bytes: ob.Bytes, DroppedTotal: ob.Drops.Total, DroppedBy: map[string]uint64{}}
		if !ob.Oldest.IsZero() {
			s.Outbox.Oldest = Stamp(ob.Oldest)
		}
		for c := store.ClassSummary; c <= store.ClassAlarm; c++ {
			s.Outbox.DroppedBy[c.String()] = ob.Drops.ByClass[c]
		}
	}
	return json.Marshal(s)
}

// publishStatus publishes the retained status and waits for the PUBACK.
func (p *Publisher) publishStatus(c mqtt.Client, state, reason string) error {
	b, err := p.statusPayload(state, reason, state == "online")
	if err != nil {
		return err
	}
	return p.wait(c.Publish(p.topics.Topic(KindStatus), 1, true, b), "publish status")
}

// goodbye replaces the retained status by a clean offline one and
// disconnects.
func (p *Publisher) goodbye(c mqtt.Client) {
	saved := p.cfg.AckTimeout
	p.cfg.AckTimeout = min(saved, 2*time.Second)
	if err := p.publishStatus(c, "offline", ReasonStopped); err != nil {
		p.cfg.Logger.Warn("offline status not sent; the broker will send the will", "err", err)
	}
	p.cfg.AckTimeout = saved
	c.Disconnect(250)
	p.cfg.Logger.Info("disconnected from the broker")
}
