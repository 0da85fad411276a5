package features

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// benchFrame returns n deterministic pseudo-random samples in [-1, 1).
func benchFrame(n int) []float32 {
	rng := rand.New(rand.NewPCG(7, 8))
	x := make([]float32, n)
	for i := range x {
		x[i] = float32(rng.Float64()*2 - 1)
	}
	return x
}

// benchOwnFFT measures FFT.Power for length n.
func benchOwnFFT(b *testing.B, n int) {
	f, err := NewFFT(n)
	if err != nil {
		b.Fatal(err)
	}
	x := benchFrame(n)
	out := make([]float32, n/2+1)
	b.ReportAllocs()
	b.SetBytes(int64(2 * n)) // int16 input equivalent
	for b.Loop() {
		f.Power(x, out)
	}
}

// benchGonumFFT measures gonum's real FFT with a reused dst plus the
// |X_k|^2 pass, the same work as FFT.Power, in float64.
func benchGonumFFT(b *testing.B, n int) {
	f := fourier.NewFFT(n)
	x32 := benchFrame(n)
	x := make([]float64, n)
	for i, v := range x32 {
		x[i] = float64(v)
	}
	dst := make([]complex128, n/2+1)
	out := make([]float32, n/2+1)
	b.ReportAllocs()
	b.SetBytes(int64(2 * n))
	for b.Loop() {
		dst = f.Coefficients(dst, x)
		for k, c := range dst {
			out[k] = float32(real(c)*real(c) + imag(c)*imag(c))
		}
	}
}

// BenchmarkFFT1024 compares the package's real FFT with gonum's for the
// default frame length.
func BenchmarkFFT1024(b *testing.B) {
	b.Run("own", func(b *testing.B) { benchOwnFFT(b, 1024) })
	b.Run("gonum", func(b *testing.B) { benchGonumFFT(b, 1024) })
}

// BenchmarkFFT16384 measures the long FFT (about 1 Hz bins at 16 kHz).
func BenchmarkFFT16384(b *testing.B) {
	b.Run("own", func(b *testing.B) { benchOwnFFT(b, 16384) })
	b.Run("gonum", func(b *testing.B) { benchGonumFFT(b, 16384) })
}

// BenchmarkExtractor measures one frame of the default configuration
// (16 kHz, 1024/512, 128 mel bands): window, FFT, power, mel, dB.
func BenchmarkExtractor(b *testing.B) {
	e, err := NewExtractor(DefaultConfig())
	if err != nil {
		b.Fatal(err)
	}
	x := benchFrame(1024)
	frame := make([]int16, len(x))
	for i, v := range x {
		frame[i] = int16(v * 20000)
	}
	dst := make([]float32, 128)
	b.ReportAllocs()
	b.SetBytes(int64(2 * len(frame)))
	for b.Loop() {
		e.Rows(frame, dst)
	}
	// One hour at 16 kHz with hop 512 is 112,500 frames.
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)*112500/1e9, "s/hour")
}

// BenchmarkMelApply measures the sparse mel filterbank alone.
func BenchmarkMelApply(b *testing.B) {
	bank, err := NewMelBank(16000, 1024, 128, 0, 8000)
	if err != nil {
		b.Fatal(err)
	}
	p := benchFrame(513)
	out := make([]float32, 128)
	b.ReportAllocs()
	for b.Loop() {
		bank.Apply(p, out)
	}
}

// BenchmarkDB measures DB over 128 values (one row), the fused row loop
// the Extractor uses, and 10*math.Log10 for comparison.
func BenchmarkDB(b *testing.B) {
	in := make([]float32, 128)
	for i := range in {
		in[i] = float32(math.Pow(10, float64(i%40)-20))
	}
	out := make([]float32, 128)
	b.Run("table", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			for i, v := range in {
				out[i] = DB(v)
			}
		}
	})
	b.Run("row", func(b *testing.B) {
		// The Extractor's fused loop: DB, reference offset and floor.
		b.ReportAllocs()
		for b.Loop() {
			dbInto(out, in, 49.9, -100)
		}
	})
	b.Run("math.Log10", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			for i, v := range in {
				out[i] = float32(10 * math.Log10(float64(v)))
			}
		}
	})
}
