package audio

import (
	"encoding/binary"
	"errors"
	"io"
	"math"
	"os"
	"os/exec"
	"testing"
)

// readAll drains src with reads of size chunk and fails the test on any
// error other than io.EOF.
func readAll(t testing.TB, src Source, chunk int) []int16 {
	t.Helper()
	out, err := readAllErr(src, chunk)
	if err != nil {
		t.Fatalf("read: %v", err)
	}
	return out
}

// readAllErr drains src with reads of size chunk and returns what it got
// and the first error other than io.EOF.
func readAllErr(src Source, chunk int) ([]int16, error) {
	var out []int16
	buf := make([]int16, chunk)
	for {
		n, err := src.Read(buf)
		out = append(out, buf[:n]...)
		if errors.Is(err, io.EOF) {
			return out, nil
		}
		if err != nil {
			return out, err
		}
	}
}

// testSignal returns n deterministic samples: two sines plus LCG noise,
// with the extreme values -32768 and 32767 at the start.
func testSignal(n int, seed uint32) []int16 {
	s := make([]int16, n)
	x := seed
	for i := range s {
		x = x*1664525 + 1013904223 // Numerical Recipes LCG constants
		noise := float64(int32(x)>>16) / 4
		v := 12000*math.Sin(2*math.Pi*float64(i)*0.0123) + 9000*math.Sin(2*math.Pi*float64(i)*0.231+0.3) + noise
		s[i] = int16(math.Max(-32768, math.Min(32767, math.Round(v))))
	}
	if n >= 4 {
		s[0], s[1], s[2], s[3] = -32768, 32767, 0, -1
	}
	return s
}

// int16Bytes encodes samples as little-endian bytes.
func int16Bytes(s []int16) []byte {
	b := make([]byte, 2*len(s))
	for i, v := range s {
		binary.LittleEndian.PutUint16(b[2*i:], uint16(v))
	}
	return b
}

// interleave returns the frames of the given equal-length channels.
func interleave(chans ...[]int16) []int16 {
	out := make([]int16, 0, len(chans)*len(chans[0]))
	for i := range chans[0] {
		for _, c := range chans {
			out = append(out, c[i])
		}
	}
	return out
}

// soxPath returns the path of the Debian sox binary. Without sox the test
// is skipped, unless CI=true, where it fails.
func soxPath(t testing.TB) string {
	t.Helper()
	p := "/usr/bin/sox"
	if _, err := os.Stat(p); err != nil {
		var lerr error
		if p, lerr = exec.LookPath("sox"); lerr != nil {
			if os.Getenv("CI") == "true" {
				t.Fatalf("sox is required when CI=true: %v", err)
			}
			t.Skipf("sox not installed: %v", err)
		}
	}
	return p
}

// runSox runs sox with args and fails the test with its output on error.
func runSox(t testing.TB, sox string, args ...string) {
	t.Helper()
	out, err := exec.Command(sox, args...).CombinedOutput()
	if err != nil {
		t.Fatalf("sox %v: %v\n%s", args, err, out)
	}
}

// execOutput runs a command and returns its standard output.
func execOutput(name string, args ...string) (string, error) {
	out, err := exec.Command(name, args...).Output()
	return string(out), err
}
