package audio

import (
	"encoding/binary"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// These tests check the WAV reader and writer against SoX 14.4.2 (Debian
// package sox, /usr/bin/sox): Go writes a known signal as raw 16-bit PCM,
// sox converts it into each WAV variant, and the reader must recover the
// signal. sox is run with -D (no dither) so that its conversions are
// deterministic. Without sox the tests are skipped, unless CI=true.

// soxConvert writes frames (interleaved, channels per frame) as raw s16le,
// converts them with sox using outArgs and returns the output path.
func soxConvert(t *testing.T, sox string, frames []int16, channels int, outArgs string) string {
	t.Helper()
	dir := t.TempDir()
	raw := filepath.Join(dir, "in.raw")
	if err := os.WriteFile(raw, int16Bytes(frames), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out.wav")
	args := []string{"-D", "-t", "raw", "-r", "16000", "-e", "signed", "-b", "16", "-c", fmt.Sprint(channels), "-L", raw}
	args = append(args, strings.Fields(outArgs)...)
	runSox(t, sox, append(args, out)...)
	return out
}

// formatTag returns the format tag of a canonical WAV file (fmt chunk first).
func formatTag(t *testing.T, path string) uint16 {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil || len(b) < 22 {
		t.Fatalf("reading %s: %v", path, err)
	}
	return binary.LittleEndian.Uint16(b[20:])
}

func readWAVFile(t *testing.T, path string, channel int) ([]int16, WAVInfo) {
	t.Helper()
	w, err := OpenWAV(path, channel)
	if err != nil {
		t.Fatal(err)
	}
	defer w.Close()
	return readAll(t, w, 1000), w.Info()
}

// TestWAVReaderAgainstSox: 16, 24 and 32-bit integer and 32/64-bit float
// must decode exactly (widening 16-bit samples is exact, and float s/32768
// is exact in float32); 8-bit must be within half a quantisation step
// (128), except for the top value, which clips to 127<<8.
func TestWAVReaderAgainstSox(t *testing.T) {
	sox := soxPath(t)
	sig := testSignal(8000, 1)
	cases := []struct {
		name    string
		args    string
		tag     uint16 // expected format tag written by sox
		bits    int
		float   bool
		maxDiff int
	}{
		{"16-bit wavpcm", "-t wavpcm -e signed -b 16", tagPCM, 16, false, 0},
		{"24-bit extensible", "-t wav -e signed -b 24", tagExtensible, 24, false, 0},
		{"24-bit plain PCM", "-t wavpcm -e signed -b 24", tagPCM, 24, false, 0},
		{"32-bit extensible", "-t wav -e signed -b 32", tagExtensible, 32, false, 0},
		{"8-bit unsigned", "-t wav -e unsigned -b 8", tagPCM, 8, false, 128},
		{"32-bit float", "-t wav -e floating-point -b 32", tagFloat, 32, true, 1},
		{"64-bit float", "-t wav -e floating-point -b 64", tagFloat, 64, true, 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := soxConvert(t, sox, sig, 1, c.args)
			if tag := formatTag(t, path); tag != c.tag {
				t.Fatalf("sox wrote format tag 0x%04X, test expects 0x%04X", tag, c.tag)
			}
			got, info := readWAVFile(t, path, 0)
			want := WAVInfo{Rate: 16000, Channels: 1, BitsPerSample: c.bits, Float: c.float, Frames: int64(len(sig))}
			if info != want {
				t.Errorf("info %+v, want %+v", info, want)
			}
			if len(got) != len(sig) {
				t.Fatalf("%d samples, want %d", len(got), len(sig))
			}
			bad := 0
			for i := range sig {
				d := int(got[i]) - int(sig[i])
				if c.bits == 8 && sig[i] > 32767-128 {
					d = int(got[i]) - 127<<8
				}
				if d > c.maxDiff || d < -c.maxDiff {
					if bad++; bad < 5 {
						t.Errorf("sample %d: got %d, sox input %d", i, got[i], sig[i])
					}
				}
			}
		})
	}
}

// TestWAVChannelsAgainstSox checks channel picking and mixing on stereo and
// 4-channel (WAVE_FORMAT_EXTENSIBLE) files written by sox. The mix must
// equal floor((sum + C/2) / C) of the 16-bit inputs, the rule in decode.go,
// and be within 1 LSB of sox's own down-mix (sox "-c 1", which averages).
func TestWAVChannelsAgainstSox(t *testing.T) {
	sox := soxPath(t)
	const n = 6000
	chans := [][]int16{testSignal(n, 11), testSignal(n, 12), testSignal(n, 13), testSignal(n, 14)}
	cases := []struct {
		name     string
		channels int
		args     string
		tag      uint16
	}{
		{"stereo 16-bit", 2, "-t wav -e signed -b 16", tagPCM},
		{"stereo 24-bit", 2, "-t wav -e signed -b 24", tagExtensible},
		{"4-channel 16-bit", 4, "-t wav -e signed -b 16", tagExtensible},
		{"4-channel float", 4, "-t wav -e floating-point -b 32", tagFloat}, // sox 14.4.2 keeps tag 3 for float
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := chans[:c.channels]
			path := soxConvert(t, sox, interleave(in...), c.channels, c.args)
			if tag := formatTag(t, path); tag != c.tag {
				t.Fatalf("sox wrote format tag 0x%04X, test expects 0x%04X", tag, c.tag)
			}
			for ch := 0; ch < c.channels; ch++ {
				got, _ := readWAVFile(t, path, ch)
				if !equalInt16(got, in[ch]) {
					t.Errorf("channel %d differs from what sox was given", ch)
				}
			}
			got, _ := readWAVFile(t, path, -1)
			soxMix := filepath.Join(filepath.Dir(path), "mix.wav")
			runSox(t, sox, "-D", path, "-e", "signed", "-b", "16", "-c", "1", soxMix)
			sm, _ := readWAVFile(t, soxMix, 0)
			bad := 0
			for i := range got {
				sum := 0
				for _, cs := range in {
					sum += int(cs[i])
				}
				want := floorDiv(sum+c.channels/2, c.channels)
				if int(got[i]) != want || abs(int(got[i])-int(sm[i])) > 1 {
					if bad++; bad < 5 {
						t.Errorf("frame %d: mix %d, rule %d, sox %d", i, got[i], want, sm[i])
					}
				}
			}
		})
	}
}

// TestWAVRoundingAgainstSox checks the 24/32-bit and float rounding rule
// against sox: a noise signal synthesised by sox at high resolution must
// decode to the same samples as sox's own undithered 16-bit conversion of
// it (SoX rounds to nearest, ties up, when narrowing). Float allows 1 LSB
// because sox rounds in two stages (to 32 bits, then 16).
func TestWAVRoundingAgainstSox(t *testing.T) {
	sox := soxPath(t)
	cases := []struct {
		name    string
		args    string
		maxDiff int
	}{
		{"24-bit", "-e signed -b 24", 0},
		{"32-bit", "-e signed -b 32", 0},
		{"32-bit float", "-e floating-point -b 32", 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			hi := filepath.Join(dir, "hi.wav")
			lo := filepath.Join(dir, "lo.wav")
			args := append([]string{"-D", "-R", "-n", "-r", "16000"}, strings.Fields(c.args)...)
			runSox(t, sox, append(args, hi, "synth", "0.5", "whitenoise", "vol", "0.9")...)
			runSox(t, sox, "-D", hi, "-e", "signed", "-b", "16", lo)
			got, _ := readWAVFile(t, hi, 0)
			want, _ := readWAVFile(t, lo, 0)
			if len(got) != len(want) || len(got) != 8000 {
				t.Fatalf("%d and %d samples, want 8000", len(got), len(want))
			}
			bad := 0
			for i := range got {
				if abs(int(got[i])-int(want[i])) > c.maxDiff {
					if bad++; bad < 5 {
						t.Errorf("sample %d: got %d, sox %d", i, got[i], want[i])
					}
				}
			}
		})
	}
}

// TestWAVWriterAgainstSox checks that sox reads WriteWAV's output back to
// the same samples and rate.
func TestWAVWriterAgainstSox(t *testing.T) {
	sox := soxPath(t)
	dir := t.TempDir()
	path := filepath.Join(dir, "written.wav")
	sig := testSignal(12345, 3)
	if err := WriteWAV(path, 22050, sig); err != nil {
		t.Fatal(err)
	}
	raw := filepath.Join(dir, "back.raw")
	runSox(t, sox, path, "-t", "raw", "-e", "signed", "-b", "16", "-L", raw)
	b, err := os.ReadFile(raw)
	if err != nil {
		t.Fatal(err)
	}
	if string(b) != string(int16Bytes(sig)) {
		t.Error("sox decodes different samples")
	}
	// sox --i -r prints the sample rate.
	out, err := execOutput(sox, "--i", "-r", path)
	if err != nil || strings.TrimSpace(out) != "22050" {
		t.Errorf("sox --i -r: %q, %v", out, err)
	}
}

func equalInt16(a, b []int16) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func floorDiv(a, b int) int {
	q := a / b
	if a%b != 0 && (a < 0) != (b < 0) {
		q--
	}
	return q
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}
