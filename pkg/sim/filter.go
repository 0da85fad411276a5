package sim

import (
	"math"
	"math/cmplx"
)

// biquad is a second-order IIR section in direct form I with coefficients from
// R. Bristow-Johnson, "Cookbook formulae for audio EQ biquad filter
// coefficients" (the Audio EQ Cookbook).
type biquad struct {
	b0, b1, b2, a1, a2 float64
	x1, x2, y1, y2     float64
}

func newBiquad(b0, b1, b2, a0, a1, a2 float64) biquad {
	return biquad{b0: b0 / a0, b1: b1 / a0, b2: b2 / a0, a1: a1 / a0, a2: a2 / a0}
}

// clampHz keeps a corner frequency strictly inside (0, Nyquist).
func clampHz(f float64, rate int) float64 {
	return math.Min(math.Max(f, 1), 0.45*float64(rate))
}

// lowpass returns the cookbook LPF with corner f0 Hz and quality q.
func lowpass(rate int, f0, q float64) biquad {
	w := 2 * math.Pi * clampHz(f0, rate) / float64(rate)
	c, al := math.Cos(w), math.Sin(w)/(2*q)
	return newBiquad((1-c)/2, 1-c, (1-c)/2, 1+al, -2*c, 1-al)
}

// highpass returns the cookbook HPF with corner f0 Hz and quality q.
func highpass(rate int, f0, q float64) biquad {
	w := 2 * math.Pi * clampHz(f0, rate) / float64(rate)
	c, al := math.Cos(w), math.Sin(w)/(2*q)
	return newBiquad((1+c)/2, -(1 + c), (1+c)/2, 1+al, -2*c, 1-al)
}

// bandpass returns the cookbook BPF with 0 dB peak gain at f0 Hz.
func bandpass(rate int, f0, q float64) biquad {
	w := 2 * math.Pi * clampHz(f0, rate) / float64(rate)
	c, al := math.Cos(w), math.Sin(w)/(2*q)
	return newBiquad(al, 0, -al, 1+al, -2*c, 1-al)
}

// step filters one sample.
func (f *biquad) step(x float64) float64 {
	y := f.b0*x + f.b1*f.x1 + f.b2*f.x2 - f.a1*f.y1 - f.a2*f.y2
	f.x2, f.x1 = f.x1, x
	f.y2, f.y1 = f.y1, y
	return y
}

// run filters buf in place.
func (f *biquad) run(buf []float64) {
	for i, x := range buf {
		buf[i] = f.step(x)
	}
}

// response returns the complex frequency response at fHz.
func (f *biquad) response(rate int, fHz float64) complex128 {
	z1 := cmplx.Exp(complex(0, -2*math.Pi*fHz/float64(rate)))
	z2 := z1 * z1
	num := complex(f.b0, 0) + complex(f.b1, 0)*z1 + complex(f.b2, 0)*z2
	den := 1 + complex(f.a1, 0)*z1 + complex(f.a2, 0)*z2
	return num / den
}

// klattResonator is the two-pole digital resonator of D. H. Klatt, "Software
// for a cascade/parallel formant synthesizer", JASA 67(3):971, 1980:
// y = A x + B y1 + C y2 with C = -exp(-2 pi bw T), B = 2 exp(-pi bw T)
// cos(2 pi f T), A = 1 - B - C (unity gain at 0 Hz).
type klattResonator struct {
	a, b, c float64
	y1, y2  float64
}

// set retunes the resonator to centre fHz and bandwidth bwHz.
func (k *klattResonator) set(rate int, fHz, bwHz float64) {
	t := 1 / float64(rate)
	k.c = -math.Exp(-2 * math.Pi * bwHz * t)
	k.b = 2 * math.Exp(-math.Pi*bwHz*t) * math.Cos(2*math.Pi*clampHz(fHz, rate)*t)
	k.a = 1 - k.b - k.c
}

func (k *klattResonator) step(x float64) float64 {
	y := k.a*x + k.b*k.y1 + k.c*k.y2
	k.y2, k.y1 = k.y1, y
	return y
}
