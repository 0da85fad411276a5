package publish_test

import (
	"os"
	"strings"
	"testing"
	"time"

	mqtt "github.com/eclipse/paho.mqtt.golang"

	"github.com/auscult/auscult/pkg/publish"
	"github.com/auscult/auscult/pkg/publish/brokertest"
)

// docBlock returns the first fenced block of the given language in a doc.
func docBlock(t *testing.T, path, lang string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	_, rest, ok := strings.Cut(string(b), "```"+lang+"\n")
	block, _, ok2 := strings.Cut(rest, "```")
	if !ok || !ok2 {
		t.Fatalf("%s has no ```%s block", path, lang)
	}
	return block
}

// The ACL in docs/broker-security.md, run by a real Mosquitto: the agent
// publishes its topics and takes commands from the bridge; the bridge
// cannot fake an alarm, and the agent cannot command itself.
func TestDocumentedACL(t *testing.T) {
	acl := docBlock(t, "../../docs/broker-security.md", "acl")
	b := brokertest.Start(t, brokertest.Options{ACL: acl,
		Users: map[string]string{"agent-p492b": "agent-secret", "scada-bridge": "bridge-secret"}})
	sub := b.Subscribe(t, "auscult/#", brokertest.SubOptions{QoS: 1, User: "scada-bridge", Password: "bridge-secret"})
	var notify func()
	st := agentStore(t, &notify)
	st.AppendEvent(alarmEvent(0, "alarm.raised"))
	d := &desk{active: true}
	r, _ := startPublisher(t, publish.Config{URLs: []string{b.URL}, Username: "agent-p492b", Password: "agent-secret",
		Commands: true}, st, d, &notify)
	if _, ok := sub.WaitFor(2, 10*time.Second); !ok { // status and the alarm
		t.Fatalf("the agent's messages did not pass the ACL:\n%s", b.Log())
	}
	client := func(user, pass string) mqtt.Client {
		c := mqtt.NewClient(mqtt.NewClientOptions().AddBroker(b.URL).SetClientID(user + "-probe").SetUsername(user).SetPassword(pass))
		if tok := c.Connect(); !tok.WaitTimeout(5*time.Second) || tok.Error() != nil {
			t.Fatalf("%s: %v", user, tok.Error())
		}
		t.Cleanup(func() { c.Disconnect(100) })
		return c
	}
	bridge := client("scada-bridge", "bridge-secret")
	// Forbidden: the bridge fakes an alarm; the agent's user commands it.
	bridge.Publish("auscult/obrinvale/P-492B/alarm", 1, false, `{"fake":true}`).Wait()
	client("agent-p492b", "agent-secret").Publish("auscult/obrinvale/P-492B/command", 1, false,
		`{"schema":1,"request_id":"self-1","action":"acknowledge","by":"agent","issued":"`+publish.Stamp(time.Now())+`"}`).Wait()
	// Allowed: the bridge acknowledges.
	bridge.Publish("auscult/obrinvale/P-492B/command", 1, false,
		`{"schema":1,"request_id":"desk-1","action":"acknowledge","by":"m.okafor","issued":"`+publish.Stamp(time.Now())+`"}`).Wait()
	msgs, ok := sub.WaitFor(4, 10*time.Second) // + the bridge's command and the response
	if !ok {
		t.Fatalf("no response to the bridge's command: %d messages\n%s", len(msgs), b.Log())
	}
	time.Sleep(300 * time.Millisecond)
	for _, m := range sub.Messages() {
		if strings.Contains(string(m.Payload), "fake") || strings.Contains(string(m.Payload), "self-1") {
			t.Errorf("a forbidden publish got through: %s %s", m.Topic, m.Payload)
		}
	}
	d.mu.Lock()
	calls := strings.Join(d.calls, "; ")
	d.mu.Unlock()
	if calls != "ack m.okafor" {
		t.Errorf("operator calls %q, want only the bridge's acknowledge", calls)
	}
	if !strings.Contains(b.Log(), "Denied PUBLISH") {
		t.Errorf("the broker log shows no denied publish:\n%s", b.Log())
	}
	r.stop()
}
