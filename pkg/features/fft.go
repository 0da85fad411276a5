package features

import (
	"fmt"
	"math"
	"math/bits"
)

// FFT computes power spectra of real frames of a fixed power-of-two
// length n. It runs an n/2-point complex FFT on the even and odd samples
// packed as real and imaginary parts (decimation in time, input gathered
// in bit-reversed order; radix-4 stages, preceded by one radix-2 stage
// when log2(n/2) is odd, which is fused with the first radix-4 stage into
// an 8-point pass), and then separates the two half-length spectra
// ("real split"). Twiddles and the bit-reversal table are precomputed in
// float32, so a call does not allocate. For n = 1024 the 9 levels of the
// 512-point transform take one 8-point pass and three radix-4 passes; for
// n = 16384 the 13 levels take one 8-point pass and five radix-4 passes.
//
// An FFT holds scratch space: it is not safe for concurrent use.
type FFT struct {
	n      int
	m      int       // n/2, the complex transform length
	rev    []int32   // bit reversal over log2(m) bits
	re, im []float32 // work arrays, length m
	first2 bool      // log2(m) odd: a radix-2 stage with L = 1 comes first
	stages []r4stage // radix-4 stages in order of increasing L
	splitC []float32 // cos(2 pi k / n), k = 0..m/2
	splitS []float32 // sin(2 pi k / n), k = 0..m/2
}

// r4stage is one radix-4 pass combining four length-l transforms.
type r4stage struct {
	l  int
	tw []tw3 // twiddles W^j, W^2j, W^3j with W = exp(-2 pi i / 4l), j < l
}

// tw3 holds the three twiddles of one radix-4 butterfly.
type tw3 struct {
	w1r, w1i, w2r, w2i, w3r, w3i float32
}

// NewFFT returns an FFT for real input of length n. It returns an error
// wrapping ErrFFTSize unless n is a power of two with 4 <= n <= 2^24.
func NewFFT(n int) (*FFT, error) {
	if n < 4 || n > 1<<24 || n&(n-1) != 0 {
		return nil, fmt.Errorf("%w: got %d", ErrFFTSize, n)
	}
	m := n / 2
	p := bits.TrailingZeros(uint(m))
	f := &FFT{
		n:      n,
		m:      m,
		rev:    make([]int32, m),
		re:     make([]float32, m),
		im:     make([]float32, m),
		first2: p%2 == 1,
		splitC: make([]float32, m/2+1),
		splitS: make([]float32, m/2+1),
	}
	for j := range f.rev {
		f.rev[j] = int32(bits.Reverse32(uint32(j)) >> (32 - p))
	}
	l := 1
	if f.first2 {
		l = 2
	}
	for ; 4*l <= m; l *= 4 {
		st := r4stage{l: l, tw: make([]tw3, l)}
		for j := range st.tw {
			a := -2 * math.Pi * float64(j) / float64(4*l)
			st.tw[j] = tw3{
				w1r: float32(math.Cos(a)), w1i: float32(math.Sin(a)),
				w2r: float32(math.Cos(2 * a)), w2i: float32(math.Sin(2 * a)),
				w3r: float32(math.Cos(3 * a)), w3i: float32(math.Sin(3 * a)),
			}
		}
		f.stages = append(f.stages, st)
	}
	for k := range f.splitC {
		a := 2 * math.Pi * float64(k) / float64(n)
		f.splitC[k] = float32(math.Cos(a))
		f.splitS[k] = float32(math.Sin(a))
	}
	return f, nil
}

// Len returns the real transform length n.
func (f *FFT) Len() int { return f.n }

// Power writes |X_k|^2, k = 0..n/2, of the real sequence x (length n)
// into out (length n/2+1). X is the unnormalised DFT
// X_k = sum_t x_t exp(-2 pi i k t / n), as numpy.fft.rfft computes it.
// Apply any window to x beforehand. Power does not allocate; it panics if
// the slice lengths are wrong.
func (f *FFT) Power(x []float32, out []float32) {
	if len(x) != f.n || len(out) != f.m+1 {
		panic(fmt.Sprintf("features: FFT.Power: len(x) = %d, len(out) = %d, want %d and %d", len(x), len(out), f.n, f.m+1))
	}
	re, im, rev := f.re, f.im, f.rev[:f.m]
	re = re[:len(rev)]
	im = im[:len(rev)]
	for j, r := range rev {
		re[j] = x[2*r]
		im[j] = x[2*r+1]
	}
	f.transform()
	f.splitPower(out)
}

// powerInt16 is Power for int16 input multiplied by a window on the way
// in; it fuses conversion, windowing and the bit-reversed load into one
// pass. win must be in gathered order (see gatherWindow).
func (f *FFT) powerInt16(x []int16, win []float32, out []float32) {
	re, im, rev := f.re, f.im, f.rev[:f.m]
	x = x[:2*len(rev)]
	win = win[:2*len(rev)]
	re = re[:len(rev)]
	im = im[:len(rev)]
	for j, r := range rev {
		// rev is an involution: gather z[rev j] into slot j.
		re[j] = float32(x[2*r]) * win[2*j]
		im[j] = float32(x[2*r+1]) * win[2*j+1]
	}
	f.transform()
	f.splitPower(out)
}

// gatherWindow returns w (length n) reordered as powerInt16 reads it:
// element 2j+e is w[2 rev(j) + e], so the window is read sequentially.
func (f *FFT) gatherWindow(w []float32) []float32 {
	g := make([]float32, f.n)
	for j, r := range f.rev {
		g[2*j] = w[2*r]
		g[2*j+1] = w[2*r+1]
	}
	return g
}

// transform runs the in-place complex FFT on re, im (bit-reversed input,
// natural-order output).
func (f *FFT) transform() {
	re, im := f.re, f.im
	m := len(re)
	im = im[:m]
	if f.first2 {
		if m >= 8 {
			radix8First(re, im)
		} else {
			for g := 0; g+1 < m; g += 2 {
				ar, ai, br, bi := re[g], im[g], re[g+1], im[g+1]
				re[g], im[g] = ar+br, ai+bi
				re[g+1], im[g+1] = ar-br, ai-bi
			}
		}
	}
	for _, st := range f.stages {
		l := st.l
		switch {
		case l == 1:
			radix4First(re, im)
			continue
		case l == 2 && f.first2:
			continue // done by radix8First
		}
		for g := 0; g < m; g += 4 * l {
			r0 := re[g : g+l]
			r2 := re[g+l : g+2*l][:len(r0)]
			r1 := re[g+2*l : g+3*l][:len(r0)]
			r3 := re[g+3*l : g+4*l][:len(r0)]
			i0 := im[g : g+l][:len(r0)]
			i2 := im[g+l : g+2*l][:len(r0)]
			i1 := im[g+2*l : g+3*l][:len(r0)]
			i3 := im[g+3*l : g+4*l][:len(r0)]
			tw := st.tw[:len(r0)]
			for j := range r0 {
				w := &tw[j]
				// t1 = W^j A1, t2 = W^2j A2, t3 = W^3j A3.
				t1r := w.w1r*r1[j] - w.w1i*i1[j]
				t1i := w.w1r*i1[j] + w.w1i*r1[j]
				t2r := w.w2r*r2[j] - w.w2i*i2[j]
				t2i := w.w2r*i2[j] + w.w2i*r2[j]
				t3r := w.w3r*r3[j] - w.w3i*i3[j]
				t3i := w.w3r*i3[j] + w.w3i*r3[j]
				s0r, s0i := r0[j]+t2r, i0[j]+t2i
				d0r, d0i := r0[j]-t2r, i0[j]-t2i
				s1r, s1i := t1r+t3r, t1i+t3i
				d1r, d1i := t1r-t3r, t1i-t3i
				r0[j], i0[j] = s0r+s1r, s0i+s1i
				r1[j], i1[j] = s0r-s1r, s0i-s1i
				// X[j+l] = d0 - i d1, X[j+3l] = d0 + i d1.
				r2[j], i2[j] = d0r+d1i, d0i-d1r
				r3[j], i3[j] = d0r-d1i, d0i+d1r
			}
		}
	}
}

// sqrtHalf is 1/sqrt(2).
const sqrtHalf = 0.70710678118654752

// radix8First runs the radix-2 stage with l = 1 and the radix-4 stage
// with l = 2 together on each run of 8 elements, with the twiddles
// exp(-2 pi i j/8) written out.
func radix8First(re, im []float32) {
	im = im[:len(re)]
	for g := 0; g+7 < len(re); g += 8 {
		x := re[g : g+8 : g+8]
		y := im[g : g+8 : g+8]
		// Radix-2 pairs.
		b0r, b0i, b1r, b1i := x[0]+x[1], y[0]+y[1], x[0]-x[1], y[0]-y[1]
		b2r, b2i, b3r, b3i := x[2]+x[3], y[2]+y[3], x[2]-x[3], y[2]-y[3]
		b4r, b4i, b5r, b5i := x[4]+x[5], y[4]+y[5], x[4]-x[5], y[4]-y[5]
		b6r, b6i, b7r, b7i := x[6]+x[7], y[6]+y[7], x[6]-x[7], y[6]-y[7]
		// Radix-4, j = 0: A0 = b0, A2 = b2, A1 = b4, A3 = b6, twiddles 1.
		s0r, s0i, d0r, d0i := b0r+b2r, b0i+b2i, b0r-b2r, b0i-b2i
		s1r, s1i, d1r, d1i := b4r+b6r, b4i+b6i, b4r-b6r, b4i-b6i
		x[0], y[0] = s0r+s1r, s0i+s1i
		x[4], y[4] = s0r-s1r, s0i-s1i
		x[2], y[2] = d0r+d1i, d0i-d1r
		x[6], y[6] = d0r-d1i, d0i+d1r
		// Radix-4, j = 1: A0 = b1, A2 = b3, A1 = b5, A3 = b7 with
		// W = exp(-2 pi i/8): W b5, W^2 b3 = -i b3, W^3 b7.
		t1r, t1i := sqrtHalf*(b5r+b5i), sqrtHalf*(b5i-b5r)
		t2r, t2i := b3i, -b3r
		t3r, t3i := sqrtHalf*(b7i-b7r), -sqrtHalf*(b7r+b7i)
		s0r, s0i, d0r, d0i = b1r+t2r, b1i+t2i, b1r-t2r, b1i-t2i
		s1r, s1i, d1r, d1i = t1r+t3r, t1i+t3i, t1r-t3r, t1i-t3i
		x[1], y[1] = s0r+s1r, s0i+s1i
		x[5], y[5] = s0r-s1r, s0i-s1i
		x[3], y[3] = d0r+d1i, d0i-d1r
		x[7], y[7] = d0r-d1i, d0i+d1r
	}
}

// radix4First is the radix-4 stage with l = 1, whose twiddles are all 1.
func radix4First(re, im []float32) {
	im = im[:len(re)]
	for g := 0; g+3 < len(re); g += 4 {
		a0r, a0i := re[g], im[g]
		a2r, a2i := re[g+1], im[g+1]
		a1r, a1i := re[g+2], im[g+2]
		a3r, a3i := re[g+3], im[g+3]
		s0r, s0i := a0r+a2r, a0i+a2i
		d0r, d0i := a0r-a2r, a0i-a2i
		s1r, s1i := a1r+a3r, a1i+a3i
		d1r, d1i := a1r-a3r, a1i-a3i
		re[g], im[g] = s0r+s1r, s0i+s1i
		re[g+2], im[g+2] = s0r-s1r, s0i-s1i
		re[g+1], im[g+1] = d0r+d1i, d0i-d1r
		re[g+3], im[g+3] = d0r-d1i, d0i+d1r
	}
}

// splitPower turns the m-point transform Z of z_t = x_2t + i x_2t+1 into
// the power spectrum of x. With E_k = (Z_k + conj Z_m-k)/2 and
// O_k = (Z_k - conj Z_m-k)/(2i), X_k = E_k + W^k O_k and
// X_m-k = conj(E_k - W^k O_k), W = exp(-2 pi i / n).
func (f *FFT) splitPower(out []float32) {
	re, im := f.re, f.im
	m := f.m
	out = out[:m+1]
	out[0] = (re[0] + im[0]) * (re[0] + im[0])
	out[m] = (re[0] - im[0]) * (re[0] - im[0])
	cs, sn := f.splitC, f.splitS[:len(f.splitC)]
	for k := 1; k <= m/2; k++ {
		a, b := re[k], im[k]
		c, d := re[m-k], im[m-k]
		er, ei := a+c, b-d // 2 E_k
		or, oi := b+d, c-a // 2 O_k
		cr, si := cs[k], sn[k]
		tr := cr*or + si*oi // 2 W^k O_k, W^k = cr - i si
		ti := cr*oi - si*or
		pr, pi := er+tr, ei+ti
		qr, qi := er-tr, ei-ti
		out[k] = 0.25 * (pr*pr + pi*pi)
		out[m-k] = 0.25 * (qr*qr + qi*qi)
	}
}
