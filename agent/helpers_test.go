package main

import (
	"bytes"
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"github.com/auscult/auscult/pkg/audio"
)

// result is what one in-process run of the command line gave.
type result struct {
	code           int
	stdout, stderr string
}

// cli runs the agent in process through run, exactly as main does.
func cli(t *testing.T, args ...string) result {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return result{code, out.String(), errb.String()}
}

// mustRun runs the agent and fails the test unless it exits 0.
func mustRun(t *testing.T, args ...string) result {
	t.Helper()
	r := cli(t, args...)
	if r.code != 0 {
		t.Fatalf("auscult %s: exit %d\nstdout:\n%s\nstderr:\n%s", strings.Join(args, " "), r.code, r.stdout, r.stderr)
	}
	return r
}

// wantFail checks the exit code and that stderr holds every fragment.
func wantFail(t *testing.T, r result, code int, fragments ...string) {
	t.Helper()
	if r.code != code {
		t.Errorf("exit code %d, want %d\nstderr:\n%s", r.code, code, r.stderr)
	}
	for _, f := range fragments {
		if !strings.Contains(r.stderr, f) {
			t.Errorf("stderr does not mention %q:\n%s", f, r.stderr)
		}
	}
}

// skid is a small simulated data set with a baseline enrolled from it.
type skid struct {
	dir      string // simulate --out
	baseline string // enroll --out
	enroll   string // enroll's stdout
}

// simulateSkid returns a small simulated data set with its healthy
// recordings enrolled. It is made once per test binary and shared: tests
// must only read it (write what they make into their own temporary
// folders). Fewer or shorter healthy recordings (20 of 10 s, or 40 of 6 s)
// pass the enrolment checks but leave too few distinct held-out windows for
// the threshold fit.
func simulateSkid(t *testing.T) skid {
	t.Helper()
	skidOnce.Do(func() {
		root, err := os.MkdirTemp("", "auscult-skid-")
		if err != nil {
			skidErr = err.Error()
			return
		}
		sharedRoot = root
		dir := filepath.Join(root, "obrinvale")
		r := cli(t, "simulate", "--out", dir, "--seed", "3", "--train", "30", "--test-normal", "6",
			"--per-fault", "1", "--seconds", "10")
		if r.code != 0 {
			skidErr = r.stderr
			return
		}
		s := skid{dir: dir, baseline: filepath.Join(root, "p-pump.bl")}
		r = cli(t, "enroll", "--out", s.baseline, "--asset", "P-492B", filepath.Join(dir, "train"))
		if r.code != 0 {
			skidErr = r.stderr
			return
		}
		s.enroll = r.stdout
		shared = s
	})
	if skidErr != "" {
		t.Fatalf("making the shared simulated skid: %s", skidErr)
	}
	return shared
}

var (
	skidOnce   sync.Once
	shared     skid
	sharedRoot string // removed by TestMain
	skidErr    string
)

// writeWAV writes 16-bit mono samples at rate into dir/name with the
// project's own writer and returns the path.
func writeWAV(t *testing.T, dir, name string, rate int, samples []int16) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := audio.WriteWAV(p, rate, samples); err != nil {
		t.Fatal(err)
	}
	return p
}

// noise returns seconds of deterministic pink-ish noise with a 50 Hz hum
// at about -20 dBFS: a steady machine-like sound.
func noise(rate int, seconds float64, seed uint32) []int16 {
	out := make([]int16, int(float64(rate)*seconds))
	x := seed | 1
	var lp float64
	for i := range out {
		// xorshift32 gives a reproducible white source.
		x ^= x << 13
		x ^= x >> 17
		x ^= x << 5
		w := float64(x)/float64(math.MaxUint32)*2 - 1
		lp = 0.9*lp + 0.1*w
		hum := 0.05 * math.Sin(2*math.Pi*50*float64(i)/float64(rate))
		out[i] = int16(32767 * (0.08*w + 0.4*lp + hum))
	}
	return out
}

// readCSV parses CSV output with encoding/csv (RFC 4180).
func readCSV(t *testing.T, s string) [][]string {
	t.Helper()
	rows, err := csv.NewReader(strings.NewReader(s)).ReadAll()
	if err != nil {
		t.Fatalf("output is not CSV (encoding/csv, RFC 4180): %v\n%s", err, s)
	}
	return rows
}

// readFile returns a file's bytes.
func readFile(t *testing.T, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
