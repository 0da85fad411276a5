package main

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/capture/capturetest"
	"github.com/auscult/auscult/pkg/store"
)

// writeConfig writes an agent config for asset P-492B with the given
// source section and returns its path and the log's path.
func writeConfig(t *testing.T, baselinePath, source string) (cfg, logPath string) {
	t.Helper()
	dir := t.TempDir()
	logPath = filepath.Join(dir, "auscult.db")
	cfg = filepath.Join(dir, "agent.yaml")
	text := fmt.Sprintf("site: obrinvale\nasset: P-492B\nbaseline: %s\nsource:\n%s\nlog:\n  path: %s\n",
		baselinePath, source, logPath)
	if err := os.WriteFile(cfg, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return cfg, logPath
}

func openLogReadOnly(t *testing.T, path string) *store.Store {
	t.Helper()
	st, err := store.Open(path, store.Options{ReadOnly: true, Timeout: 5 * time.Second})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	return st
}

// The service on a folder of recordings, as fast as possible: it logs
// events, a minute trend and the baseline history, and a second run with
// the same baseline does not add it to the history again.
func TestRunOnRecordings(t *testing.T) {
	s := simulateSkid(t)
	cfg, logPath := writeConfig(t, s.baseline, fmt.Sprintf("  kind: wav\n  path: %s\n  speed: 0", filepath.Join(s.dir, "test")))
	r := mustRun(t, "check", "--config", cfg)
	for _, want := range []string{"config ", "baseline ", "log ", "microphone ", "all checks passed"} {
		if !strings.Contains(r.stdout, want) {
			t.Errorf("check output lacks %q:\n%s", want, r.stdout)
		}
	}
	r = mustRun(t, "run", "--config", cfg)
	if !strings.Contains(r.stderr, `reason="end of source"`) {
		t.Errorf("run did not end with its source:\n%s", r.stderr)
	}
	mustRun(t, "run", "--config", cfg)
	st := openLogReadOnly(t, logPath)
	trend, err := st.Trend(store.Range{})
	if err != nil {
		t.Fatal(err)
	}
	// 33 test recordings of 10 s, twice: 5.5 min each run, stamped from the
	// run's start; partial minutes at either end.
	if len(trend) < 10 || len(trend) > 16 {
		t.Errorf("%d trend points for two runs of 5.5 min", len(trend))
	}
	hist, err := st.Baselines()
	if err != nil {
		t.Fatal(err)
	}
	if len(hist) != 1 {
		t.Errorf("baseline history has %d entries after two runs with one baseline", len(hist))
	}
	evs, err := st.Events(store.EventQuery{})
	if err != nil {
		t.Fatal(err)
	}
	var raised int
	for _, e := range evs {
		if strings.HasSuffix(e.Code, ".raised") {
			raised++
		}
	}
	// The test set holds 27 faulty recordings among 33, at every SNR.
	if raised == 0 {
		t.Errorf("no alarm or warning raised on a test set of mostly faulty recordings; events: %d", len(evs))
	}
}

func TestRunRefusesBadInput(t *testing.T) {
	s := simulateSkid(t)
	cfg, _ := writeConfig(t, s.baseline, "  kind: wav\n  path: /nonexistent/folder")
	wantFail(t, cli(t, "run", "--config", cfg), 1, "/nonexistent/folder")
	bad, _ := writeConfig(t, s.baseline, "  kind: microphone")
	wantFail(t, cli(t, "run", "--config", bad), 1, "source.kind: must be device, wav or stdin")
	wantFail(t, cli(t, "run"), 2, "--config FILE is required")
	wantFail(t, cli(t, "run", "--config", cfg, "--source", "tape:x"), 2, "--source \"tape:x\"")
	noBase, _ := writeConfig(t, filepath.Join(t.TempDir(), "missing.bl"), "  kind: stdin")
	wantFail(t, cli(t, "run", "--config", noBase), 1, "missing.bl")
}

// TestMain removes the agent binary built for the process tests.
func TestMain(m *testing.M) {
	code := m.Run()
	if binPath != "" {
		os.RemoveAll(filepath.Dir(binPath))
	}
	if sharedRoot != "" {
		os.RemoveAll(sharedRoot)
	}
	os.Exit(code)
}

var (
	binOnce sync.Once
	binPath string
	binErr  error
)

// agentBinary builds the agent once for the tests that need a real process
// (signals, live capture).
func agentBinary(t *testing.T) string {
	t.Helper()
	if testing.Short() {
		// The binary is built without the race detector anyway; the full
		// (non-short) run covers these tests.
		t.Skip("short mode: skips tests that run the agent as a separate process")
	}
	binOnce.Do(func() {
		dir, err := os.MkdirTemp("", "auscult-bin-")
		if err != nil {
			binErr = err
			return
		}
		binPath = filepath.Join(dir, "auscult")
		out, err := exec.Command("go", "build", "-o", binPath, ".").CombinedOutput()
		if err != nil {
			binErr = fmt.Errorf("go build: %v\n%s", err, out)
		}
	})
	if binErr != nil {
		t.Fatal(binErr)
	}
	return binPath
}

// process is a running agent whose stderr lines are collected.
type process struct {
	cmd   *exec.Cmd
	mu    sync.Mutex
	lines []string
	done  chan error
}

func start(t *testing.T, env []string, args ...string) *process {
	t.Helper()
	p := &process{cmd: exec.Command(agentBinary(t), args...), done: make(chan error, 1)}
	p.cmd.Env = append(os.Environ(), env...)
	stderr, err := p.cmd.StderrPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := p.cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() {
		sc := bufio.NewScanner(stderr)
		for sc.Scan() {
			p.mu.Lock()
			p.lines = append(p.lines, sc.Text())
			p.mu.Unlock()
		}
		p.done <- p.cmd.Wait()
	}()
	t.Cleanup(func() { p.cmd.Process.Kill() })
	return p
}

// waitFor waits until a stderr line holds s.
func (p *process) waitFor(t *testing.T, s string, limit time.Duration) {
	t.Helper()
	end := time.Now().Add(limit)
	for time.Now().Before(end) {
		if strings.Contains(p.log(), s) {
			return
		}
		time.Sleep(50 * time.Millisecond)
	}
	t.Fatalf("no %q on stderr within %v:\n%s", s, limit, p.log())
}

// terminate sends SIGTERM and fails the test unless the agent exits with
// status 0 within limit (a hang detector, not a speed goal).
func (p *process) terminate(t *testing.T, limit time.Duration) {
	t.Helper()
	if err := p.cmd.Process.Signal(syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	select {
	case err := <-p.done:
		if err != nil {
			t.Fatalf("exit after SIGTERM: %v\n%s", err, p.log())
		}
	case <-time.After(limit):
		t.Fatalf("still running %v after SIGTERM:\n%s", limit, p.log())
	}
}

func (p *process) log() string {
	p.mu.Lock()
	defer p.mu.Unlock()
	return strings.Join(p.lines, "\n")
}

// SIGTERM ends a running agent cleanly within a few seconds, with its
// partial minute flushed and its log's lock released.
func TestRunStopsOnSIGTERM(t *testing.T) {
	agentBinary(t) // skips in -short mode, before the slow set-up
	s := simulateSkid(t)
	cfg, logPath := writeConfig(t, s.baseline, fmt.Sprintf("  kind: wav\n  path: %s\n  speed: 1", filepath.Join(s.dir, "test")))
	p := start(t, nil, "run", "--config", cfg)
	p.waitFor(t, "listening", 10*time.Second)
	time.Sleep(8 * time.Second) // a few windows in real time
	sent := time.Now()
	p.terminate(t, 10*time.Second)
	t.Logf("stopped %v after SIGTERM", time.Since(sent).Round(time.Millisecond))
	if !strings.Contains(p.log(), "reason=signal") {
		t.Errorf("no clean stop logged:\n%s", p.log())
	}
	trend, err := openLogReadOnly(t, logPath).Trend(store.Range{})
	if err != nil || len(trend) == 0 {
		t.Errorf("partial minute not flushed: %d points, %v", len(trend), err)
	}
}

// The whole agent on real PortAudio: healthy sound from a simulated
// recording through a virtual ALSA capture device, then a dead microphone
// (the device delivers zeros once the file ends). The agent must score the
// sound, and report the dead microphone as a sensor diagnostic, not as an
// anomaly.
func TestRunOnPortAudioDevice(t *testing.T) {
	agentBinary(t) // skips in -short mode, before the slow set-up
	s := simulateSkid(t)
	dir := t.TempDir()
	infile := filepath.Join(dir, "mic.raw")
	var raw bytes.Buffer
	files, _ := filepath.Glob(filepath.Join(s.dir, "train", "*.wav"))
	for _, f := range files[:6] {
		r, err := audio.OpenWAV(f, 0)
		if err != nil {
			t.Fatal(err)
		}
		buf := make([]int16, 4096)
		for {
			n, err := r.Read(buf)
			binary.Write(&raw, binary.LittleEndian, buf[:n])
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatal(err)
			}
		}
		r.Close()
	}
	raw.Write(make([]byte, 2*16000*2)) // 2 s of zeros: then the device reads zeros
	if err := os.WriteFile(infile, raw.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	env, err := capturetest.Env(dir, infile)
	if err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(agentBinary(t), "devices").CombinedOutput()
	if err != nil || !strings.Contains(string(out), "testmic") {
		cmd := exec.Command(agentBinary(t), "devices")
		cmd.Env = append(os.Environ(), env...)
		out, err = cmd.CombinedOutput()
	}
	if err != nil || !strings.Contains(string(out), "testmic") {
		if os.Getenv("CI") == "true" {
			t.Fatalf("no testmic capture device through PortAudio (CI=true: a missing component fails): %v\n%s", err, out)
		}
		t.Skipf("no testmic device here: %v\n%s", err, out)
	}
	cfg, logPath := writeConfig(t, s.baseline, "  kind: device\n  device: testmic\n  rate_hz: 16000")
	p := start(t, env, "run", "--config", cfg)
	p.waitFor(t, "sensor.silence.active", 60*time.Second)
	if err := p.cmd.Process.Signal(syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	if err := <-p.done; err != nil {
		t.Fatalf("exit: %v\n%s", err, p.log())
	}
	st := openLogReadOnly(t, logPath)
	evs, err := st.Events(store.EventQuery{})
	if err != nil {
		t.Fatal(err)
	}
	var codes []string
	for _, e := range evs {
		codes = append(codes, e.Code)
		if e.Code == "alarm.raised" {
			t.Errorf("anomaly alarm raised on healthy sound or a dead microphone: %s", e.Message)
		}
	}
	t.Logf("events: %v", codes)
	trend, err := st.Trend(store.Range{})
	if err != nil || len(trend) == 0 || trend[0].Windows == 0 {
		t.Fatalf("no windows scored from the device: %v %v", trend, err)
	}
}

// SIGHUP re-reads the config: alarm timings apply at once, a broken file is
// refused and the agent keeps running, other changes wait for a restart.
func TestRunReloadsOnSIGHUP(t *testing.T) {
	agentBinary(t) // skips in -short mode, before the slow set-up
	s := simulateSkid(t)
	source := fmt.Sprintf("  kind: wav\n  path: %s\n  speed: 1", filepath.Join(s.dir, "test"))
	cfg, _ := writeConfig(t, s.baseline, source)
	p := start(t, nil, "run", "--config", cfg)
	p.waitFor(t, "listening", 10*time.Second)
	text, _ := os.ReadFile(cfg)
	hup := func(content string) {
		t.Helper()
		if err := os.WriteFile(cfg, []byte(content), 0o644); err != nil {
			t.Fatal(err)
		}
		if err := p.cmd.Process.Signal(syscall.SIGHUP); err != nil {
			t.Fatal(err)
		}
	}
	hup(string(text) + "alarm:\n  off_delay_s: 40\n  latch: true\n")
	p.waitFor(t, "alarm settings applied", 5*time.Second)
	hup(string(text) + "alarm:\n  off_delay: 40\n")
	p.waitFor(t, "config reload refused", 5*time.Second)
	if !strings.Contains(p.log(), "alarm.off_delay: unknown key") {
		t.Errorf("refusal does not name the key:\n%s", p.log())
	}
	hup(strings.Replace(string(text), "asset: P-492B", "asset: P-492C", 1))
	p.waitFor(t, "take effect at the next restart", 5*time.Second)
	// The source is not applied by a reload either, and the journal must
	// say so rather than "no changes".
	hup(strings.Replace(string(text), "speed: 1", "speed: 2", 1))
	p.waitFor(t, "changed=source", 5*time.Second)
	p.cmd.Process.Signal(syscall.SIGTERM)
	if err := <-p.done; err != nil {
		t.Fatalf("exit: %v\n%s", err, p.log())
	}
}
