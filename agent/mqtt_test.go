package main

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"os/exec"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	mqtt "github.com/eclipse/paho.mqtt.golang"

	"github.com/auscult/auscult/pkg/publish"
	"github.com/auscult/auscult/pkg/publish/brokertest"
	"github.com/auscult/auscult/pkg/publish/schema"
	"github.com/auscult/auscult/pkg/store"
)

// feedRate is how many seconds of sound the tests push per second: the
// agent reads stdin as fast as it comes, so this sets its pace.
const feedRate = 20

// skidScript is minutes of simulated pump sound with faults coming and
// going, for seed 3 (the shared skid's machine).
func skidScript(t *testing.T, cycles int) []byte {
	t.Helper()
	var parts []string
	faults := []string{"bearing_outer", "cavitation", "impeller_damage", "leak"}
	for i := range cycles {
		parts = append(parts, "healthy@60s", faults[i%len(faults)]+"/severe@60s")
	}
	parts = append(parts, "healthy@90s")
	r := mustRun(t, "simulate", "--seed", "3", "--snr", "6", "--script", strings.Join(parts, ","))
	return []byte(r.stdout)
}

// mqttConfig writes an agent config that reads stdin and publishes to url,
// with one-minute summaries and a short reconnect back-off.
func mqttConfig(t *testing.T, baselinePath, url string) (cfg, logPath string) {
	t.Helper()
	cfg, logPath = writeConfig(t, baselinePath, "  kind: stdin")
	text := readFile(t, cfg)
	text = []byte(strings.Replace(string(text), "log:\n", "log:\n  summary_min: 1\n", 1))
	text = append(text, fmt.Sprintf("mqtt:\n  url: %s\n  reconnect_min_s: 0.2\n  reconnect_max_s: 1\n  keepalive_s: 5\n", url)...)
	if err := os.WriteFile(cfg, text, 0o644); err != nil {
		t.Fatal(err)
	}
	return cfg, logPath
}

// feeder is an agent process reading paced sound from its stdin.
type feeder struct {
	p       *process
	stdin   io.WriteCloser
	mu      sync.Mutex // guards fed
	fed     time.Duration
	stopped chan struct{}
}

func startFed(t *testing.T, cfgPath string, sound []byte) *feeder {
	t.Helper()
	return startFedArgs(t, cfgPath, sound, false, "--clock", "samples")
}

// startFedArgs is startFed with other run options; keepOpen leaves stdin
// open after the sound, so the agent keeps running (serving its pages).
func startFedArgs(t *testing.T, cfgPath string, sound []byte, keepOpen bool, args ...string) *feeder {
	t.Helper()
	cmd := exec.Command(agentBinary(t), append([]string{"run", "--config", cfgPath}, args...)...)
	p := &process{cmd: cmd, done: make(chan error, 1)}
	stdin, err := cmd.StdinPipe()
	if err != nil {
		t.Fatal(err)
	}
	stderr, _ := cmd.StderrPipe()
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() {
		sc := bufio.NewScanner(stderr)
		for sc.Scan() {
			p.mu.Lock()
			p.lines = append(p.lines, sc.Text())
			p.mu.Unlock()
		}
		p.done <- cmd.Wait()
	}()
	t.Cleanup(func() { cmd.Process.Kill() })
	f := &feeder{p: p, stdin: stdin, stopped: make(chan struct{})}
	go func() {
		defer close(f.stopped)
		const chunk = 16000 * 2 / 4 // a quarter second at 16 kHz, 16-bit
		tick := time.NewTicker(time.Second / (4 * feedRate))
		defer tick.Stop()
		for off := 0; off < len(sound); off += chunk {
			<-tick.C
			if _, err := stdin.Write(sound[off:min(off+chunk, len(sound))]); err != nil {
				return // the agent was killed
			}
			f.mu.Lock()
			f.fed += time.Second / 4
			f.mu.Unlock()
		}
		if !keepOpen {
			stdin.Close()
		}
	}()
	return f
}

// collected is what the bridge's mosquitto_sub got, decoded.
type collected struct {
	stream map[uint64]json.RawMessage // by seq, first copy
	order  []uint64                   // seqs of the event stream, first copies, in arrival order
	events map[uint64]uint64          // event_seq -> message seq
	status []publish.Status
	dups   int
}

func collect(t *testing.T, msgs []brokertest.Message) collected {
	t.Helper()
	c := collected{stream: map[uint64]json.RawMessage{}, events: map[uint64]uint64{}}
	for _, m := range msgs {
		var env struct {
			publish.Envelope
			EventSeq uint64 `json:"event_seq"`
		}
		if err := json.Unmarshal(m.Payload, &env); err != nil {
			t.Fatalf("%s: not JSON: %s", m.Topic, m.Payload)
		}
		if err := schema.Validate(env.Kind, m.Payload); err != nil {
			t.Errorf("%s: %v\n%s", m.Topic, err, m.Payload)
		}
		if env.Kind == publish.KindStatus {
			var s publish.Status
			json.Unmarshal(m.Payload, &s)
			c.status = append(c.status, s)
			continue
		}
		if _, dup := c.stream[env.Seq]; dup {
			c.dups++
			continue
		}
		c.stream[env.Seq] = m.Payload
		c.order = append(c.order, env.Seq)
		if env.EventSeq > 0 {
			c.events[env.EventSeq] = env.Seq
		}
	}
	return c
}

// checkDelivered: every event in the agent's log reached the bridge, and
// the event stream arrived in sequence order.
func checkDelivered(t *testing.T, c collected, logPath string) []store.Event {
	t.Helper()
	st := openLogReadOnly(t, logPath)
	evs, err := st.Events(store.EventQuery{})
	if err != nil {
		t.Fatal(err)
	}
	missing := 0
	for _, e := range evs {
		if _, ok := c.events[e.Seq]; !ok {
			missing++
			if missing <= 5 {
				t.Errorf("event %d %s (%s) never reached the bridge", e.Seq, e.Code, e.Time.Format(time.RFC3339))
			}
		}
	}
	for i := 1; i < len(c.order); i++ {
		if c.order[i] < c.order[i-1] {
			t.Errorf("message %d arrived after %d", c.order[i], c.order[i-1])
		}
	}
	if missing > 0 {
		t.Errorf("%d of %d logged events missing at the bridge", missing, len(evs))
	}
	return evs
}

func countChanges(c collected, seqs []uint64, change string) int {
	n := 0
	for _, s := range seqs {
		var a publish.Alarm
		if json.Unmarshal(c.stream[s], &a) == nil && a.Kind == publish.KindAlarm && a.Change == change {
			n++
		}
	}
	return n
}

// The whole agent publishes to a real Mosquitto; the SCADA side is Debian's
// mosquitto_sub. The broker is stopped for 32 s while simulated faults
// raise and clear alarms; after it returns every logged event arrives, in
// order, with only duplicates of already seen numbers. Then a SIGKILL
// leaves the offline will on the status topic.
func TestRunBrokerOutage(t *testing.T) {
	agentBinary(t) // skips in -short mode before the slow set-up
	s := simulateSkid(t)
	sound := skidScript(t, 8) // 17.5 minutes of sound: 52 s at feedRate
	b := brokertest.Start(t, brokertest.Options{Persistence: true})
	sub := b.Subscribe(t, "auscult/obrinvale/P-492B/#", brokertest.SubOptions{ClientID: "scada-bridge", Persistent: true, QoS: 1})
	cfg, logPath := mqttConfig(t, s.baseline, b.URL)
	f := startFed(t, cfg, sound)
	f.p.waitFor(t, "connected to the broker", 20*time.Second)
	// Wait for the first alarm at the bridge, then take the broker away.
	for end := time.Now().Add(20 * time.Second); ; time.Sleep(100 * time.Millisecond) {
		if countChanges(collect(t, sub.Messages()), collect(t, sub.Messages()).order, "raised") > 0 {
			break
		}
		if time.Now().After(end) {
			t.Fatalf("no alarm at the bridge within 20 s:\n%s", f.p.log())
		}
	}
	before := collect(t, sub.Messages())
	b.Stop()
	outage := time.Now()
	time.Sleep(32 * time.Second)
	b.Start()
	t.Logf("broker down for %v", time.Since(outage).Round(time.Millisecond))
	select {
	case err := <-f.p.done:
		if err != nil {
			t.Fatalf("agent: %v\n%s", err, f.p.log())
		}
	case <-time.After(90 * time.Second):
		t.Fatalf("agent still running 90 s after the outage:\n%s", f.p.log())
	}
	// The agent waits for an empty outbox only briefly at its end; the
	// bridge may still be reconnecting: give it time.
	time.Sleep(2 * time.Second)
	after := collect(t, sub.Messages())
	evs := checkDelivered(t, after, logPath)
	var fresh []uint64
	for _, s := range after.order {
		if _, ok := before.stream[s]; !ok {
			fresh = append(fresh, s)
		}
	}
	raised, cleared := countChanges(after, fresh, "raised"), countChanges(after, fresh, "cleared")
	if raised == 0 || cleared == 0 {
		t.Errorf("after the outage began: %d raises and %d clears reached the bridge; the script should give both", raised, cleared)
	}
	summaries := 0
	for _, s := range after.order {
		if strings.Contains(string(after.stream[s]), `"kind":"summary"`) {
			summaries++
		}
	}
	if summaries < 15 {
		t.Errorf("%d summaries for 17 minutes of sound with one-minute summaries", summaries)
	}
	t.Logf("%d events logged, %d messages at the bridge (%d duplicates), %d summaries, %d raises and %d clears after the outage began",
		len(evs), len(after.order), after.dups, summaries, raised, cleared)
}

// Killed with SIGKILL while the broker is away, then started again: the
// messages the first process queued arrive from the second. A SIGKILL
// while connected leaves the retained offline will.
func TestRunCrashDuringOutage(t *testing.T) {
	agentBinary(t)
	s := simulateSkid(t)
	sound := skidScript(t, 3)
	b := brokertest.Start(t, brokertest.Options{Persistence: true})
	sub := b.Subscribe(t, "auscult/obrinvale/P-492B/#", brokertest.SubOptions{ClientID: "scada-bridge", Persistent: true, QoS: 1})
	cfg, logPath := mqttConfig(t, s.baseline, b.URL)

	// A connected agent killed: the broker publishes its will.
	f := startFed(t, cfg, sound)
	f.p.waitFor(t, "connected to the broker", 20*time.Second)
	f.p.cmd.Process.Signal(syscall.SIGKILL)
	<-f.p.done
	for end := time.Now().Add(10 * time.Second); ; time.Sleep(100 * time.Millisecond) {
		st := collect(t, sub.Messages()).status
		if len(st) > 0 && st[len(st)-1].State == "offline" && st[len(st)-1].Reason == publish.ReasonLost {
			break
		}
		if time.Now().After(end) {
			t.Fatalf("no offline will within 10 s of the kill; statuses: %+v", st)
		}
	}

	// Killed during an outage, after it queued alarms.
	b.Stop()
	f = startFed(t, cfg, sound)
	f.p.waitFor(t, ".raised seq=", 60*time.Second)
	time.Sleep(12 * time.Second) // four more minutes of sound: a clear, summaries, the next fault
	f.p.cmd.Process.Signal(syscall.SIGKILL)
	<-f.p.done
	st := openLogReadOnly(t, logPath)
	ob, err := st.OutboxStats()
	st.Close()
	if err != nil || ob.Depth < 5 {
		t.Fatalf("too little queued at the kill to test anything: %+v, %v", ob, err)
	}
	queued := ob.Depth
	b.Start()
	f = startFed(t, cfg, sound[:16000*2*30]) // half a minute more, then the end
	select {
	case err := <-f.p.done:
		if err != nil {
			t.Fatalf("restarted agent: %v\n%s", err, f.p.log())
		}
	case <-time.After(60 * time.Second):
		t.Fatalf("restarted agent still running:\n%s", f.p.log())
	}
	time.Sleep(2 * time.Second)
	c := collect(t, sub.Messages())
	evs := checkDelivered(t, c, logPath)
	t.Logf("%d messages queued at the kill; %d events logged across three runs, %d messages at the bridge (%d duplicates)",
		queued, len(evs), len(c.order), c.dups)
}

// runTimed runs the agent on sound from stdin as fast as it reads, and
// returns the wall time from start to exit, the time its analysis took
// (from its "listening" line to its "analysis ended" line) and the windows
// it decided.
func runTimed(t *testing.T, cfgPath string, sound []byte) (total, analysis time.Duration, windows string) {
	t.Helper()
	cmd := exec.Command(agentBinary(t), "run", "--config", cfgPath, "--clock", "samples")
	cmd.Stdin = strings.NewReader(string(sound))
	var stderr strings.Builder
	cmd.Stderr = &stderr
	start := time.Now()
	done := make(chan error, 1)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() { done <- cmd.Wait() }()
	select {
	case err := <-done:
		if err != nil {
			t.Fatalf("agent: %v\n%s", err, stderr.String())
		}
	case <-time.After(3 * time.Minute):
		cmd.Process.Kill()
		t.Fatalf("agent still running after 3 minutes: publishing blocked the pipeline?\n%s", stderr.String())
	}
	total = time.Since(start)
	var from, to time.Time
	for _, l := range strings.Split(stderr.String(), "\n") {
		a := slogAttrs(l)
		at, _ := time.Parse(time.RFC3339Nano, a["time"])
		switch a["msg"] {
		case "listening":
			from = at
		case "analysis ended":
			to, windows = at, a["windows"]
		}
	}
	if from.IsZero() || to.IsZero() {
		t.Fatalf("no listening or analysis ended line:\n%s", stderr.String())
	}
	return total, to.Sub(from), windows
}

// A broker that hangs (SIGSTOP: connections open, nothing answered) does
// not slow the audio pipeline: the agent decides every window of the
// sound, ends, and leaves what it could not send in the outbox.
func TestRunWithStalledBroker(t *testing.T) {
	agentBinary(t)
	s := simulateSkid(t)
	sound := skidScript(t, 3)
	plain, plainLog := writeConfig(t, s.baseline, "  kind: stdin")
	_ = plainLog
	_, alone, windows := runTimed(t, plain, sound)

	b := brokertest.Start(t, brokertest.Options{})
	cfg, logPath := mqttConfig(t, s.baseline, b.URL)
	f := startFed(t, cfg, nil) // connect first, with no sound yet
	f.p.waitFor(t, "connected to the broker", 20*time.Second)
	f.p.cmd.Process.Signal(syscall.SIGTERM)
	<-f.p.done
	b.Pause()
	defer b.Resume()
	total, stalled, windows2 := runTimed(t, cfg, sound)
	if windows == "" || windows2 != windows {
		t.Errorf("windows decided: %q alone, %q with a stalled broker", windows, windows2)
	}
	st := openLogReadOnly(t, logPath)
	ob, _ := st.OutboxStats()
	evs, _ := st.Events(store.EventQuery{})
	if ob.Depth == 0 {
		t.Errorf("nothing left in the outbox after a run against a hung broker (%d events logged)", len(evs))
	}
	t.Logf("%s windows analysed in %v without a broker, %v with a hung one (ratio %.2f); the run with the hung broker took %v from start to exit; %d messages left queued",
		windows, alone.Round(time.Millisecond), stalled.Round(time.Millisecond), stalled.Seconds()/alone.Seconds(), total.Round(time.Millisecond), ob.Depth)
}

// The bridge acknowledges a real alarm through the command topic: the
// monitor's alarm goes to ACKED, the alarm topic says so, and the response
// is ok; acknowledging again is refused with a reason.
func TestRunAnswersCommands(t *testing.T) {
	agentBinary(t)
	s := simulateSkid(t)
	sound := skidScript(t, 2)
	b := brokertest.Start(t, brokertest.Options{})
	sub := b.Subscribe(t, "auscult/obrinvale/P-492B/#", brokertest.SubOptions{QoS: 1})
	cfg, _ := mqttConfig(t, s.baseline, b.URL)
	f := startFed(t, cfg, sound)
	f.p.waitFor(t, ".raised seq=", 60*time.Second)
	bridge := mqtt.NewClient(mqtt.NewClientOptions().AddBroker(b.URL).SetClientID("scada-bridge"))
	if tok := bridge.Connect(); !tok.WaitTimeout(5*time.Second) || tok.Error() != nil {
		t.Fatal(tok.Error())
	}
	defer bridge.Disconnect(100)
	ack := func(id string) {
		bridge.Publish("auscult/obrinvale/P-492B/command", 1, false, fmt.Sprintf(
			`{"schema":1,"request_id":%q,"action":"acknowledge","by":"m.okafor","issued":%q}`, id, publish.Stamp(time.Now()))).Wait()
	}
	ack("desk-1")
	ack("desk-2")
	var responses []publish.Response
	var acked []publish.Alarm
	for end := time.Now().Add(15 * time.Second); time.Now().Before(end) && (len(responses) < 2 || len(acked) == 0); time.Sleep(100 * time.Millisecond) {
		responses, acked = nil, nil
		for _, m := range sub.Messages() {
			if err := schema.Validate(m.Topic[strings.LastIndexByte(m.Topic, '/')+1:], m.Payload); err != nil {
				t.Fatalf("%s: %v", m.Topic, err)
			}
			switch {
			case strings.HasSuffix(m.Topic, "/response"):
				var r publish.Response
				json.Unmarshal(m.Payload, &r)
				responses = append(responses, r)
			case strings.HasSuffix(m.Topic, "/alarm"):
				var a publish.Alarm
				json.Unmarshal(m.Payload, &a)
				if a.Change == "acknowledged" {
					acked = append(acked, a)
				}
			}
		}
	}
	if len(responses) != 2 || !responses[0].OK || responses[0].RequestID != "desk-1" || responses[1].OK ||
		responses[1].Error == nil || responses[1].Error.Code != publish.CodeRefused {
		t.Fatalf("responses %+v", responses)
	}
	if len(acked) != 1 || acked[0].State != "ACKED" && acked[0].State != "NORM" || acked[0].By != "m.okafor" {
		t.Errorf("acknowledged alarm messages %+v", acked)
	}
	t.Logf("second acknowledge refused: %s", responses[1].Error.Message)
	f.p.cmd.Process.Signal(syscall.SIGTERM)
	<-f.p.done
	if !strings.Contains(f.p.log(), `msg="command carried out" asset=P-492B part=mqtt request_id=desk-1`) {
		t.Errorf("the agent's log does not record the command:\n%s", f.p.log())
	}
}
