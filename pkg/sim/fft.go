package sim

import (
	"math"
	"math/bits"
)

// fftPlan holds the twiddle factors of an in-place iterative radix-2
// Cooley-Tukey transform (Cooley and Tukey, Math. Comp. 19:297, 1965) of a
// power-of-two length. Twiddles are stored stage by stage so that the inner
// loop reads them contiguously.
type fftPlan struct {
	n  int
	tw []complex128 // for the stage of half-size h: tw[h-1+j] = exp(-i pi j / h), j < h
}

// nextPow2 returns the smallest power of two not below n (n >= 1).
func nextPow2(n int) int {
	if n <= 1 {
		return 1
	}
	return 1 << bits.Len(uint(n-1))
}

// newFFTPlan prepares transforms of length n, which must be a power of two.
func newFFTPlan(n int) *fftPlan {
	tw := make([]complex128, max(n-1, 0))
	for h := 1; h < n; h <<= 1 {
		for j := range h {
			s, c := math.Sincos(-math.Pi * float64(j) / float64(h))
			tw[h-1+j] = complex(c, s)
		}
	}
	return &fftPlan{n: n, tw: tw}
}

// transform replaces x (len n) by its discrete Fourier transform, or by the
// inverse transform scaled by 1/n when inverse is true (computed as
// conj(DFT(conj x))/n).
func (p *fftPlan) transform(x []complex128, inverse bool) {
	n := p.n
	if n < 2 {
		return
	}
	if inverse {
		for i, v := range x {
			x[i] = complex(real(v), -imag(v))
		}
	}
	shift := 64 - uint(bits.Len(uint(n))-1)
	for i := range n {
		j := int(bits.Reverse64(uint64(i)) >> shift)
		if j > i {
			x[i], x[j] = x[j], x[i]
		}
	}
	for i := 0; i < n; i += 2 {
		a, b := x[i], x[i+1]
		x[i], x[i+1] = a+b, a-b
	}
	for h := 2; h < n; h <<= 1 {
		w := p.tw[h-1 : 2*h-1]
		for start := 0; start < n; start += 2 * h {
			lo := x[start : start+h]
			hi := x[start+h : start+2*h]
			for j, wj := range w {
				a := lo[j]
				b := hi[j] * wj
				lo[j] = a + b
				hi[j] = a - b
			}
		}
	}
	if inverse {
		s := 1 / float64(n)
		for i, v := range x {
			x[i] = complex(real(v)*s, -imag(v)*s)
		}
	}
}
