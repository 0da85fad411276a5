package brokertest

import (
	"bytes"
	"crypto/tls"
	"crypto/x509"
	"errors"
	"fmt"
	"os"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	mqtt "github.com/eclipse/paho.mqtt.golang"
	"github.com/eclipse/paho.mqtt.golang/packets"
)

// arrive bounds how long a test waits for a message it expects.
const arrive = 5 * time.Second

// pahoCount numbers the paho clients' identifiers.
var pahoCount atomic.Int64

// connect connects a paho client to url, letting edit adjust its options,
// and disconnects it when the test ends.
func connect(t *testing.T, url string, edit func(*mqtt.ClientOptions)) (mqtt.Client, error) {
	t.Helper()
	o := mqtt.NewClientOptions().AddBroker(url).
		SetClientID(fmt.Sprintf("brokertest-paho-%d", pahoCount.Add(1))).
		SetConnectTimeout(3 * time.Second).SetAutoReconnect(false)
	if edit != nil {
		edit(o)
	}
	c := mqtt.NewClient(o)
	tok := c.Connect()
	if !tok.WaitTimeout(5 * time.Second) {
		return nil, fmt.Errorf("connect to %s: no answer", url)
	}
	if err := tok.Error(); err != nil {
		return nil, err
	}
	t.Cleanup(func() { c.Disconnect(100) })
	return c, nil
}

// mustConnect is connect that fails the test on error.
func mustConnect(t *testing.T, b *Broker, url string, edit func(*mqtt.ClientOptions)) mqtt.Client {
	t.Helper()
	c, err := connect(t, url, edit)
	if err != nil {
		t.Fatalf("%v\n%s", err, b.Log())
	}
	return c
}

// publish sends one message and waits for the broker's acknowledgement.
func publish(t *testing.T, c mqtt.Client, topic string, qos byte, retained bool, payload string) {
	t.Helper()
	tok := c.Publish(topic, qos, retained, payload)
	if !tok.WaitTimeout(arrive) || tok.Error() != nil {
		t.Fatalf("publish %s: %v", topic, tok.Error())
	}
}

// want checks that the subscriber got exactly the given payloads, in order.
func want(t *testing.T, b *Broker, s *Sub, payloads ...string) []Message {
	t.Helper()
	msgs, _ := s.WaitFor(len(payloads), arrive)
	var got []string
	for _, m := range msgs {
		got = append(got, string(m.Payload))
	}
	if strings.Join(got, "|") != strings.Join(payloads, "|") {
		t.Fatalf("received %q, want %q\n%s", got, payloads, b.Log())
	}
	return msgs
}

// tlsConfig builds a client TLS configuration from the broker's PEM files.
func tlsConfig(t *testing.T, b *Broker, clientCert bool) *tls.Config {
	t.Helper()
	ca, err := os.ReadFile(b.CAFile)
	if err != nil {
		t.Fatal(err)
	}
	pool := x509.NewCertPool()
	if !pool.AppendCertsFromPEM(ca) {
		t.Fatal("no certificate in", b.CAFile)
	}
	cfg := &tls.Config{RootCAs: pool, ServerName: b.ServerName}
	if clientCert {
		pair, err := tls.LoadX509KeyPair(b.ClientCertFile, b.ClientKeyFile)
		if err != nil {
			t.Fatal(err)
		}
		cfg.Certificates = []tls.Certificate{pair}
	}
	return cfg
}

// A QoS 1 message from paho reaches mosquitto_sub with its topic, payload,
// QoS and RETAIN flag intact, binary bytes included.
func TestPlainPublishReachesSubscriber(t *testing.T) {
	b := Start(t, Options{})
	s := b.Subscribe(t, "plant/+/alarm", SubOptions{QoS: 1})
	c := mustConnect(t, b, b.URL, nil)
	body := "level=3\tline two\n\x00\xff"
	publish(t, c, "plant/pump-4/alarm", 1, true, body)
	publish(t, c, "plant/pump-4/trend", 1, false, "not matched")
	publish(t, c, "plant/pump-5/alarm", 0, false, "second")

	// MQTT 3.1.1 (OASIS, 2014), section 3.3.1.3: a message sent because it
	// matches an established subscription carries RETAIN 0 [MQTT-3.3.1-9];
	// one sent because a new subscription was made carries RETAIN 1
	// [MQTT-3.3.1-8].
	msgs := want(t, b, s, body, "second")
	first := Message{Topic: "plant/pump-4/alarm", Payload: []byte(body), QoS: 1, Retained: false}
	if m := msgs[0]; m.Topic != first.Topic || !bytes.Equal(m.Payload, first.Payload) || m.QoS != 1 || m.Retained {
		t.Errorf("first message %+v, want %+v", m, first)
	}
	if m := msgs[1]; m.QoS != 0 {
		t.Errorf("a QoS 0 publish was delivered with QoS %d", m.QoS)
	}
	late := b.Subscribe(t, "plant/#", SubOptions{})
	if msgs := want(t, b, late, body); !msgs[0].Retained {
		t.Errorf("the retained message reached a new subscription with RETAIN 0: %+v", msgs[0])
	}
}

// Over TLS with a required client certificate, paho (with the generated
// files) and mosquitto_sub (with --cert) both connect and a message passes;
// the server certificate verifies for "localhost" and for 127.0.0.1.
func TestTLSWithClientCert(t *testing.T) {
	b := Start(t, Options{TLS: true, RequireClientCert: true})
	if !strings.HasPrefix(b.URL, "ssl://127.0.0.1:") || b.ServerName != "localhost" {
		t.Fatalf("URL %q, ServerName %q", b.URL, b.ServerName)
	}
	s := b.Subscribe(t, "secure/#", SubOptions{QoS: 1, UseClientCert: true})
	for _, name := range []string{b.ServerName, ""} {
		cfg := tlsConfig(t, b, true)
		cfg.ServerName = name
		c := mustConnect(t, b, b.URL, func(o *mqtt.ClientOptions) { o.SetTLSConfig(cfg) })
		publish(t, c, "secure/x", 1, false, "over tls, server name "+name)
	}
	want(t, b, s, "over tls, server name localhost", "over tls, server name ")
}

// A TLS listener that requires a client certificate refuses paho without
// one, while it accepts TLS clients when certificates are optional.
func TestTLSRequiresClientCert(t *testing.T) {
	b := Start(t, Options{TLS: true, RequireClientCert: true})
	cfg := tlsConfig(t, b, false)
	if _, err := connect(t, b.URL, func(o *mqtt.ClientOptions) { o.SetTLSConfig(cfg) }); err == nil {
		t.Fatalf("connected without a client certificate\n%s", b.Log())
	} else {
		t.Logf("refused as expected: %v", err)
	}

	open := Start(t, Options{TLS: true})
	s := open.Subscribe(t, "t", SubOptions{})
	c := mustConnect(t, open, open.URL, func(o *mqtt.ClientOptions) { o.SetTLSConfig(tlsConfig(t, open, false)) })
	publish(t, c, "t", 1, false, "no client cert needed")
	want(t, open, s, "no client cert needed")
}

// With Users, the right password connects, while a wrong password and an
// anonymous client are refused with CONNACK return code 5.
func TestUsers(t *testing.T) {
	b := Start(t, Options{Users: map[string]string{"agent": "s3cret pass", "viewer": "v"}})
	s := b.Subscribe(t, "site/#", SubOptions{User: "viewer", Password: "v"})
	c := mustConnect(t, b, b.URL, func(o *mqtt.ClientOptions) { o.SetUsername("agent").SetPassword("s3cret pass") })
	publish(t, c, "site/a", 1, false, "authenticated")
	want(t, b, s, "authenticated")

	// MQTT 3.1.1 (OASIS, 2014), section 3.2.2.3, table 3.1: return code 4
	// is "bad user name or password", 5 is "not authorized"; Mosquitto
	// 2.0.11 answers 5 to both cases here.
	for _, cred := range [][2]string{{"agent", "wrong"}, {"", ""}} {
		_, err := connect(t, b.URL, func(o *mqtt.ClientOptions) { o.SetUsername(cred[0]).SetPassword(cred[1]) })
		if !errors.Is(err, packets.ErrorRefusedNotAuthorised) {
			t.Errorf("user %q password %q: %v, want refusal %q", cred[0], cred[1], err, packets.ErrorRefusedNotAuthorised)
		}
	}
}

// A publish the ACL denies is acknowledged and silently dropped: the
// subscriber never sees it, and only the broker's log tells.
func TestACLDropsDeniedPublish(t *testing.T) {
	b := Start(t, Options{
		Users: map[string]string{"sensor": "a", "reader": "b"},
		ACL:   "user sensor\ntopic write plant/#\n\nuser reader\ntopic read #\n",
	})
	s := b.Subscribe(t, "#", SubOptions{QoS: 1, User: "reader", Password: "b"})
	c := mustConnect(t, b, b.URL, func(o *mqtt.ClientOptions) { o.SetUsername("sensor").SetPassword("a") })
	// QoS 1 from one client is handled in order, so once the allowed
	// message has arrived the denied one would have too.
	publish(t, c, "office/door", 1, false, "denied")
	publish(t, c, "plant/pump", 1, false, "allowed")
	want(t, b, s, "allowed")
	if !strings.Contains(b.Log(), "Denied PUBLISH") {
		t.Errorf("the broker log does not mention the denied publish:\n%s", b.Log())
	}
}

// With Persistence, a persistent QoS 1 mosquitto_sub keeps its session
// across a broker Stop and Start: it reconnects by itself and receives a
// message published after it resubscribed, and one published after the
// restart while it was still disconnected (it is paused meanwhile, so it
// cannot have reconnected yet).
func TestPersistentSessionSurvivesRestart(t *testing.T) {
	b := Start(t, Options{Persistence: true})
	s := b.Subscribe(t, "alarms/#", SubOptions{ClientID: "keeper", Persistent: true, QoS: 1})
	pub := func(payload string) {
		c := mustConnect(t, b, b.URL, nil)
		publish(t, c, "alarms/pump", 1, false, payload)
		c.Disconnect(100)
	}
	pub("before")
	want(t, b, s, "before")

	b.Stop()
	b.Start()
	if !s.WaitSubscribed(2, arrive) {
		t.Fatalf("mosquitto_sub did not reconnect\n%s", b.Log())
	}
	pub("after restart")
	want(t, b, s, "before", "after restart")

	s.Pause()
	b.Stop()
	b.Start()
	pub("while away")
	if n := s.Subscribed(); n != 2 {
		t.Fatalf("the paused subscriber subscribed again (%d times)", n)
	}
	s.Resume()
	msgs := want(t, b, s, "before", "after restart", "while away")
	if msgs[2].QoS != 1 || msgs[2].Topic != "alarms/pump" {
		t.Errorf("queued message %+v", msgs[2])
	}
	if !s.WaitSubscribed(3, arrive) {
		t.Errorf("mosquitto_sub did not subscribe again after resuming")
	}
}

// WebSockets work in Debian's mosquitto 2.0.11: paho publishes over
// ws://, also after the broker was killed and started again, and
// mosquitto_sub on the plain listener receives.
func TestWebSockets(t *testing.T) {
	b := Start(t, Options{WebSockets: true})
	if !strings.HasPrefix(b.WSURL, "ws://127.0.0.1:") || b.WSURL == b.URL {
		t.Fatalf("WSURL %q", b.WSURL)
	}
	s := b.Subscribe(t, "ws/#", SubOptions{QoS: 1})
	c := mustConnect(t, b, b.WSURL, nil)
	publish(t, c, "ws/a", 1, false, "over websockets")
	want(t, b, s, "over websockets")

	b.Kill()
	b.Start()
	if !s.WaitSubscribed(2, arrive) {
		t.Fatalf("mosquitto_sub did not reconnect\n%s", b.Log())
	}
	c = mustConnect(t, b, b.WSURL, nil)
	publish(t, c, "ws/b", 1, false, "again")
	want(t, b, s, "over websockets", "again")
}
