package features

import (
	"math"
	"testing"

	"github.com/mjibson/go-dsp/window"
)

// TestHannFixture compares with scipy.signal.get_window('hann', 1024),
// which returns the periodic ("DFT-even") window by default (scipy docs,
// get_window: fftbins=True). Tolerance: float32 rounding, 2^-24 relative
// to values <= 1, so 1e-7 absolute.
func TestHannFixture(t *testing.T) {
	r := loadReference(t)
	w := Hann(r.N)
	for i, want := range r.Hann {
		if d := math.Abs(float64(w[i]) - want); d > 1e-7 {
			t.Fatalf("w[%d] = %.9g, scipy %.9g", i, w[i], want)
		}
	}
}

// TestHannPeriodicNotSymmetric shows that go-dsp's window.Hann is the
// symmetric kind, w[n] = 0.5 (1 - cos(2 pi n / (L-1))): its last sample is
// 0 and equals its first, while the periodic window used here ends at
// w[N-1] = 0.5 - 0.5 cos(2 pi (N-1)/N) > 0 and has w[N/2] = 1 exactly.
// The two must therefore differ.
func TestHannPeriodicNotSymmetric(t *testing.T) {
	const n = 1024
	per := Hann(n)
	sym := window.Hann(n)
	if sym[n-1] != 0 || sym[0] != 0 {
		t.Errorf("go-dsp Hann ends %g, %g; expected the symmetric window with zeros at both ends", sym[0], sym[n-1])
	}
	if per[n/2] != 1 {
		t.Errorf("periodic Hann w[N/2] = %g, want 1", per[n/2])
	}
	if per[n-1] == 0 {
		t.Errorf("periodic Hann w[N-1] = 0, want > 0")
	}
	// Periodic w[n] equals the symmetric window of length N+1 truncated
	// to N (definition of the periodic window).
	sym1 := window.Hann(n + 1)
	maxDiff := 0.0
	for i := range per {
		if d := math.Abs(float64(per[i]) - sym1[i]); d > 1e-7 {
			t.Fatalf("w[%d] = %g, symmetric(N+1)[%d] = %g", i, per[i], i, sym1[i])
		}
		maxDiff = math.Max(maxDiff, math.Abs(float64(per[i])-sym[i]))
	}
	if maxDiff < 1e-4 {
		t.Errorf("periodic and symmetric windows differ by only %g", maxDiff)
	}
}

// TestHannSums checks the closed forms for the periodic Hann window:
// sum w = N/2 and sum w^2 = 3N/8 (both follow from the orthogonality of
// cos(2 pi k n / N) over a full period; Harris 1978, Proc. IEEE 66(1),
// coherent gain 0.5 and power 0.375, from memory).
func TestHannSums(t *testing.T) {
	for _, n := range []int{8, 1024, 16384} {
		t.Run(itoa(n), func(t *testing.T) {
			var s, s2 float64
			for _, v := range Hann(n) {
				s += float64(v)
				s2 += float64(v) * float64(v)
			}
			if math.Abs(s-float64(n)/2) > 1e-6*float64(n) || math.Abs(s2-3*float64(n)/8) > 1e-6*float64(n) {
				t.Errorf("sum w = %g (want %g), sum w^2 = %g (want %g)", s, float64(n)/2, s2, 3*float64(n)/8)
			}
		})
	}
}
