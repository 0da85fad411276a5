package sim

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"
)

// bandPower returns the mean periodogram power of x between lo and hi Hz.
func bandPower(x []float64, rate int, lo, hi float64) float64 {
	n := nextPow2(len(x))
	buf := make([]complex128, n)
	for i, v := range x {
		buf[i] = complex(v, 0)
	}
	newFFTPlan(n).transform(buf, false)
	var p float64
	var k int
	for i := 1; i < n/2; i++ {
		f := float64(i) * float64(rate) / float64(n)
		if f >= lo && f < hi {
			p += real(buf[i])*real(buf[i]) + imag(buf[i])*imag(buf[i])
			k++
		}
	}
	return p / float64(k)
}

func TestFFTAgainstDFT(t *testing.T) {
	// Definition of the DFT, X[k] = sum x[n] exp(-2 pi i k n / N), computed
	// naively; the inverse must restore the input.
	for _, n := range []int{1, 2, 8, 64} {
		t.Run(fmt.Sprintf("n=%d", n), func(t *testing.T) {
			r := newRand(uint64(n), 1)
			x := make([]complex128, n)
			for i := range x {
				x[i] = complex(r.NormFloat64(), r.NormFloat64())
			}
			y := append([]complex128(nil), x...)
			p := newFFTPlan(n)
			p.transform(y, false)
			for k := range n {
				var want complex128
				for j := range n {
					want += x[j] * cmplx.Exp(complex(0, -2*math.Pi*float64(k*j)/float64(n)))
				}
				if cmplx.Abs(y[k]-want) > 1e-9 {
					t.Fatalf("bin %d: got %v want %v", k, y[k], want)
				}
			}
			p.transform(y, true)
			for i := range x {
				if cmplx.Abs(y[i]-x[i]) > 1e-12 {
					t.Fatalf("inverse sample %d: got %v want %v", i, y[i], x[i])
				}
			}
		})
	}
}

func TestConvolve2AgainstDirect(t *testing.T) {
	// Direct linear convolution y[n] = sum h[k] x[n-k] as the reference.
	r := newRand(7, 1)
	a, b := white(r, 300), white(r, 300)
	h1, h2 := white(r, 37), white(r, 90)
	ya, yb := convolve2(a, h1, b, h2)
	direct := func(x, h []float64, n int) float64 {
		var s float64
		for k := 0; k < len(h) && k <= n; k++ {
			s += h[k] * x[n-k]
		}
		return s
	}
	for n := range a {
		if d := math.Abs(ya[n] - direct(a, h1, n)); d > 1e-9 {
			t.Fatalf("a*h1 at %d off by %g", n, d)
		}
		if d := math.Abs(yb[n] - direct(b, h2, n)); d > 1e-9 {
			t.Fatalf("b*h2 at %d off by %g", n, d)
		}
	}
}

func TestBiquadCookbook(t *testing.T) {
	// Audio EQ Cookbook (Bristow-Johnson): LPF and HPF with Q = 1/sqrt 2 are
	// Butterworth, -3.01 dB at f0; the BPF "constant 0 dB peak gain" has unity
	// gain at f0; LPF has unity gain at 0 Hz.
	const rate = 16000
	tests := []struct {
		name   string
		f      biquad
		at     float64
		wantDB float64
	}{
		{"lowpass corner", lowpass(rate, 1000, math.Sqrt2/2), 1000, -3.0103},
		{"lowpass dc", lowpass(rate, 1000, math.Sqrt2/2), 0, 0},
		{"highpass corner", highpass(rate, 35, math.Sqrt2/2), 35, -3.0103},
		{"highpass 1 kHz", highpass(rate, 35, math.Sqrt2/2), 1000, 0},
		{"bandpass peak", bandpass(rate, 3000, 20), 3000, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := 20 * math.Log10(cmplx.Abs(tc.f.response(rate, tc.at)))
			if math.Abs(got-tc.wantDB) > 0.02 {
				t.Errorf("got %.3f dB, want %.3f dB", got, tc.wantDB)
			}
		})
	}
}

func TestKlattResonatorUnityDC(t *testing.T) {
	// Klatt 1980: A = 1 - B - C gives unity gain at 0 Hz; a constant input
	// settles to the same constant.
	var k klattResonator
	k.set(16000, 700, 100)
	var y float64
	for range 4000 {
		y = k.step(1)
	}
	if math.Abs(y-1) > 1e-6 {
		t.Errorf("dc gain %g, want 1", y)
	}
}

func TestPinkSlope(t *testing.T) {
	// Pink noise has power spectral density ~ 1/f: -3.01 dB per octave
	// (definition). Three octaves, 250-500 Hz to 2-4 kHz, should differ by
	// about -9 dB per Hz; the pole-zero approximation is allowed +-1.5 dB.
	const rate = 16000
	x := white(newRand(3, 1), 1<<17)
	pinkFilter(x, rate, 20)
	got := 10 * math.Log10(bandPower(x, rate, 2000, 4000)/bandPower(x, rate, 250, 500))
	if math.Abs(got+9.03) > 1.5 {
		t.Errorf("slope over three octaves %.2f dB, want -9.03 +- 1.5", got)
	}
}

func TestRoomIR(t *testing.T) {
	// Unit energy by construction; reverberation time from Schroeder's
	// backward integration (M. R. Schroeder, "New method of measuring
	// reverberation time", JASA 37:409, 1965): the decay from -5 to -25 dB
	// (T20), times 3, must match RT60 within 10 %.
	const rate = 16000
	for _, rt := range []float64{0.6, 1.0, 1.5} {
		t.Run(fmt.Sprintf("rt60=%.1f", rt), func(t *testing.T) {
			h := roomIR(newRand(11, 2), rate, rt, -5)
			var e float64
			for _, v := range h {
				e += v * v
			}
			if math.Abs(e-1) > 1e-9 {
				t.Fatalf("energy %g, want 1", e)
			}
			edc := make([]float64, len(h))
			var acc float64
			for i := len(h) - 1; i >= 0; i-- {
				acc += h[i] * h[i]
				edc[i] = acc
			}
			at := func(db float64) float64 {
				for i, v := range edc {
					if 10*math.Log10(v/edc[0]) <= db {
						return float64(i) / rate
					}
				}
				return math.NaN()
			}
			got := 3 * (at(-25) - at(-5))
			if math.Abs(got-rt)/rt > 0.10 {
				t.Errorf("T20-based RT60 %.3f s, want %.2f s +- 10 %%", got, rt)
			}
		})
	}
}
