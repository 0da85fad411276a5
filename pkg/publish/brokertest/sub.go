package brokertest

import (
	"bufio"
	"bytes"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"syscall"
	"testing"
	"time"
)

// SubOptions chooses how Subscribe's mosquitto_sub connects.
type SubOptions struct {
	// ClientID is the MQTT client identifier; empty picks a unique one.
	ClientID string
	// Persistent asks the broker to keep the session (subscription and
	// queued QoS 1 and 2 messages) while the client is disconnected
	// (mosquitto_sub -c). It needs ClientID.
	Persistent bool
	// QoS is the subscription's maximum quality of service, 0 to 2.
	QoS int
	// User and Password are sent when User is not empty.
	User, Password string
	// UseClientCert presents the broker's ClientCertFile on a TLS listener.
	UseClientCert bool
}

// Message is one message mosquitto_sub printed.
type Message struct {
	// Topic is the topic the message was published to.
	Topic string
	// Payload is the payload, byte for byte.
	Payload []byte
	// QoS is the quality of service the message was delivered with.
	QoS int
	// Retained is the RETAIN flag as delivered: true for a retained
	// message sent because a subscription was made, false for one that
	// matched an existing subscription.
	Retained bool
}

// Sub is a running mosquitto_sub started by Subscribe. Its methods may be
// called from any goroutine.
type Sub struct {
	b      *Broker
	id     string
	cmd    *exec.Cmd
	done   chan struct{} // closed when the output is read and cmd has exited
	stderr lockedBuffer

	mu      sync.Mutex
	msgs    []Message
	subacks int           // SUBACKs granting the subscription
	refused bool          // a SUBACK refused it (granted 128)
	debug   []string      // mosquitto_sub's last debug lines
	changed chan struct{} // closed and replaced whenever the fields above change
}

// msgTag starts the lines mosquitto_sub prints for messages (-F), which
// separates them from its debug lines (-d).
const msgTag = "brokertest-msg\t"

// subCount numbers the client identifiers Subscribe picks.
var subCount atomic.Int64

// Subscribe runs mosquitto_sub (Debian package mosquitto-clients), a client
// this project did not write, subscribed to topic on the broker's MQTT
// listener, and returns once the broker has acknowledged the subscription.
// The test skips when mosquitto_sub is missing (fails with CI=true), and
// fails if the client exits, is refused, or is not subscribed within 5 s.
// The client is stopped when the test ends.
//
// mosquitto_sub reconnects by itself, about once a second, when the broker
// goes away, and subscribes again on every connection; Subscribed counts
// those acknowledgements.
func (b *Broker) Subscribe(t testing.TB, topic string, opt SubOptions) *Sub {
	t.Helper()
	bin := findBinary(t, "mosquitto_sub", "mosquitto-clients", "/usr/bin/mosquitto_sub")
	// mosquitto_sub flushes its standard output after each message but not
	// after its debug lines; stdbuf (coreutils) makes it line-buffered so
	// the SUBACK line is seen when it happens.
	stdbuf := findBinary(t, "stdbuf", "coreutils", "/usr/bin/stdbuf")
	if opt.Persistent && opt.ClientID == "" {
		t.Fatal("brokertest: Subscribe: Persistent needs a ClientID")
	}
	id := opt.ClientID
	if id == "" {
		id = fmt.Sprintf("brokertest-sub-%d", subCount.Add(1))
	}
	args := []string{"-oL", bin, "-d", "-h", "127.0.0.1", "-p", strconv.Itoa(b.ports[0]),
		"-i", id, "-q", strconv.Itoa(opt.QoS), "-t", topic,
		"-F", msgTag + "%r\t%q\t%x\t%t"}
	if opt.Persistent {
		args = append(args, "-c")
	}
	if opt.User != "" {
		args = append(args, "-u", opt.User, "-P", opt.Password)
	}
	if b.opt.TLS {
		args = append(args, "--cafile", b.CAFile)
		if opt.UseClientCert {
			args = append(args, "--cert", b.ClientCertFile, "--key", b.ClientKeyFile)
		}
	}
	s := &Sub{b: b, id: id, changed: make(chan struct{}), done: make(chan struct{})}
	s.cmd = exec.Command(stdbuf, args...)
	// mosquitto_sub reads default options from $XDG_CONFIG_HOME/mosquitto_sub;
	// pointing it at the broker's folder keeps a developer's file out.
	s.cmd.Env = append(os.Environ(), "XDG_CONFIG_HOME="+b.Dir)
	s.cmd.Stderr = &s.stderr
	s.cmd.SysProcAttr = &syscall.SysProcAttr{Pdeathsig: syscall.SIGKILL}
	out, err := s.cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := s.cmd.Start(); err != nil {
		t.Fatalf("brokertest: mosquitto_sub: %v", err)
	}
	go s.read(out)
	t.Cleanup(s.Stop)
	if !s.WaitSubscribed(1, waitLimit) {
		s.Stop()
		t.Fatalf("brokertest: mosquitto_sub %s was not subscribed to %q within %v%s", id, topic, waitLimit, s.report())
	}
	return s
}

// read parses mosquitto_sub's output until it ends, then waits for the
// process and closes s.done.
func (s *Sub) read(out io.Reader) {
	sc := bufio.NewScanner(out)
	sc.Buffer(make([]byte, 64*1024), 64<<20)
	for sc.Scan() {
		s.parse(sc.Text())
	}
	s.cmd.Wait()
	close(s.done)
	s.notify()
}

// parse takes in one line of mosquitto_sub's output.
func (s *Sub) parse(line string) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if rest, ok := strings.CutPrefix(line, msgTag); ok {
		f := strings.SplitN(rest, "\t", 4)
		if len(f) == 4 {
			payload, err := hex.DecodeString(f[2])
			qos, _ := strconv.Atoi(f[1])
			if err == nil {
				s.msgs = append(s.msgs, Message{Topic: f[3], Payload: payload, QoS: qos, Retained: f[0] == "1"})
				s.wake()
				return
			}
		}
	}
	s.debug = append(s.debug, line)
	if len(s.debug) > 50 {
		s.debug = s.debug[1:]
	}
	// mosquitto_sub prints "Subscribed (mid: 1): 1" on a SUBACK, with the
	// granted QoS; 128 means the broker refused the subscription.
	if rest, ok := strings.CutPrefix(line, "Subscribed (mid: "); ok {
		if _, granted, ok := strings.Cut(rest, "): "); ok && strings.TrimSpace(granted) == "128" {
			s.refused = true
		} else {
			s.subacks++
		}
	}
	s.wake()
}

// wake tells waiters that something changed; s.mu must be held.
func (s *Sub) wake() {
	close(s.changed)
	s.changed = make(chan struct{})
}

// notify is wake with the lock taken.
func (s *Sub) notify() {
	s.mu.Lock()
	s.wake()
	s.mu.Unlock()
}

// Messages returns a copy of every message received so far, in order of
// arrival.
func (s *Sub) Messages() []Message {
	s.mu.Lock()
	defer s.mu.Unlock()
	return append([]Message(nil), s.msgs...)
}

// WaitFor waits until at least n messages have been received or timeout
// passes, and returns a copy of the messages received and whether there
// are at least n.
func (s *Sub) WaitFor(n int, timeout time.Duration) ([]Message, bool) {
	s.until(timeout, func() bool { return len(s.msgs) >= n })
	msgs := s.Messages()
	return msgs, len(msgs) >= n
}

// Subscribed returns how many times the broker has acknowledged the
// subscription: once per connection, since mosquitto_sub subscribes again
// each time it reconnects.
func (s *Sub) Subscribed() int {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.subacks
}

// WaitSubscribed waits until the subscription has been acknowledged at least
// n times in all (see Subscribed) or timeout passes, and reports whether it
// has. It gives up early, reporting false, if the broker refuses the
// subscription or mosquitto_sub exits.
func (s *Sub) WaitSubscribed(n int, timeout time.Duration) bool {
	s.until(timeout, func() bool { return s.subacks >= n || s.refused })
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.subacks >= n
}

// until waits until cond, called with s.mu held, is true, mosquitto_sub has
// exited, or timeout passes.
func (s *Sub) until(timeout time.Duration, cond func() bool) {
	timer := time.NewTimer(timeout)
	defer timer.Stop()
	for {
		s.mu.Lock()
		ok, changed := cond(), s.changed
		s.mu.Unlock()
		if ok {
			return
		}
		select {
		case <-changed:
		case <-s.done:
			return
		case <-timer.C:
			return
		}
	}
}

// Pause freezes mosquitto_sub (SIGSTOP): it neither reads nor reconnects
// until Resume. Tests use it to publish while the subscriber is certainly
// disconnected, for example across a broker restart.
func (s *Sub) Pause() {
	s.cmd.Process.Signal(syscall.SIGSTOP)
}

// Resume lets a paused mosquitto_sub run again (SIGCONT). If its connection
// died meanwhile it reconnects after about a second.
func (s *Sub) Resume() {
	s.cmd.Process.Signal(syscall.SIGCONT)
}

// Stop ends mosquitto_sub and waits for it: SIGTERM, on which it sends
// DISCONNECT (a persistent session stays on the broker), then SIGKILL if it
// has not exited within 5 s. Messages stays readable. Stopping a stopped Sub
// does nothing.
func (s *Sub) Stop() {
	select {
	case <-s.done:
		return
	default:
	}
	s.cmd.Process.Signal(syscall.SIGTERM)
	s.cmd.Process.Signal(syscall.SIGCONT)
	select {
	case <-s.done:
	case <-time.After(waitLimit):
		s.cmd.Process.Kill()
		<-s.done
	}
}

// report describes the client's state for failure messages: its standard
// error, last debug lines and the broker's log.
func (s *Sub) report() string {
	s.mu.Lock()
	state := "running"
	select {
	case <-s.done:
		state = "exited: " + s.cmd.ProcessState.String()
	default:
	}
	if s.refused {
		state += "; the broker refused the subscription (granted QoS 128)"
	}
	text := fmt.Sprintf("\n--- mosquitto_sub (%s), standard error:\n%s--- its last debug lines:\n%s\n--- broker log:\n%s",
		state, s.stderr.String(), strings.Join(s.debug, "\n"), s.b.Log())
	s.mu.Unlock()
	return text
}

// lockedBuffer is a bytes.Buffer safe for one writer and other readers.
type lockedBuffer struct {
	mu  sync.Mutex
	buf bytes.Buffer
}

// Write appends p to the buffer.
func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.buf.Write(p)
}

// String returns the text written so far.
func (l *lockedBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.buf.String()
}
