//go:build cgo

package capture

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/capture/capturetest"
)

// These tests run real PortAudio (the Debian package libportaudio2,
// V19.6) against a capture device that needs no sound card: ALSA's file
// plugin reading a raw s16le file, configured as in
// /work/shared/PLATFORM-NOTES.md. The device is not clocked, so reads
// return at once and the tests keep their totals small. Without the
// device (no ALSA host API) they skip, unless CI=true, where they fail.

// alsaConf is the ALSA configuration of PLATFORM-NOTES.md.
var alsaConf = capturetest.ALSAConfig

const liveRate = 8000

// childEnv marks a child process started by runsHere.
const childEnv = "AUSCULT_CAPTURE_LIVE_CHILD"

// runsHere reports whether the calling live test should run in this
// process. In a -race build the PortAudio binding can open only one stream
// per process: its OpenStream turns a per-process stream counter into an
// unsafe.Pointer, which the race build's pointer checks (checkptr) reject
// from the second stream on ("pointer arithmetic computed bad pointer
// value"; the binding's checkptr trouble under -race, cf.
// gordonklaus/portaudio issue 57). So under -race each live test reruns
// itself in a child process of its own, and runsHere reports the child's
// result; without -race it returns true at once. Tests that never get as
// far as opening a stream (device lists, selection errors) need not call
// it. (Building the binding
// with -gcflags=github.com/gordonklaus/portaudio=-d=checkptr=0 also works.)
func runsHere(t *testing.T) bool {
	t.Helper()
	if !raceBuild || os.Getenv(childEnv) == "1" {
		return true
	}
	parts := strings.Split(t.Name(), "/")
	for i, p := range parts {
		parts[i] = "^" + regexp.QuoteMeta(p) + "$"
	}
	cmd := exec.Command(os.Args[0], "-test.run="+strings.Join(parts, "/"), "-test.count=1", "-test.v")
	cmd.Env = append(os.Environ(), childEnv+"=1")
	out, err := cmd.CombinedOutput()
	switch {
	case err != nil:
		t.Fatalf("%s in a child process: %v\n%s", t.Name(), err, out)
	case bytes.Contains(out, []byte("--- SKIP: "+t.Name()+" ")):
		t.Skipf("skipped in the child process:\n%s", out)
	case !bytes.Contains(out, []byte("--- PASS: "+t.Name()+" ")):
		t.Fatalf("%s did not run in the child process:\n%s", t.Name(), out)
	}
	return false
}

// useTestmic writes alsaConf to a temporary folder and points ALSA at it
// and the testmic device at infile, for the rest of the test. PortAudio
// reads both when it is initialised (by New or Devices).
func useTestmic(t *testing.T, infile string) {
	t.Helper()
	conf := filepath.Join(t.TempDir(), "asound.conf")
	if err := os.WriteFile(conf, []byte(alsaConf), 0o644); err != nil {
		t.Fatal(err)
	}
	t.Setenv("ALSA_CONFIG_PATH", conf)
	t.Setenv("AUSCULT_TEST_INFILE", infile)
}

// testmicIndex returns the index of the testmic device, skipping the test
// (failing it under CI=true) when PortAudio does not offer it.
func testmicIndex(t *testing.T) int {
	t.Helper()
	devs, err := Devices()
	if err == nil {
		for _, d := range devs {
			if d.Name == "testmic" && d.HostAPI == "ALSA" && d.MaxInputChannels > 0 {
				return d.Index
			}
		}
		err = fmt.Errorf("no ALSA input device named testmic in %v", devs)
	}
	if os.Getenv("CI") == "true" {
		t.Fatalf("PortAudio with ALSA's file plugin is required when CI=true: %v", err)
	}
	t.Skipf("no PortAudio testmic device: %v", err)
	return -1
}

// liveSignal returns n frames of c channels: a different tone plus
// deterministic noise in each channel, with the extremes at the start.
func liveSignal(n, c int) []int16 {
	s := make([]int16, n*c)
	x := uint32(492)
	for i := range s {
		x = x*1664525 + 1013904223 // Numerical Recipes LCG constants
		f, ch := i/c, i%c
		v := 20000*math.Sin(2*math.Pi*float64(f)*float64(200*(ch+1))/liveRate) + float64(int32(x)>>20)
		s[i] = int16(math.Round(v))
	}
	s[0], s[len(s)-1] = -32768, 32767
	return s
}

// writeInfile writes frames as s16le plus one second of zeros (after the
// end of its file the plugin repeats its last buffer) and returns the path.
func writeInfile(t *testing.T, path string, frames []int16, channels int) {
	t.Helper()
	b := make([]byte, 2*len(frames)+2*liveRate*channels)
	for i, v := range frames {
		binary.LittleEndian.PutUint16(b[2*i:], uint16(v))
	}
	if err := os.WriteFile(path, b, 0o644); err != nil {
		t.Fatal(err)
	}
}

// readN reads n samples from c, with a guard against hanging.
func readN(t *testing.T, c *Capture, n int) []int16 {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 30*time.Second) // hang guard, not a speed check
	defer cancel()
	out := make([]int16, n)
	for i := 0; i < n; {
		k, err := c.ReadContext(ctx, out[i:])
		if err != nil {
			t.Fatalf("after %d of %d samples: %v", i, n, err)
		}
		i += k
	}
	return out
}

// closeLive closes c and returns its diagnostics.
func closeLive(t *testing.T, c *Capture) []Diagnostic {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 30*time.Second)
	defer cancel()
	if err := c.Close(ctx); err != nil {
		t.Fatal(err)
	}
	var ds []Diagnostic
	for d := range c.Diagnostics() {
		ds = append(ds, d)
	}
	return ds
}

// TestLiveExact captures a known file through PortAudio and checks every
// sample, for each way of naming the device and each channel choice.
func TestLiveExact(t *testing.T) {
	const frames = liveRate // one second
	mono, stereo := liveSignal(frames, 1), liveSignal(frames, 2)
	column := func(ch int) []int16 {
		out := make([]int16, frames)
		for i := range out {
			out[i] = stereo[2*i+ch]
		}
		return out
	}
	mixed := make([]int16, frames)
	for i := range mixed {
		sum := int(stereo[2*i]) + int(stereo[2*i+1]) + 1 // the mean, rounded half up
		mixed[i] = int16(math.Floor(float64(sum) / 2))
	}
	cases := []struct {
		name      string
		device    func(index int) string
		channels  int
		channel   int
		want      []int16
		wantOpens string // in the KindOpened diagnostic
	}{
		{"by name", func(int) string { return "testmic" }, 1, 0, mono, `"testmic"`},
		{"by part of the name, any case", func(int) string { return "TMIC" }, 1, 0, mono, `"testmic"`},
		{"by index", func(i int) string { return fmt.Sprint(i) }, 1, 0, mono, `"testmic"`},
		{"default input", func(int) string { return "" }, 1, 0, mono, `"default"`},
		{"stereo, left", func(int) string { return "testmic" }, 2, 0, column(0), "2 channel(s)"},
		{"stereo, right", func(int) string { return "testmic" }, 2, 1, column(1), "2 channel(s)"},
		{"stereo, mixed", func(int) string { return "testmic" }, 2, -1, mixed, "2 channel(s)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if !runsHere(t) {
				return
			}
			noLeak(t)
			in := filepath.Join(t.TempDir(), "in.raw")
			sig := mono
			if c.channels == 2 {
				sig = stereo
			}
			writeInfile(t, in, sig, c.channels)
			useTestmic(t, in)
			idx := testmicIndex(t)
			cp, err := New(Config{Device: c.device(idx), Rate: liveRate, Channels: c.channels, Channel: c.channel,
				FramesPerRead: 300, RingSeconds: 8})
			if err != nil {
				t.Fatal(err)
			}
			got := readN(t, cp, frames)
			diags := closeLive(t, cp)
			bad := 0
			for i := range got {
				if got[i] != c.want[i] && bad < 5 {
					bad++
					t.Errorf("sample %d: %d, file has %d", i, got[i], c.want[i])
				}
			}
			if len(diags) == 0 || diags[0].Kind != KindOpened || !strings.Contains(diags[0].Device, c.wantOpens) {
				t.Errorf("first diagnostic %v, want opened %s", diags, c.wantOpens)
			}
			if s := cp.Stats(); s.Opens != 1 || s.DeviceErrors != 0 || s.InputOverflows != 0 || s.Captured < frames {
				t.Errorf("stats %+v", s)
			}
		})
	}
}

// TestLiveOpenErrors checks what New says when the device is missing.
func TestLiveOpenErrors(t *testing.T) {
	present := filepath.Join(t.TempDir(), "in.raw")
	writeInfile(t, present, liveSignal(100, 1), 1)
	missing := filepath.Join(t.TempDir(), "absent.raw")
	cases := []struct {
		name   string
		infile string
		device string
		want   error
		text   []string
	}{
		{"unknown name lists the inputs", present, "P-492B contact mic", ErrNoDevice,
			[]string{`no device name contains "P-492B contact mic"`, `"testmic" (ALSA, 128 in)`, `"default" (ALSA, 128 in)`}},
		{"unknown index", present, "4920", ErrNoDevice, []string{"no device has index 4920", `"testmic"`}},
		// the file plugin offers no input when its file is missing, like an
		// unplugged microphone
		{"device without input", missing, "testmic", ErrNoInput,
			[]string{`"testmic"`, "has 0 input channels, 1 needed", `none with input channels: `, `"default" (ALSA, 0 in)`}},
		{"no default input", missing, "", ErrNoDevice, []string{"there is no default input device", `"testmic" (ALSA, 0 in)`}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			noLeak(t)
			useTestmic(t, present)
			testmicIndex(t)
			t.Setenv("AUSCULT_TEST_INFILE", c.infile)
			cp, err := New(Config{Device: c.device, Rate: liveRate})
			if cp != nil || !errors.Is(err, c.want) {
				t.Fatalf("New: %v, %v; want %v", cp, err, c.want)
			}
			for _, s := range c.text {
				if !strings.Contains(err.Error(), s) {
					t.Errorf("error %q\ndoes not contain %q", err, s)
				}
			}
		})
	}
}

// TestLiveWaitsForDevice starts with the device absent (no input file),
// then makes it appear: the capture goroutine must report the failed
// opens, find the device on a later attempt (PortAudio rescans because
// the opener ends its reference between attempts) and deliver the file
// exactly.
func TestLiveWaitsForDevice(t *testing.T) {
	if !runsHere(t) {
		return
	}
	noLeak(t)
	dir := t.TempDir()
	present := filepath.Join(dir, "present.raw")
	writeInfile(t, present, liveSignal(10, 1), 1)
	useTestmic(t, present)
	testmicIndex(t)
	in := filepath.Join(dir, "in.raw")
	t.Setenv("AUSCULT_TEST_INFILE", in)
	cp, err := New(Config{Device: "testmic", Rate: liveRate, FramesPerRead: 250, RingSeconds: 8,
		WaitForDevice: true, ReopenMin: 20 * time.Millisecond, ReopenMax: 80 * time.Millisecond})
	if err != nil {
		t.Fatal(err)
	}
	d := <-cp.Diagnostics()
	if d.Kind != KindOpenFailed || !errors.Is(d.Err, ErrNoInput) {
		t.Fatalf("first diagnostic %v, want a failed open", d)
	}
	sig := liveSignal(liveRate/2, 1)
	writeInfile(t, in, sig, 1)
	got := readN(t, cp, len(sig))
	diags := closeLive(t, cp)
	for i := range got {
		if got[i] != sig[i] {
			t.Fatalf("sample %d: %d, file has %d", i, got[i], sig[i])
		}
	}
	var opened *Diagnostic
	for i := range diags {
		if diags[i].Kind == KindOpened {
			opened = &diags[i]
			break
		}
		if diags[i].Kind != KindOpenFailed {
			t.Errorf("unexpected %v before the device opened", diags[i])
		}
	}
	if opened == nil || opened.Attempt < 1 || opened.Duration <= 0 {
		t.Errorf("no reopen diagnostic with attempts and outage in %v", diags)
	}
	if s := cp.Stats(); s.Opens != 1 || s.OpenFailures < 1 || uint64(opened.Attempt) != s.OpenFailures {
		t.Errorf("stats %+v, reopen after %d attempts", s, opened.Attempt)
	}
}

func TestLiveDevices(t *testing.T) {
	in := filepath.Join(t.TempDir(), "in.raw")
	writeInfile(t, in, liveSignal(10, 1), 1)
	useTestmic(t, in)
	idx := testmicIndex(t)
	devs, err := Devices()
	if err != nil {
		t.Fatal(err)
	}
	var def []string
	for _, d := range devs {
		if d.DefaultInput {
			def = append(def, d.Name)
		}
	}
	if len(def) != 1 || def[0] != "default" {
		t.Errorf("default inputs %v, want [default]", def)
	}
	var b strings.Builder
	if err := FormatDevices(&b, devs); err != nil {
		t.Fatal(err)
	}
	if line := fmt.Sprintf("  %5d     128    44100  ALSA  testmic\n", idx); !strings.Contains(b.String(), line) {
		t.Errorf("table\n%s\nlacks %q", b.String(), line)
	}
}
