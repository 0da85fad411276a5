package features

import (
	"fmt"
	"math"
)

// HzToMel converts a frequency in Hz to mel on the HTK scale,
// mel(f) = 2595 log10(1 + f/700) (HTK Book).
func HzToMel(f float64) float64 { return 2595 * math.Log10(1+f/700) }

// MelToHz is the inverse of HzToMel: f = 700 (10^(m/2595) - 1).
func MelToHz(m float64) float64 { return 700 * (math.Pow(10, m/2595) - 1) }

// NewMelBank returns nMels triangular filters equally spaced on the HTK
// mel scale between fmin and fmax (Hz), for power spectra of an nfft-point
// real FFT at the given rate. The band edges are nMels+2 points equally
// spaced in mel from HzToMel(fmin) to HzToMel(fmax); filter i rises
// linearly from 0 at point i to 1 at point i+1 and falls to 0 at point
// i+2, evaluated at the bin frequencies k*rate/nfft, k = 0..nfft/2; the
// outer points are exactly fmin and fmax. Only bins with positive weight
// are stored, so a bin on a foot is left out. The
// peak is 1 (no area normalisation), so a tone exactly at a centre
// frequency passes at full weight.
//
// It returns an error wrapping ErrBank if the arguments are out of range
// or if some band holds no bin (too many bands for the FFT resolution at
// the low end), and ErrFFTSize if nfft is not a power of two >= 4.
func NewMelBank(rate, nfft, nMels int, fmin, fmax float64) (*Bank, error) {
	if nfft < 4 || nfft&(nfft-1) != 0 {
		return nil, fmt.Errorf("%w: nfft = %d", ErrFFTSize, nfft)
	}
	if rate <= 0 || nMels <= 0 || !(fmin >= 0) || !(fmax > fmin) || fmax > float64(rate)/2 {
		return nil, fmt.Errorf("%w: rate = %d, bands = %d, range = [%g, %g] Hz; want rate > 0, bands > 0, 0 <= fmin < fmax <= rate/2", ErrBank, rate, nMels, fmin, fmax)
	}
	nbins := nfft/2 + 1
	binHz := float64(rate) / float64(nfft)
	m0, m1 := HzToMel(fmin), HzToMel(fmax)
	pts := make([]float64, nMels+2)
	for i := range pts {
		pts[i] = MelToHz(m0 + (m1-m0)*float64(i)/float64(nMels+1))
	}
	// Pin the outer feet: the mel round trip is a few ulp off.
	pts[0], pts[nMels+1] = fmin, fmax
	bb := bankBuilder{nbins: nbins}
	for i := 0; i < nMels; i++ {
		lo, c, hi := pts[i], pts[i+1], pts[i+2]
		first := -1
		var w []float32
		for k := int(lo / binHz); k < nbins; k++ {
			f := float64(k) * binHz
			if f >= hi {
				break
			}
			v := math.Min((f-lo)/(c-lo), (hi-f)/(hi-c))
			if v <= 0 {
				continue
			}
			if first < 0 {
				first = k
			}
			w = append(w, float32(v))
		}
		if first < 0 {
			return nil, fmt.Errorf("%w: mel band %d (%.1f..%.1f Hz) holds no FFT bin (bin spacing %.2f Hz); use fewer bands, a higher fmin or a longer FFT", ErrBank, i, lo, hi, binHz)
		}
		bb.add(first, w, c, lo, hi)
	}
	return bb.build(), nil
}
