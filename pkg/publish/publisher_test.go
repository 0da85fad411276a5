package publish_test

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"log/slog"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"testing"
	"time"

	mqtt "github.com/eclipse/paho.mqtt.golang"

	"github.com/auscult/auscult/pkg/publish"
	"github.com/auscult/auscult/pkg/publish/brokertest"
	"github.com/auscult/auscult/pkg/publish/schema"
	"github.com/auscult/auscult/pkg/store"
)

var t0 = time.Date(2026, 12, 2, 3, 0, 0, 0, time.UTC)

// desk is the operator the commands act on in these tests: it records
// what it was asked and refuses an acknowledge when nothing is active.
type desk struct {
	mu     sync.Mutex // guards the fields below
	active bool
	calls  []string
}

func (d *desk) Acknowledge(by string) error {
	d.mu.Lock()
	defer d.mu.Unlock()
	d.calls = append(d.calls, "ack "+by)
	if !d.active {
		return errors.New("alarm: nothing to acknowledge")
	}
	d.active = false
	return nil
}

func (d *desk) Shelve(dur time.Duration, reason, by string) error {
	d.mu.Lock()
	defer d.mu.Unlock()
	d.calls = append(d.calls, fmt.Sprintf("shelve %v %s %s", dur, reason, by))
	return nil
}

func (d *desk) Unshelve(by string) error { return nil }

func (d *desk) Live() publish.Live {
	return publish.Live{Machine: "running", Alarm: "NORM", Severity: "none", Score: 0.1, LastWindow: t0}
}

// agentStore opens a store with the outbox on; notify is wired later.
func agentStore(t *testing.T, notify *func()) *store.Store {
	t.Helper()
	st, err := store.Open(filepath.Join(t.TempDir(), "obrinvale.db"), store.Options{FlushInterval: -1,
		Outbox: store.OutboxOptions{Enabled: true, Notify: func() {
			if *notify != nil {
				(*notify)()
			}
		}}})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	return st
}

type running struct {
	pub    *publish.Publisher
	cancel context.CancelFunc
	done   chan struct{}
	log    *bytes.Buffer
}

func (r *running) stop() {
	r.cancel()
	<-r.done
}

// lockedBuffer is a log sink safe for the publisher's goroutines.
type lockedBuffer struct {
	mu sync.Mutex // guards b
	b  bytes.Buffer
}

func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

func startPublisher(t *testing.T, cfg publish.Config, st *store.Store, op publish.Operator, notify *func()) (*running, *lockedBuffer) {
	t.Helper()
	logs := &lockedBuffer{}
	cfg.Site, cfg.Asset = "obrinvale", "P-492B"
	cfg.ClientID = "auscult-test-" + strings.ReplaceAll(t.Name(), "/", "-")
	cfg.ReconnectMin, cfg.ReconnectMax, cfg.ConnectTimeout, cfg.AckTimeout = 100*time.Millisecond, 500*time.Millisecond, 2*time.Second, 5*time.Second
	cfg.KeepAlive = 5 * time.Second
	cfg.Info = publish.Info{Version: "test", Started: t0, BaselineID: "b1c2d3", Enrolled: t0.Add(-time.Hour),
		EnrolledFor: 30 * time.Minute, Threshold: 0.33, WarnThreshold: 0.28, ConfigSHA256: strings.Repeat("ab", 32)}
	cfg.Logger = slog.New(slog.NewTextHandler(logs, nil))
	pub, err := publish.New(cfg, st, op)
	if err != nil {
		t.Fatal(err)
	}
	*notify = pub.Notify
	ctx, cancel := context.WithCancel(context.Background())
	r := &running{pub: pub, cancel: cancel, done: make(chan struct{})}
	go func() { defer close(r.done); pub.Run(ctx) }()
	t.Cleanup(r.stop)
	return r, logs
}

func alarmEvent(i int, code string) store.Event {
	return store.Event{Time: t0.Add(time.Duration(i) * time.Second), Kind: store.EventAlarm, Code: code, Asset: "P-492B",
		Score: 0.4, Threshold: 0.33, Message: "test alarm " + code,
		Values: map[string]float64{"occurrence": 1, "over_windows": 3, "of_windows": 5, "band1_lo_hz": 900, "band1_hi_hz": 1100, "band1_dev_sd": 4},
		Labels: map[string]string{"change": strings.TrimPrefix(code, "alarm."), "state": "UNACK", "severity": "alarm", "machine": "running"}}
}

// payloads decodes and schema-checks every message, returning the event
// stream (everything but status) as kind and seq.
func checkMessages(t *testing.T, msgs []brokertest.Message) (stream []publish.Envelope, status []publish.Status) {
	t.Helper()
	for _, m := range msgs {
		var env publish.Envelope
		if err := json.Unmarshal(m.Payload, &env); err != nil {
			t.Fatalf("%s: %v: %s", m.Topic, err, m.Payload)
		}
		if !strings.HasSuffix(m.Topic, "/"+env.Kind) {
			t.Errorf("topic %s carries kind %s", m.Topic, env.Kind)
		}
		if err := schema.Validate(env.Kind, m.Payload); err != nil {
			t.Errorf("schema: %v\n%s", err, m.Payload)
		}
		if env.Kind == publish.KindStatus {
			var s publish.Status
			json.Unmarshal(m.Payload, &s)
			status = append(status, s)
			continue
		}
		stream = append(stream, env)
	}
	return stream, status
}

// Queued alarms and summaries reach a client we did not write
// (mosquitto_sub) in sequence order, valid against their schemas, and
// leave the outbox; the status topic says online, retained.
func TestPublishesInOrder(t *testing.T) {
	b := brokertest.Start(t, brokertest.Options{})
	sub := b.Subscribe(t, "auscult/obrinvale/P-492B/#", brokertest.SubOptions{QoS: 1})
	var notify func()
	st := agentStore(t, &notify)
	for i, code := range []string{"alarm.raised", "alarm.acknowledged", "alarm.cleared"} {
		if _, err := st.AppendEvent(alarmEvent(i, code)); err != nil {
			t.Fatal(err)
		}
	}
	st.AddSummary(store.Summary{Start: t0, Windows: 1780, RunningFraction: 1, ScoreMin: 0.1, ScoreMean: 0.12, ScoreP95: 0.2,
		ScoreMax: 0.3, RMSMeanDBFS: -30, RMSMaxDBFS: -20})
	st.Flush()
	r, _ := startPublisher(t, publish.Config{URLs: []string{b.URL}}, st, &desk{}, &notify)
	msgs, ok := sub.WaitFor(5, 10*time.Second)
	if !ok {
		t.Fatalf("got %d messages, want 5:\n%s", len(msgs), b.Log())
	}
	stream, status := checkMessages(t, msgs)
	if len(status) != 1 || status[0].State != "online" || status[0].Outbox == nil || status[0].Baseline.ID != "b1c2d3" {
		t.Errorf("status %+v", status)
	}
	if len(stream) != 4 || stream[3].Kind != publish.KindSummary {
		t.Fatalf("stream %+v", stream)
	}
	for i := 1; i < len(stream); i++ {
		if stream[i].Seq <= stream[i-1].Seq {
			t.Errorf("out of order: %+v", stream)
		}
	}
	// A message queued while connected goes out at once.
	st.AppendEvent(alarmEvent(9, "alarm.raised"))
	if _, ok := sub.WaitFor(6, 5*time.Second); !ok {
		t.Error("a new alarm was not sent")
	}
	waitEmpty(t, st)
	// The count follows the outbox delete: give it a moment.
	for end := time.Now().Add(5 * time.Second); r.pub.Stats().Published < 5 && time.Now().Before(end); {
		time.Sleep(10 * time.Millisecond)
	}
	if s := r.pub.Stats(); !s.Connected || s.Published != 5 {
		t.Errorf("stats %+v", s)
	}
	// A clean stop replaces the retained status with offline.
	r.stop()
	late := b.Subscribe(t, "auscult/obrinvale/P-492B/status", brokertest.SubOptions{QoS: 1})
	got, ok := late.WaitFor(1, 5*time.Second)
	if !ok || !strings.Contains(string(got[0].Payload), `"state":"offline","reason":"stopped"`) {
		t.Errorf("retained status after stop: %v", got)
	}
}

func waitEmpty(t *testing.T, st *store.Store) {
	t.Helper()
	for end := time.Now().Add(10 * time.Second); time.Now().Before(end); time.Sleep(20 * time.Millisecond) {
		if ob, _ := st.OutboxStats(); ob.Depth == 0 {
			return
		}
	}
	ob, _ := st.OutboxStats()
	t.Fatalf("outbox still holds %d messages", ob.Depth)
}

// While the broker is down, messages wait in the outbox; after it comes
// back they all arrive, in order, with no gap in the event stream.
func TestBrokerOutage(t *testing.T) {
	b := brokertest.Start(t, brokertest.Options{Persistence: true})
	sub := b.Subscribe(t, "auscult/obrinvale/P-492B/alarm", brokertest.SubOptions{ClientID: "bridge-outage", Persistent: true, QoS: 1})
	var notify func()
	st := agentStore(t, &notify)
	r, _ := startPublisher(t, publish.Config{URLs: []string{b.URL}}, st, &desk{}, &notify)
	st.AppendEvent(alarmEvent(0, "alarm.raised"))
	if _, ok := sub.WaitFor(1, 10*time.Second); !ok {
		t.Fatal("first alarm not received")
	}
	b.Stop()
	for i := 1; i <= 20; i++ {
		st.AppendEvent(alarmEvent(i, "alarm.raised"))
	}
	if ob, _ := st.OutboxStats(); ob.Depth < 20 {
		t.Errorf("outbox holds %d during the outage, want 20", ob.Depth)
	}
	if r.pub.Stats().Connected {
		t.Error("still connected with the broker down")
	}
	b.Start()
	msgs, ok := sub.WaitFor(21, 30*time.Second)
	if !ok {
		t.Fatalf("after the outage: %d of 21 alarms\n%s", len(msgs), b.Log())
	}
	stream, _ := checkMessages(t, msgs)
	seen := map[uint64]bool{}
	var last uint64
	for _, e := range stream {
		if seen[e.Seq] {
			continue // a duplicate of an already seen message is allowed
		}
		if e.Seq < last {
			t.Errorf("seq %d after %d", e.Seq, last)
		}
		seen[e.Seq], last = true, e.Seq
	}
	if len(seen) != 21 {
		t.Errorf("%d distinct alarms, want 21", len(seen))
	}
	waitEmpty(t, st)
}

// Commands are carried out and answered; bad ones are refused with a
// specific code and the agent keeps going.
func TestCommands(t *testing.T) {
	b := brokertest.Start(t, brokertest.Options{})
	resp := b.Subscribe(t, "auscult/obrinvale/P-492B/response", brokertest.SubOptions{QoS: 1})
	var notify func()
	st := agentStore(t, &notify)
	d := &desk{active: true}
	r, _ := startPublisher(t, publish.Config{URLs: []string{b.URL}, Commands: true}, st, d, &notify)
	for !r.pub.Stats().Connected {
		time.Sleep(10 * time.Millisecond)
	}
	bridge := mqtt.NewClient(mqtt.NewClientOptions().AddBroker(b.URL).SetClientID("scada-bridge"))
	if tok := bridge.Connect(); !tok.WaitTimeout(5*time.Second) || tok.Error() != nil {
		t.Fatal(tok.Error())
	}
	defer bridge.Disconnect(100)
	now := publish.Stamp(time.Now())
	old := publish.Stamp(time.Now().Add(-time.Hour))
	send := []struct{ payload, code string }{
		{`{"schema":1,"request_id":"c-1","action":"acknowledge","by":"m.okafor","issued":"` + now + `"}`, ""},
		{`{"schema":1,"request_id":"c-1","action":"acknowledge","by":"m.okafor","issued":"` + now + `"}`, publish.CodeReplayed},
		{`{"schema":1,"request_id":"c-2","action":"acknowledge","by":"m.okafor","issued":"` + now + `"}`, publish.CodeRefused},
		{`{"schema":1,"request_id":"c-3","action":"shelve","by":"m.okafor","reason":"seal swap","duration_s":1800,"issued":"` + now + `"}`, ""},
		{`{"schema":1,"request_id":"c-4","action":"status","issued":"` + old + `"}`, publish.CodeStale},
		{`{"schema":1,"request_id":"c-5","action":"restart","issued":"` + now + `"}`, publish.CodeUnknownAction},
		{`not json at all`, publish.CodeMalformed},
		{`{"x":"` + strings.Repeat("y", 5000) + `"}`, publish.CodeTooLarge},
		{`{"schema":1,"request_id":"c-6","action":"status","issued":"` + now + `"}`, ""},
	}
	for _, s := range send {
		bridge.Publish("auscult/obrinvale/P-492B/command", 1, false, s.payload).Wait()
	}
	msgs, ok := resp.WaitFor(len(send), 15*time.Second)
	if !ok {
		t.Fatalf("%d responses of %d", len(msgs), len(send))
	}
	checkMessages(t, msgs)
	for i, m := range msgs {
		var r publish.Response
		json.Unmarshal(m.Payload, &r)
		code := ""
		if r.Error != nil {
			code = r.Error.Code
		}
		if code != send[i].code || r.OK != (code == "") {
			t.Errorf("command %d: response %s, want code %q", i, m.Payload, send[i].code)
		}
	}
	d.mu.Lock()
	calls := strings.Join(d.calls, "; ")
	d.mu.Unlock()
	if calls != "ack m.okafor; ack m.okafor; shelve 30m0s seal swap m.okafor" {
		t.Errorf("operator calls: %s", calls)
	}
	if s := r.pub.Stats(); s.Commands != uint64(len(send)) || s.Rejected != 6 || !s.Connected {
		t.Errorf("stats %+v", s)
	}
}

// TLS with a client certificate, and a password login: the right
// credentials publish, a wrong password is refused, and the password never
// appears in the log.
func TestTLSAndPassword(t *testing.T) {
	t.Run("tls client certificate", func(t *testing.T) {
		b := brokertest.Start(t, brokertest.Options{TLS: true, RequireClientCert: true})
		sub := b.Subscribe(t, "auscult/obrinvale/P-492B/#", brokertest.SubOptions{QoS: 1, UseClientCert: true})
		var notify func()
		st := agentStore(t, &notify)
		st.AppendEvent(alarmEvent(0, "alarm.raised"))
		startPublisher(t, publish.Config{URLs: []string{b.URL}, TLS: publish.TLSFiles{CAFile: b.CAFile,
			CertFile: b.ClientCertFile, KeyFile: b.ClientKeyFile, ServerName: b.ServerName}}, st, &desk{}, &notify)
		if msgs, ok := sub.WaitFor(2, 10*time.Second); !ok {
			t.Fatalf("over TLS: %d messages\n%s", len(msgs), b.Log())
		}
	})
	t.Run("password", func(t *testing.T) {
		const secret = "kettle-7-granite"
		b := brokertest.Start(t, brokertest.Options{Users: map[string]string{"p492b": secret, "bridge": "other-secret"}})
		sub := b.Subscribe(t, "auscult/obrinvale/P-492B/#", brokertest.SubOptions{QoS: 1, User: "bridge", Password: "other-secret"})
		var notify func()
		st := agentStore(t, &notify)
		st.AppendEvent(alarmEvent(0, "alarm.raised"))
		wrong, wrongLog := startPublisher(t, publish.Config{URLs: []string{b.URL}, Username: "p492b", Password: "not-it"}, st, &desk{}, &notify)
		for end := time.Now().Add(5 * time.Second); wrong.pub.Stats().Failures == 0 && time.Now().Before(end); {
			time.Sleep(20 * time.Millisecond)
		}
		if s := wrong.pub.Stats(); s.Connected || s.Failures == 0 || !strings.Contains(strings.ToLower(s.LastError), "auth") {
			t.Errorf("wrong password: %+v", s)
		}
		wrong.stop()
		right, rightLog := startPublisher(t, publish.Config{URLs: []string{b.URL}, Username: "p492b", Password: secret}, st, &desk{}, &notify)
		if msgs, ok := sub.WaitFor(2, 10*time.Second); !ok {
			t.Fatalf("with the password: %d messages\n%s", len(msgs), b.Log())
		}
		right.stop()
		for _, l := range []string{wrongLog.String(), rightLog.String()} {
			if strings.Contains(l, secret) || strings.Contains(l, "not-it") {
				t.Errorf("a password appears in the log:\n%s", l)
			}
		}
	})
}

// Fail-over: the first broker of the list is dead, the second takes the
// messages.
func TestFailover(t *testing.T) {
	b := brokertest.Start(t, brokertest.Options{})
	dead := brokertest.Start(t, brokertest.Options{})
	dead.Stop()
	sub := b.Subscribe(t, "auscult/obrinvale/P-492B/alarm", brokertest.SubOptions{QoS: 1})
	var notify func()
	st := agentStore(t, &notify)
	st.AppendEvent(alarmEvent(0, "alarm.raised"))
	r, _ := startPublisher(t, publish.Config{URLs: []string{dead.URL, b.URL}}, st, &desk{}, &notify)
	if _, ok := sub.WaitFor(1, 15*time.Second); !ok {
		t.Fatal("nothing arrived through the second broker")
	}
	if s := r.pub.Stats(); s.Broker != strings.TrimSuffix(b.URL, "/") && !strings.Contains(b.URL, strings.TrimPrefix(s.Broker, "tcp://")) {
		t.Errorf("connected to %q, want %q", s.Broker, b.URL)
	}
}

// MQTT over WebSockets, plain and with TLS (ws:// and wss:// URLs).
func TestWebSockets(t *testing.T) {
	for _, tls := range []bool{false, true} {
		t.Run(fmt.Sprintf("tls=%v", tls), func(t *testing.T) {
			b := brokertest.Start(t, brokertest.Options{WebSockets: true, TLS: tls})
			sub := b.Subscribe(t, "auscult/obrinvale/P-492B/alarm", brokertest.SubOptions{QoS: 1})
			var notify func()
			st := agentStore(t, &notify)
			st.AppendEvent(alarmEvent(0, "alarm.raised"))
			cfg := publish.Config{URLs: []string{b.WSURL}}
			if tls {
				cfg.TLS = publish.TLSFiles{CAFile: b.CAFile}
			}
			r, _ := startPublisher(t, cfg, st, &desk{}, &notify)
			if _, ok := sub.WaitFor(1, 10*time.Second); !ok {
				t.Fatalf("nothing over %s (%+v)\n%s", b.WSURL, r.pub.Stats(), b.Log())
			}
		})
	}
}

// Connect attempts that fail (refused, or no CONNACK from a hung broker)
// leave no goroutines behind: an agent retries for days.
func TestFailedConnectsDoNotLeak(t *testing.T) {
	hung := brokertest.Start(t, brokertest.Options{})
	hung.Pause()
	defer hung.Resume()
	dead := brokertest.Start(t, brokertest.Options{})
	dead.Stop()
	var notify func()
	st := agentStore(t, &notify)
	before := runtime.NumGoroutine()
	for _, url := range []string{hung.URL, dead.URL} {
		r, _ := startPublisher(t, publish.Config{URLs: []string{url}}, st, &desk{}, &notify)
		// startPublisher sets a 2 s connect timeout and a back-off of at
		// most 0.5 s: several attempts each.
		time.Sleep(6 * time.Second)
		if f := r.pub.Stats().Failures; f < 1 {
			t.Errorf("%s: %d failed attempts in 6 s", url, f)
		}
		r.stop()
	}
	time.Sleep(500 * time.Millisecond)
	if after := runtime.NumGoroutine(); after > before+2 {
		buf := make([]byte, 1<<16)
		t.Errorf("%d goroutines before, %d after the failed connects:\n%s", before, after, buf[:runtime.Stack(buf, true)])
	}
}
