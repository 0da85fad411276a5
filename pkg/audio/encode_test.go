package audio

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// EncodeWAV must produce the same bytes as the file writer, and decode back
// to the same samples through our reader.
func TestEncodeWAVMatchesWriter(t *testing.T) {
	samples := []int16{0, 1, -1, 32767, -32768, 1234, -4321}
	path := filepath.Join(t.TempDir(), "clip.wav")
	if err := WriteWAV(path, 16000, samples); err != nil {
		t.Fatal(err)
	}
	onDisk, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	mem := EncodeWAV(16000, samples)
	if !bytes.Equal(onDisk, mem) {
		t.Fatalf("EncodeWAV differs from WriteWAV:\n% x\n% x", mem, onDisk)
	}
	r, err := NewWAVReader(bytes.NewReader(mem), "clip.wav", 0)
	if err != nil {
		t.Fatal(err)
	}
	got := make([]int16, 16)
	n, _ := r.Read(got)
	if n != len(samples) {
		t.Fatalf("read %d samples, want %d", n, len(samples))
	}
	for i := range samples {
		if got[i] != samples[i] {
			t.Errorf("sample %d = %d, want %d", i, got[i], samples[i])
		}
	}
}
