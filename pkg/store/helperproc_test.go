package store

import (
	"bufio"
	"fmt"
	"hash/crc32"
	"io"
	"math/rand/v2"
	"os"
	"os/exec"
	"strings"
	"testing"
	"time"
)

// The helper process pattern (as in os/exec's own tests): the test binary
// re-runs itself with -test.run=^TestHelperProcess$ and these variables
// set, and TestHelperProcess then acts as a second agent instead of a test.
const (
	envHelper = "AUSCULT_STORE_HELPER" // mode: hold, events, trend
	envPath   = "AUSCULT_STORE_PATH"   // store file
	envSeed   = "AUSCULT_STORE_SEED"   // seed for payload sizes
)

// TestHelperProcess is not a test; it runs only as a child process.
func TestHelperProcess(t *testing.T) {
	mode := os.Getenv(envHelper)
	if mode == "" {
		t.Skip("helper process only")
	}
	err := runHelper(mode, os.Getenv(envPath), os.Getenv(envSeed))
	fmt.Fprintln(os.Stderr, "helper:", err)
	os.Exit(3) // the helpers run until killed
}

func runHelper(mode, path, seed string) error {
	s, err := Open(path, Options{FlushInterval: -1, Timeout: 10 * time.Second})
	if err != nil {
		return err
	}
	var n uint64
	fmt.Sscan(seed, &n)
	rng := rand.New(rand.NewPCG(n, 1))
	switch mode {
	case "hold":
		fmt.Println("ready")
		_, _ = io.Copy(io.Discard, os.Stdin) // until killed
	case "events":
		fmt.Println("ready")
		for {
			e := crashEvent(rng)
			seq, err := s.AppendEvent(e)
			if err != nil {
				return err
			}
			// Reported only once AppendEvent returned.
			fmt.Println(seq)
		}
	case "trend":
		st, err := s.Stats()
		if err != nil {
			return err
		}
		fmt.Println("ready")
		for i := st.Trend; ; {
			batch := 1 + rng.IntN(40)
			for j := 0; j < batch; j++ {
				if err := s.AddTrend(trendAt(t0, i+j)); err != nil {
					return err
				}
			}
			if err := s.Flush(); err != nil {
				return err
			}
			i += batch
			fmt.Println(i) // points 0..i-1 are stored
		}
	}
	return fmt.Errorf("unknown mode %q", mode)
}

// crashEvent makes an event whose message length varies (so pages split
// and overflow) and whose values carry the message's CRC-32, so a reader
// can tell a whole event from a torn one.
func crashEvent(rng *rand.Rand) Event {
	msg := strings.Repeat("P-492B bearing tone rising; ", 1+rng.IntN(30))
	return Event{
		Time: t0.Add(time.Duration(rng.IntN(1e6)) * time.Millisecond), Kind: EventAlarm, Code: "raised",
		Asset: "P-492B", Score: rng.Float64(), Message: msg,
		Values: map[string]float64{"crc32": float64(crc32.ChecksumIEEE([]byte(msg))), "len_bytes": float64(len(msg))},
	}
}

// child is a running helper process.
type child struct {
	cmd   *exec.Cmd
	lines chan string // stdout lines; closed at EOF
}

// startChild starts the test binary in helper mode and waits for its
// "ready" line.
func startChild(t *testing.T, mode, path string, seed uint64) *child {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^TestHelperProcess$", "-test.count=1")
	cmd.Env = append(os.Environ(), envHelper+"="+mode, envPath+"="+path, fmt.Sprintf("%s=%d", envSeed, seed))
	stdin, err := cmd.StdinPipe()
	if err != nil {
		t.Fatal(err)
	}
	_ = stdin // kept open so "hold" blocks; closed when the child dies
	out, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	var stderr strings.Builder
	cmd.Stderr = &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	c := &child{cmd: cmd, lines: make(chan string, 1<<16)}
	go func() {
		sc := bufio.NewScanner(out)
		for sc.Scan() {
			c.lines <- sc.Text()
		}
		close(c.lines)
	}()
	t.Cleanup(func() { c.kill() })
	select {
	case l, ok := <-c.lines:
		if !ok || l != "ready" {
			c.kill()
			t.Fatalf("helper %s did not start: %q; stderr: %s", mode, l, stderr.String())
		}
	case <-time.After(30 * time.Second):
		c.kill()
		t.Fatalf("helper %s not ready after 30 s; stderr: %s", mode, stderr.String())
	}
	return c
}

// kill sends SIGKILL and reaps the child; the rest of its output stays in
// c.lines. Safe to call twice.
func (c *child) kill() {
	if c.cmd.ProcessState != nil {
		return
	}
	_ = c.cmd.Process.Kill() // SIGKILL on Unix
	_ = c.cmd.Wait()
}

// rest returns the lines the child printed, up to EOF; call after kill.
func (c *child) rest() []string {
	var out []string
	for l := range c.lines {
		out = append(out, l)
	}
	return out
}
