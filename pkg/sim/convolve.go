package sim

// convolve2 returns the linear convolutions a*h1 and b*h2, each truncated to
// len(a) samples (a and b must have equal length). Both are computed with one
// forward transform of the packed signal a + i b, one of the packed responses
// h1 + i h2 and one inverse transform, using the conjugate symmetry of the
// transforms of real sequences (the standard "two real FFTs for the price of
// one" trick, e.g. Press et al., Numerical Recipes, sec. 12.3; from memory).
func convolve2(a, h1, b, h2 []float64) (ya, yb []float64) {
	n := len(a)
	lh := max(len(h1), len(h2))
	m := nextPow2(n + lh - 1)
	p := newFFTPlan(m)
	x := make([]complex128, m)
	for i := range n {
		x[i] = complex(a[i], b[i])
	}
	h := make([]complex128, m)
	for i, v := range h1 {
		h[i] = complex(v, 0)
	}
	for i, v := range h2 {
		h[i] = complex(real(h[i]), v)
	}
	p.transform(x, false)
	p.transform(h, false)
	y := make([]complex128, m)
	for k := range m {
		nk := (m - k) % m
		xk, xn := x[k], conj(x[nk])
		hk, hn := h[k], conj(h[nk])
		ak := (xk + xn) * 0.5
		bk := (xk - xn) * complex(0, -0.5)
		h1k := (hk + hn) * 0.5
		h2k := (hk - hn) * complex(0, -0.5)
		y[k] = ak*h1k + complex(0, 1)*bk*h2k
	}
	p.transform(y, true)
	ya = make([]float64, n)
	yb = make([]float64, n)
	for i := range n {
		ya[i] = real(y[i])
		yb[i] = imag(y[i])
	}
	return ya, yb
}

func conj(z complex128) complex128 { return complex(real(z), -imag(z)) }
