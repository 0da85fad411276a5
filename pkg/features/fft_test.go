package features

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	dspfft "github.com/mjibson/go-dsp/fft"
)

// TestNewFFTSizes checks the accepted and rejected lengths.
func TestNewFFTSizes(t *testing.T) {
	for _, tc := range []struct {
		n  int
		ok bool
	}{{4, true}, {8, true}, {1024, true}, {16384, true}, {0, false}, {2, false}, {3, false}, {1000, false}, {-8, false}} {
		_, err := NewFFT(tc.n)
		if tc.ok != (err == nil) || (err != nil && !errors.Is(err, ErrFFTSize)) {
			t.Errorf("NewFFT(%d) error = %v, want ok = %v", tc.n, err, tc.ok)
		}
	}
}

// naivePower is a float64 direct DFT, the textbook definition
// X_k = sum_t x_t exp(-2 pi i k t / n).
func naivePower(x []float64) []float64 {
	n := len(x)
	out := make([]float64, n/2+1)
	for k := range out {
		var re, im float64
		for t, v := range x {
			a := -2 * math.Pi * float64((k*t)%n) / float64(n)
			re += v * math.Cos(a)
			im += v * math.Sin(a)
		}
		out[k] = re*re + im*im
	}
	return out
}

// normRelErr returns ||sqrt(a) - sqrt(b)||_2 / ||sqrt(b)||_2 for power
// spectra a (float32) and b (float64): the norm-wise relative error of
// the magnitudes, which is bounded by that of the complex spectrum.
func normRelErr(a []float32, b []float64) float64 {
	var num, den float64
	for k := range b {
		d := math.Sqrt(float64(a[k])) - math.Sqrt(b[k])
		num += d * d
		den += b[k]
	}
	return math.Sqrt(num / den)
}

// TestFFTPowerAllSizes checks every length from 4 to 16384 against the
// float64 direct DFT. Bound: a float32 FFT has norm-wise relative error
// O(u log2 n), u = 2^-24 (Higham, Accuracy and Stability of Numerical
// Algorithms, 2nd ed., sec. 24.1, from memory); 1e-6 * log2 n leaves
// roughly a factor 10 margin over u log2 n.
func TestFFTPowerAllSizes(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for n := 4; n <= 16384; n *= 2 {
		t.Run("n="+itoa(n), func(t *testing.T) {
			f, err := NewFFT(n)
			if err != nil {
				t.Fatal(err)
			}
			x := make([]float32, n)
			x64 := make([]float64, n)
			for i := range x {
				x[i] = float32(rng.Float64()*2 - 1)
				x64[i] = float64(x[i])
			}
			got := make([]float32, n/2+1)
			f.Power(x, got)
			var want []float64
			if n <= 2048 {
				want = naivePower(x64)
			} else {
				// Direct DFT is too slow here; go-dsp's float64 FFT is
				// the independent reference instead.
				c := dspfft.FFTReal(x64)
				want = make([]float64, n/2+1)
				for k := range want {
					a := cmplx.Abs(c[k])
					want[k] = a * a
				}
			}
			bound := 1e-6 * math.Log2(float64(n))
			if e := normRelErr(got, want); e > bound {
				t.Errorf("norm-wise relative error %.3g > %.3g", e, bound)
			}
		})
	}
}

// TestFFTPowerTones checks single bins: a cosine at bin k0 with amplitude
// A gives |X_k0| = A n / 2 and nothing elsewhere (DFT of a complex
// exponential, any DSP textbook).
func TestFFTPowerTones(t *testing.T) {
	const n = 64
	f, _ := NewFFT(n)
	x := make([]float32, n)
	out := make([]float32, n/2+1)
	for _, k0 := range []int{0, 1, 5, 16, 31, 32} {
		t.Run("k="+itoa(k0), func(t *testing.T) {
			for i := range x {
				x[i] = float32(math.Cos(2 * math.Pi * float64(k0*i) / n))
			}
			f.Power(x, out)
			peak := float64(n) / 2
			if k0 == 0 || k0 == n/2 {
				peak = n
			}
			for k, v := range out {
				want := 0.0
				if k == k0 {
					want = peak * peak
				}
				if math.Abs(float64(v)-want) > 1e-3 {
					t.Errorf("bin %d: power %g, want %g", k, v, want)
				}
			}
		})
	}
}

// TestFFTParseval checks Parseval's theorem for the one-sided spectrum of
// a real sequence: sum x^2 = (1/N)(|X_0|^2 + 2 sum_{k=1}^{N/2-1} |X_k|^2 +
// |X_{N/2}|^2). Tolerance: relative 1e-5, float32 accumulation over a few
// thousand terms (common practice, no source).
func TestFFTParseval(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{16, 256, 1024, 16384} {
		t.Run("n="+itoa(n), func(t *testing.T) {
			f, _ := NewFFT(n)
			x := make([]float32, n)
			var energy float64
			for i := range x {
				x[i] = float32(rng.NormFloat64())
				energy += float64(x[i]) * float64(x[i])
			}
			p := make([]float32, n/2+1)
			f.Power(x, p)
			s := float64(p[0]) + float64(p[n/2])
			for k := 1; k < n/2; k++ {
				s += 2 * float64(p[k])
			}
			s /= float64(n)
			if math.Abs(s-energy) > 1e-5*energy {
				t.Errorf("sum x^2 = %.9g, spectrum gives %.9g", energy, s)
			}
		})
	}
}

// TestFFTAgainstGoDSP cross-checks bin by bin against go-dsp's
// fft.FFTReal (float64, an independent implementation). Tolerance per
// bin: 1e-5 of the largest magnitude, from the float32 norm-wise bound
// above (common practice, no source).
func TestFFTAgainstGoDSP(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	const n = 1024
	f, _ := NewFFT(n)
	x := make([]float32, n)
	x64 := make([]float64, n)
	for i := range x {
		x[i] = float32(rng.Float64()*2 - 1)
		x64[i] = float64(x[i])
	}
	got := make([]float32, n/2+1)
	f.Power(x, got)
	ref := dspfft.FFTReal(x64)
	maxMag := 0.0
	for k := 0; k <= n/2; k++ {
		maxMag = math.Max(maxMag, cmplx.Abs(ref[k]))
	}
	for k := 0; k <= n/2; k++ {
		if d := math.Abs(math.Sqrt(float64(got[k])) - cmplx.Abs(ref[k])); d > 1e-5*maxMag {
			t.Errorf("bin %d: |X| = %g, go-dsp %g", k, math.Sqrt(float64(got[k])), cmplx.Abs(ref[k]))
		}
	}
}

// TestFFTFixture compares against numpy.fft.rfft of the fixture frame
// (after the periodic Hann window, samples / 32768). Bound: norm-wise
// relative magnitude error < 1e-5 (u log2 n = 6e-7 with margin, see
// TestFFTPowerAllSizes), and per bin within 1e-6 of the peak power.
func TestFFTFixture(t *testing.T) {
	r := loadReference(t)
	f, _ := NewFFT(r.N)
	x := make([]float32, r.N)
	for i, s := range r.Frame {
		x[i] = float32(float64(s) / 32768 * r.Hann[i])
	}
	got := make([]float32, r.N/2+1)
	f.Power(x, got)
	if e := normRelErr(got, r.Power); e > 1e-5 {
		t.Errorf("norm-wise relative error vs numpy %.3g > 1e-5", e)
	}
	peak := 0.0
	for _, v := range r.Power {
		peak = math.Max(peak, v)
	}
	for k, v := range r.Power {
		if d := math.Abs(float64(got[k]) - v); d > 1e-6*peak {
			t.Errorf("bin %d: %g, numpy %g", k, got[k], v)
		}
	}
}

// TestFFTPowerPanics checks the length contract.
func TestFFTPowerPanics(t *testing.T) {
	f, _ := NewFFT(8)
	defer func() {
		if recover() == nil {
			t.Error("no panic for wrong lengths")
		}
	}()
	f.Power(make([]float32, 7), make([]float32, 5))
}

// TestFFTNoAlloc checks that Power does not allocate.
func TestFFTNoAlloc(t *testing.T) {
	f, _ := NewFFT(1024)
	x := make([]float32, 1024)
	out := make([]float32, 513)
	if a := testing.AllocsPerRun(100, func() { f.Power(x, out) }); a != 0 {
		t.Errorf("%v allocations per call, want 0", a)
	}
}
