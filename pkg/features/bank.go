package features

import "fmt"

// Bank is a filterbank over a power spectrum, stored as sparse
// precomputed weights: band i covers the bins First(i) ..
// First(i)+len(weights)-1 and its energy is the weighted sum of their
// powers. All weights share one backing array in band order, so Apply
// walks memory once from start to end.
//
// A Bank is read-only after construction and safe for concurrent use.
type Bank struct {
	nbins   int // length of the power spectra it applies to
	bands   []band
	centers []float64
	lo, hi  []float64
}

// band is the sparse row of one filter.
type band struct {
	first int
	w     []float32
}

// Len returns the number of bands.
func (b *Bank) Len() int { return len(b.bands) }

// Bins returns the length of the power spectra Apply expects (nfft/2+1).
func (b *Bank) Bins() int { return b.nbins }

// Centers returns the centre frequency of every band in Hz, in band
// order. The slice is shared: callers must not modify it.
func (b *Bank) Centers() []float64 { return b.centers }

// Edges returns the lower and upper edge of band i in Hz: the feet of a
// triangular band, or the bounds of a rectangular one. It panics if i is
// out of range.
func (b *Bank) Edges(i int) (lo, hi float64) { return b.lo[i], b.hi[i] }

// First returns the first FFT bin of band i: bin First(i)+j has weight
// Weights(i)[j]. It panics if i is out of range.
func (b *Bank) First(i int) int { return b.bands[i].first }

// Weights returns the weights of band i, starting at bin First(i). The
// slice is shared: callers must not modify it. It panics if i is out of
// range.
func (b *Bank) Weights(i int) []float32 { return b.bands[i].w }

// Apply writes the energy of every band, sum_j w_j * power[first+j], into
// out. power must have Bins() elements and out Len() elements; Apply
// panics otherwise. It does not allocate.
func (b *Bank) Apply(power []float32, out []float32) {
	if len(power) != b.nbins || len(out) != len(b.bands) {
		panic(fmt.Sprintf("features: Bank.Apply: len(power) = %d, len(out) = %d, want %d and %d", len(power), len(out), b.nbins, len(b.bands)))
	}
	out = out[:len(b.bands)]
	for i := range b.bands {
		bd := &b.bands[i]
		p := power[bd.first : bd.first+len(bd.w)]
		w := bd.w[:len(p)]
		var s0, s1 float32
		j := 0
		for ; j+1 < len(p); j += 2 {
			s0 += w[j] * p[j]
			s1 += w[j+1] * p[j+1]
		}
		if j < len(p) {
			s0 += w[j] * p[j]
		}
		out[i] = s0 + s1
	}
}

// bankBuilder collects dense rows and packs them into one backing array.
type bankBuilder struct {
	nbins   int
	firsts  []int
	rows    [][]float32
	centers []float64
	lo, hi  []float64
}

// add appends a band whose nonzero weights start at bin first.
func (bb *bankBuilder) add(first int, w []float32, center, lo, hi float64) {
	bb.firsts = append(bb.firsts, first)
	bb.rows = append(bb.rows, w)
	bb.centers = append(bb.centers, center)
	bb.lo = append(bb.lo, lo)
	bb.hi = append(bb.hi, hi)
}

// build packs the collected bands into a Bank.
func (bb *bankBuilder) build() *Bank {
	total := 0
	for _, r := range bb.rows {
		total += len(r)
	}
	all := make([]float32, 0, total)
	b := &Bank{nbins: bb.nbins, centers: bb.centers, lo: bb.lo, hi: bb.hi}
	for i, r := range bb.rows {
		s := len(all)
		all = append(all, r...)
		b.bands = append(b.bands, band{first: bb.firsts[i], w: all[s:len(all):len(all)]})
	}
	return b
}
