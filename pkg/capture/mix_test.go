package capture

import (
	"bytes"
	"encoding/binary"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/auscult/auscult/pkg/audio"
)

// TestToMonoMatchesAudio checks channel picking and mixing against
// pkg/audio's raw PCM decoder, so live capture and recorded input turn the
// same frames into the same samples.
func TestToMonoMatchesAudio(t *testing.T) {
	rng := rand.New(rand.NewPCG(492, 2))
	for _, channels := range []int{1, 2, 3, 4, 7} {
		frames := 2000
		buf := make([]int16, frames*channels)
		for i := range buf {
			switch i % 11 {
			case 0:
				buf[i] = -32768
			case 1:
				buf[i] = 32767
			default:
				buf[i] = int16(rng.IntN(65536) - 32768)
			}
		}
		raw := make([]byte, 2*len(buf))
		for i, v := range buf {
			binary.LittleEndian.PutUint16(raw[2*i:], uint16(v))
		}
		for ch := -1; ch < channels; ch++ {
			src, err := audio.NewRawSource(bytes.NewReader(raw), 16000, channels, ch)
			if err != nil {
				t.Fatal(err)
			}
			want := make([]int16, frames)
			for n := 0; n < frames; {
				k, err := src.Read(want[n:])
				if err != nil {
					t.Fatalf("audio.RawSource after %d frames: %v", n, err)
				}
				n += k
			}
			got := make([]int16, frames)
			toMono(got, buf, channels, ch)
			if !slices.Equal(got, want) {
				t.Errorf("%d channels, channel %d: differs from audio.RawSource", channels, ch)
			}
		}
	}
}

func TestToMonoRounding(t *testing.T) {
	cases := []struct {
		name  string
		frame []int16
		want  int16
	}{
		{"tie rounds up", []int16{1, 2}, 2},
		{"negative tie rounds up", []int16{-1, -2}, -1},
		{"full scale", []int16{32767, 32767}, 32767},
		{"negative full scale", []int16{-32768, -32768}, -32768},
		{"three channels", []int16{1, 1, 0}, 1},    // floor((2 + 1.5) / 3)
		{"three negative", []int16{-1, -1, 0}, -1}, // floor((-2 + 1.5) / 3)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := make([]int16, 1)
			toMono(got, c.frame, len(c.frame), -1)
			if got[0] != c.want {
				t.Errorf("mix of %v = %d, want %d", c.frame, got[0], c.want)
			}
		})
	}
}

func BenchmarkToMono(b *testing.B) {
	for _, c := range []struct {
		name         string
		channels, ch int
	}{{"stereo-pick", 2, 1}, {"stereo-mix", 2, -1}} {
		b.Run(c.name, func(b *testing.B) {
			buf := make([]int16, 1600*c.channels)
			mono := make([]int16, 1600)
			b.ReportAllocs()
			b.SetBytes(int64(2 * len(buf)))
			for b.Loop() {
				toMono(mono, buf, c.channels, c.ch)
			}
		})
	}
}
