package brokertest

import (
	"fmt"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"syscall"
	"testing"
	"time"
)

// waitLimit bounds every wait of the harness: the broker coming up or going
// down, a subscription being acknowledged.
const waitLimit = 5 * time.Second

// Options chooses what the broker started by Start offers. The zero value is
// a plain MQTT listener that lets anonymous clients do anything.
type Options struct {
	// TLS makes the listener (and the WebSockets listener, if any) speak
	// TLS with certificates generated for the test: the Broker's CAFile,
	// ClientCertFile and ClientKeyFile name them.
	TLS bool
	// RequireClientCert makes a TLS listener refuse clients that present no
	// certificate signed by the test CA. It needs TLS.
	RequireClientCert bool
	// Users, when not empty, maps user names to passwords; they are written
	// with mosquitto_passwd and anonymous clients are refused.
	Users map[string]string
	// ACL, when not empty, is the text of a Mosquitto acl_file.
	ACL string
	// Persistence keeps sessions, subscriptions and queued messages in a
	// database in Dir; Mosquitto writes it when stopped cleanly (Stop), so
	// they survive Stop and Start but not Kill.
	Persistence bool
	// WebSockets adds a second listener that carries MQTT over WebSockets.
	// Debian's mosquitto 2.0.11 supports it, but that listener binds every
	// interface (IPv4 and IPv6) whatever address its listener line names.
	WebSockets bool
	// Extra is added to the generated configuration before the listeners
	// (global settings such as max_queued_messages).
	Extra string
}

// Broker is a Mosquitto process started by Start for one test. Its methods
// must be called from the test's goroutine.
type Broker struct {
	// URL is the MQTT listener in paho's form: tcp://127.0.0.1:PORT, or
	// ssl://127.0.0.1:PORT with TLS.
	URL string
	// WSURL is the WebSockets listener, ws://127.0.0.1:PORT/ (wss:// with
	// TLS), or empty without Options.WebSockets.
	WSURL string
	// Dir is the broker's own temporary folder: configuration, log,
	// password and ACL files, certificates and persistence database.
	Dir string
	// CAFile is the PEM certificate of the test CA (TLS only).
	CAFile string
	// ServerName is a DNS name the server certificate holds (TLS only). The
	// certificate also holds IP address 127.0.0.1, so a tls.Config whose
	// ServerName is left empty verifies against the URL's host as well.
	ServerName string
	// ClientCertFile and ClientKeyFile are the PEM certificate and PKCS #8
	// key of a client signed by the test CA, common name "test-client"
	// (TLS only).
	ClientCertFile, ClientKeyFile string

	t       testing.TB
	opt     Options
	bin     string
	conf    string
	logFile string
	outFile string
	ports   []int
	cmd     *exec.Cmd
	done    chan struct{} // closed when cmd has exited
}

// Start runs Mosquitto (found on PATH, else /usr/sbin/mosquitto, Debian's
// mosquitto package) on free 127.0.0.1 ports with a configuration built from
// opt, and returns once every listener is open. The test skips
// when Mosquitto is missing, or fails when the environment has CI=true. The
// broker is killed when the test ends.
func Start(t testing.TB, opt Options) *Broker {
	t.Helper()
	b := &Broker{t: t, opt: opt, Dir: t.TempDir()}
	b.bin = findBinary(t, "mosquitto", "mosquitto", "/usr/sbin/mosquitto")
	if opt.RequireClientCert && !opt.TLS {
		t.Fatal("brokertest: RequireClientCert needs TLS")
	}
	b.ports = freePorts(t, 1+btoi(opt.WebSockets))
	scheme, ws := "tcp", "ws"
	if opt.TLS {
		scheme, ws = "ssl", "wss"
		files, err := writeCerts(b.Dir)
		if err != nil {
			t.Fatalf("brokertest: certificates: %v", err)
		}
		b.CAFile, b.ClientCertFile, b.ClientKeyFile = files.ca, files.clientCert, files.clientKey
		b.ServerName = "localhost"
	}
	b.URL = fmt.Sprintf("%s://127.0.0.1:%d", scheme, b.ports[0])
	if opt.WebSockets {
		b.WSURL = fmt.Sprintf("%s://127.0.0.1:%d/", ws, b.ports[1])
	}
	b.writeConfig()
	t.Cleanup(b.Kill)
	b.Start()
	return b
}

// writeConfig writes the password, ACL and configuration files into Dir.
func (b *Broker) writeConfig() {
	t := b.t
	t.Helper()
	b.conf = filepath.Join(b.Dir, "mosquitto.conf")
	b.logFile = filepath.Join(b.Dir, "mosquitto.log")
	b.outFile = filepath.Join(b.Dir, "mosquitto.out")
	var c strings.Builder
	// Run as root, Mosquitto would switch to user "mosquitto", who cannot
	// read the test's 0700 temporary folder; as another user it ignores
	// this line.
	c.WriteString("user root\n")
	fmt.Fprintf(&c, "log_dest file %s\nlog_type all\nlog_timestamp_format %%Y-%%m-%%dT%%H:%%M:%%S\n", b.logFile)
	if len(b.opt.Users) > 0 {
		pw := filepath.Join(b.Dir, "passwd")
		writePasswords(t, pw, b.opt.Users)
		fmt.Fprintf(&c, "allow_anonymous false\npassword_file %s\n", pw)
	} else {
		c.WriteString("allow_anonymous true\n")
	}
	if b.opt.ACL != "" {
		acl := filepath.Join(b.Dir, "acl")
		if err := os.WriteFile(acl, []byte(b.opt.ACL), 0o600); err != nil {
			t.Fatal(err)
		}
		fmt.Fprintf(&c, "acl_file %s\n", acl)
	}
	if b.opt.Persistence {
		fmt.Fprintf(&c, "persistence true\npersistence_location %s/\n", b.Dir)
	} else {
		c.WriteString("persistence false\n")
	}
	if b.opt.Extra != "" {
		c.WriteString(strings.TrimSpace(b.opt.Extra) + "\n")
	}
	for i, port := range b.ports {
		fmt.Fprintf(&c, "\nlistener %d 127.0.0.1\n", port)
		if i == 1 {
			c.WriteString("protocol websockets\n")
		}
		if b.opt.TLS {
			fmt.Fprintf(&c, "cafile %s\ncertfile %s\nkeyfile %s\nrequire_certificate %t\n",
				b.CAFile, filepath.Join(b.Dir, "server.pem"), filepath.Join(b.Dir, "server-key.pem"), b.opt.RequireClientCert)
		}
	}
	if err := os.WriteFile(b.conf, []byte(c.String()), 0o600); err != nil {
		t.Fatal(err)
	}
}

// writePasswords makes a Mosquitto password file with mosquitto_passwd -b,
// the tool of Debian's mosquitto package.
func writePasswords(t testing.TB, path string, users map[string]string) {
	t.Helper()
	bin := findBinary(t, "mosquitto_passwd", "mosquitto", "/usr/bin/mosquitto_passwd")
	names := make([]string, 0, len(users))
	for n := range users {
		names = append(names, n)
	}
	sort.Strings(names)
	for i, n := range names {
		args := []string{"-b", path, n, users[n]}
		if i == 0 {
			args = append([]string{"-c"}, args...)
		}
		if out, err := exec.Command(bin, args...).CombinedOutput(); err != nil {
			t.Fatalf("brokertest: mosquitto_passwd %s: %v\n%s", n, err, out)
		}
	}
}

// Start runs the broker again after Stop or Kill, on the same ports and with
// the same configuration, and returns once every listener is open. While a
// port is still busy it retries for up to 5 s. The test fails if the broker
// does not come up.
func (b *Broker) Start() {
	t := b.t
	t.Helper()
	if b.running() {
		t.Fatal("brokertest: Start: the broker is already running")
	}
	deadline := time.Now().Add(waitLimit)
	for {
		logAt, outAt := fileSize(b.logFile), fileSize(b.outFile)
		err := b.launch(logAt, deadline)
		if err == nil {
			return
		}
		// A busy MQTT port is "Address already in use", a busy WebSockets
		// port "Unable to create websockets listener".
		fresh := tail(b.logFile, logAt) + tail(b.outFile, outAt)
		busy := strings.Contains(fresh, "Address already in use") || strings.Contains(fresh, "Unable to create websockets listener")
		if !busy || time.Now().After(deadline) {
			t.Fatalf("brokertest: mosquitto: %v\n%s", err, b.Log())
		}
		time.Sleep(100 * time.Millisecond)
	}
}

// launch starts the process and waits until its log, from byte logAt on,
// says it is running, it exits, or the deadline passes. Mosquitto logs
// "mosquitto version ... running" once every listener is open; unlike a
// test connection, which another process holding the port could answer,
// the line is certain to come from this broker.
func (b *Broker) launch(logAt int64, deadline time.Time) error {
	out, err := os.OpenFile(b.outFile, os.O_CREATE|os.O_WRONLY|os.O_APPEND, 0o600)
	if err != nil {
		return err
	}
	defer out.Close()
	cmd := exec.Command(b.bin, "-c", b.conf)
	cmd.Stdout, cmd.Stderr = out, out
	// Should the test binary die without its cleanups, the broker dies too.
	cmd.SysProcAttr = &syscall.SysProcAttr{Pdeathsig: syscall.SIGKILL}
	if err := cmd.Start(); err != nil {
		return err
	}
	done := make(chan struct{})
	go func() { cmd.Wait(); close(done) }()
	b.cmd, b.done = cmd, done
	for {
		for _, line := range strings.Split(tail(b.logFile, logAt), "\n") {
			if strings.Contains(line, ": mosquitto version ") && strings.HasSuffix(line, " running") {
				return nil
			}
		}
		select {
		case <-done:
			return fmt.Errorf("exited (%v) before it was running", cmd.ProcessState)
		case <-time.After(20 * time.Millisecond):
		}
		if time.Now().After(deadline) {
			b.signal(syscall.SIGKILL)
			return fmt.Errorf("not running after %v", waitLimit)
		}
	}
}

// Stop sends the broker SIGTERM and waits until it has exited; with
// Persistence, Mosquitto writes its database first. Stopping a stopped
// broker does nothing.
func (b *Broker) Stop() {
	b.t.Helper()
	if !b.signal(syscall.SIGTERM) {
		b.t.Errorf("brokertest: mosquitto did not stop within %v on SIGTERM; killed\n%s", waitLimit, b.Log())
		b.signal(syscall.SIGKILL)
	}
}

// Kill sends the broker SIGKILL and waits until it has exited: anything not
// yet written to the persistence database is lost. Killing a stopped broker
// does nothing.
func (b *Broker) Kill() {
	b.signal(syscall.SIGKILL)
}

// Pause freezes the broker (SIGSTOP): connections stay open and the
// kernel still accepts new ones, but nothing is answered, like a broker
// that hangs or a network that swallows packets. Resume undoes it; Stop
// and Kill resume it first.
func (b *Broker) Pause() {
	if b.running() {
		b.cmd.Process.Signal(syscall.SIGSTOP)
	}
}

// Resume lets a paused broker run again (SIGCONT).
func (b *Broker) Resume() {
	if b.running() {
		b.cmd.Process.Signal(syscall.SIGCONT)
	}
}

// signal sends sig to a running broker and reports whether it exited within
// waitLimit.
func (b *Broker) signal(sig syscall.Signal) bool {
	if !b.running() {
		return true
	}
	b.cmd.Process.Signal(syscall.SIGCONT) // a paused broker would not act on sig
	b.cmd.Process.Signal(sig)
	select {
	case <-b.done:
		return true
	case <-time.After(waitLimit):
		return false
	}
}

// running reports whether the broker process has been started and not
// exited.
func (b *Broker) running() bool {
	if b.done == nil {
		return false
	}
	select {
	case <-b.done:
		return false
	default:
		return true
	}
}

// Log returns the text of the broker's log file (log_type all), followed by
// anything Mosquitto wrote to its standard output or error, such as messages
// from before it opened the log; it is meant for failure messages.
func (b *Broker) Log() string {
	text := tail(b.logFile, 0)
	if out := tail(b.outFile, 0); out != "" {
		text += "--- mosquitto's standard output and error:\n" + out
	}
	return text
}

// findBinary returns the path of the program name, looked up on PATH and
// then at the given fallback paths. When it is missing the test skips, or
// fails when the environment has CI=true; pkg names the Debian package.
func findBinary(t testing.TB, name, pkg string, fallbacks ...string) string {
	t.Helper()
	if p, err := exec.LookPath(name); err == nil {
		return p
	}
	for _, p := range fallbacks {
		if st, err := os.Stat(p); err == nil && !st.IsDir() {
			return p
		}
	}
	msg := fmt.Sprintf("brokertest: %s not found (Debian package %s)", name, pkg)
	if os.Getenv("CI") == "true" {
		t.Fatal(msg + "; CI=true, so this is a failure")
	}
	t.Skip(msg)
	return ""
}

// freePorts returns n distinct loopback ports that were free a moment ago.
func freePorts(t testing.TB, n int) []int {
	t.Helper()
	var ports []int
	for range n {
		l, err := net.Listen("tcp", "127.0.0.1:0")
		if err != nil {
			t.Fatal(err)
		}
		defer l.Close()
		ports = append(ports, l.Addr().(*net.TCPAddr).Port)
	}
	return ports
}

// fileSize returns the size of the file at path, 0 if it is missing.
func fileSize(path string) int64 {
	st, err := os.Stat(path)
	if err != nil {
		return 0
	}
	return st.Size()
}

// tail returns the file's text from byte offset from on, "" if unreadable.
func tail(path string, from int64) string {
	data, err := os.ReadFile(path)
	if err != nil || int64(len(data)) < from {
		return ""
	}
	return string(data[from:])
}

// btoi is 1 for true and 0 for false.
func btoi(v bool) int {
	if v {
		return 1
	}
	return 0
}
