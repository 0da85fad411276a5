package features

import (
	"fmt"
	"math"
)

// NewLogBank returns rectangular bands of constant relative width,
// 1/bandsPerOctave octave each, for power spectra of an nfft-point real
// FFT at the given rate. Nominal band i spans
// [fmin 2^(i/b), fmin 2^((i+1)/b)) Hz, b = bandsPerOctave, for every i
// whose upper edge does not exceed fmax; bin k (frequency k*rate/nfft)
// belongs to the band whose span contains it, with weight 1.
//
// Merging: where nominal bands are narrower than the bin spacing (the
// low end of a short FFT), consecutive nominal bands are merged until the
// merged band contains at least one bin; a trailing remainder that holds
// no bin is merged into the band below it. So every band holds at least
// one bin, bands never overlap, and Len() may be smaller than the
// nominal count. Edges reports the merged edges and Centers their
// geometric mean.
//
// It returns an error wrapping ErrBank unless 0 < fmin < fmax <=
// rate/2, bandsPerOctave >= 1, at least one nominal band fits and the
// range contains at least one bin, and ErrFFTSize unless nfft is a power
// of two >= 4.
func NewLogBank(rate, nfft int, fmin, fmax float64, bandsPerOctave int) (*Bank, error) {
	if nfft < 4 || nfft&(nfft-1) != 0 {
		return nil, fmt.Errorf("%w: nfft = %d", ErrFFTSize, nfft)
	}
	if rate <= 0 || bandsPerOctave <= 0 || !(fmin > 0) || !(fmax > fmin) || fmax > float64(rate)/2 {
		return nil, fmt.Errorf("%w: rate = %d, bands per octave = %d, range = [%g, %g] Hz; want rate > 0, bands per octave > 0, 0 < fmin < fmax <= rate/2", ErrBank, rate, bandsPerOctave, fmin, fmax)
	}
	nominal := int(math.Floor(float64(bandsPerOctave)*math.Log2(fmax/fmin) + 1e-9))
	if nominal < 1 {
		return nil, fmt.Errorf("%w: range [%g, %g] Hz is narrower than 1/%d octave", ErrBank, fmin, fmax, bandsPerOctave)
	}
	edge := func(i int) float64 { return fmin * math.Exp2(float64(i)/float64(bandsPerOctave)) }
	nbins := nfft/2 + 1
	binHz := float64(rate) / float64(nfft)
	// firstBin returns the first bin at or above f.
	firstBin := func(f float64) int { return int(math.Ceil(f/binHz - 1e-9)) }

	type span struct {
		k0, k1 int // bins [k0, k1)
		lo, hi float64
	}
	var spans []span
	start := 0 // first nominal band of the band being merged
	for i := 0; i < nominal; i++ {
		lo, hi := edge(start), edge(i+1)
		k0, k1 := firstBin(lo), min(firstBin(hi), nbins)
		if k1 > k0 {
			spans = append(spans, span{k0, k1, lo, hi})
			start = i + 1
		}
	}
	if start < nominal && len(spans) > 0 {
		// Bin-less remainder at the top: widen the last band.
		s := &spans[len(spans)-1]
		s.hi = edge(nominal)
		s.k1 = max(s.k1, min(firstBin(s.hi), nbins))
	}
	if len(spans) == 0 {
		return nil, fmt.Errorf("%w: range [%g, %g] Hz holds no FFT bin (bin spacing %.2f Hz)", ErrBank, fmin, edge(nominal), binHz)
	}
	bb := bankBuilder{nbins: nbins}
	for _, s := range spans {
		w := make([]float32, s.k1-s.k0)
		for j := range w {
			w[j] = 1
		}
		bb.add(s.k0, w, math.Sqrt(s.lo*s.hi), s.lo, s.hi)
	}
	return bb.build(), nil
}
