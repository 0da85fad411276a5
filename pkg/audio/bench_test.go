package audio

import (
	"bytes"
	"testing"
)

// BenchmarkWAVRead16 decodes a 10 s mono 16-bit 44.1 kHz file from memory.
// SetBytes makes go test report MB/s of WAV data; samples/s is also
// reported.
func BenchmarkWAVRead16(b *testing.B) {
	const n = 441000
	file := riff(chunk("fmt ", fmtPlain(tagPCM, 1, 44100, 16)), chunk("data", int16Bytes(testSignal(n, 1))))
	benchWAV(b, file, n, 0)
}

// BenchmarkWAVRead24StereoMix decodes and mixes a 10 s stereo 24-bit file.
func BenchmarkWAVRead24StereoMix(b *testing.B) {
	const n = 441000
	file := riff(chunk("fmt ", fmtPlain(tagPCM, 2, 44100, 24)), chunk("data", make([]byte, 6*n)))
	benchWAV(b, file, n, -1)
}

func benchWAV(b *testing.B, file []byte, frames, channel int) {
	buf := make([]int16, 4096)
	rd := bytes.NewReader(file)
	b.SetBytes(int64(len(file)))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		rd.Reset(file)
		w, err := NewWAVReader(rd, "bench.wav", channel)
		if err != nil {
			b.Fatal(err)
		}
		total := 0
		for {
			k, err := w.Read(buf)
			total += k
			if err != nil {
				break
			}
		}
		if total != frames {
			b.Fatalf("%d frames", total)
		}
	}
	b.ReportMetric(float64(frames)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
}

// BenchmarkResample44100to16000 resamples 10 s of audio per iteration and
// reports input samples per second; allocations are those of constructing
// the resampler (filter table), none per Read.
func BenchmarkResample44100to16000(b *testing.B) { benchResample(b, 44100, 16000) }

// BenchmarkResample48000to16000 is the same for the 1:3 ratio.
func BenchmarkResample48000to16000(b *testing.B) { benchResample(b, 48000, 16000) }

// BenchmarkResampleRead44100to16000 times Reads only, on one resampler fed
// from an endless source; it must report 0 allocs/op. 44100 Hz to
// 16000 Hz takes the exact rational path (160/441).
func BenchmarkResampleRead44100to16000(b *testing.B) { benchResampleRead(b, 44100, 16000) }

// BenchmarkResampleRead11127to16000 is the same for a rate pair on the
// interpolating path (reduced ratio 16000/11127).
func BenchmarkResampleRead11127to16000(b *testing.B) { benchResampleRead(b, 11127, 16000) }

// BenchmarkResampleRead47999to16000 is the interpolating path downsampling.
func BenchmarkResampleRead47999to16000(b *testing.B) { benchResampleRead(b, 47999, 16000) }

func benchResampleRead(b *testing.B, in, out int) {
	r, err := NewResampler(&loopSource{rate: in, s: testSignal(in, 2)}, out)
	if err != nil {
		b.Fatal(err)
	}
	buf := make([]int16, 1600)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := r.Read(buf); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(buf))*float64(in)/float64(out)*float64(b.N)/b.Elapsed().Seconds(), "in-samples/s")
}

func benchResample(b *testing.B, in, out int) {
	x := testSignal(10*in, 2)
	buf := make([]int16, 4096)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		r, err := NewResampler(NewSliceSource(in, x), out)
		if err != nil {
			b.Fatal(err)
		}
		for {
			if _, err := r.Read(buf); err != nil {
				break
			}
		}
	}
	b.ReportMetric(float64(len(x))*float64(b.N)/b.Elapsed().Seconds(), "in-samples/s")
}

// loopSource repeats s forever.
type loopSource struct {
	rate int
	s    []int16
	pos  int
}

func (l *loopSource) Rate() int { return l.rate }
func (l *loopSource) Read(p []int16) (int, error) {
	n := copy(p, l.s[l.pos:])
	l.pos = (l.pos + n) % len(l.s)
	return n, nil
}
