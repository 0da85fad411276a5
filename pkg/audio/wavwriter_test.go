package audio

import (
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// TestWAVWriterHeader checks the bytes of a tiny file against the canonical
// 44-byte PCM header laid out by hand from the Microsoft RIFF/WAVE
// specification (1991; layout from memory, and sox reads the result in
// TestWAVWriterAgainstSox): RIFF size = 36 + data bytes, fmt size 16, tag 1,
// 1 channel, rate, byte rate = rate*2, block align 2, 16 bits.
func TestWAVWriterHeader(t *testing.T) {
	path := filepath.Join(t.TempDir(), "tiny.wav")
	if err := WriteWAV(path, 8000, []int16{1, -2}); err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	want := []byte{
		'R', 'I', 'F', 'F', 40, 0, 0, 0, 'W', 'A', 'V', 'E',
		'f', 'm', 't', ' ', 16, 0, 0, 0, 1, 0, 1, 0,
		0x40, 0x1F, 0, 0, 0x80, 0x3E, 0, 0, 2, 0, 16, 0,
		'd', 'a', 't', 'a', 4, 0, 0, 0, 1, 0, 0xFE, 0xFF,
	}
	if !slices.Equal(got, want) {
		t.Errorf("file bytes\n got %v\nwant %v", got, want)
	}
	if fi, err := os.Stat(path); err != nil || fi.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, %v; want 0644", fi.Mode(), err)
	}
}

// TestWAVWriterAtomic checks that the destination appears only on Close,
// that Abort leaves an existing file untouched, and that no temporary
// files remain.
func TestWAVWriterAtomic(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "bearing-3.wav")
	w, err := CreateWAV(path, 16000)
	if err != nil {
		t.Fatal(err)
	}
	sig := testSignal(50000, 5)
	for i := 0; i < len(sig); i += 777 {
		if err := w.Write(sig[i:min(i+777, len(sig))]); err != nil {
			t.Fatal(err)
		}
	}
	if _, err := os.Stat(path); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("destination exists before Close: %v", err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	r, err := OpenWAV(path, 0)
	if err != nil {
		t.Fatal(err)
	}
	if got := readAll(t, r, 4096); !slices.Equal(got, sig) || r.Rate() != 16000 {
		t.Error("read back differs")
	}
	r.Close()

	w2, err := CreateWAV(path, 16000)
	if err != nil {
		t.Fatal(err)
	}
	w2.Write([]int16{1, 2, 3})
	w2.Abort()
	r, err = OpenWAV(path, 0)
	if err != nil {
		t.Fatal(err)
	}
	if r.Info().Frames != int64(len(sig)) {
		t.Error("Abort changed the existing file")
	}
	r.Close()
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("directory holds %d entries, want only the wav file", len(entries))
	}
}

func TestWAVWriterErrors(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "out.wav")
	cases := []struct {
		name string
		run  func() error
		want error
	}{
		{"zero rate", func() error { _, err := CreateWAV(path, 0); return err }, ErrSampleRate},
		{"rate too high", func() error { return WriteWAV(path, MaxSampleRate+1, nil) }, ErrSampleRate},
		{"missing directory", func() error { _, err := CreateWAV(filepath.Join(dir, "nope", "x.wav"), 8000); return err }, os.ErrNotExist},
		{"write after close", func() error {
			w, _ := CreateWAV(path, 8000)
			w.Close()
			return w.Write([]int16{1})
		}, ErrWriterClosed},
		{"double close", func() error {
			w, _ := CreateWAV(path, 8000)
			w.Close()
			return w.Close()
		}, ErrWriterClosed},
		{"too long", func() error {
			w, _ := CreateWAV(path, 8000)
			defer w.Abort()
			w.samples = maxWAVSamples - 1
			return w.Write([]int16{1, 2})
		}, ErrTooLong},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.run()
			if !errors.Is(err, c.want) {
				t.Fatalf("err = %v, want %v", err, c.want)
			}
			if !strings.HasPrefix(err.Error(), "audio: ") || !strings.Contains(err.Error(), ".wav") {
				t.Errorf("message %q should start with audio: and name the file", err)
			}
		})
	}
}

func TestWAVWriterWriteDoesNotAllocate(t *testing.T) {
	w, err := CreateWAV(filepath.Join(t.TempDir(), "a.wav"), 8000)
	if err != nil {
		t.Fatal(err)
	}
	defer w.Abort()
	buf := testSignal(10000, 9)
	if a := testing.AllocsPerRun(50, func() { w.Write(buf) }); a != 0 {
		t.Errorf("%v allocations per Write", a)
	}
}
