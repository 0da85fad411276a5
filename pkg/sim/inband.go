package sim

import (
	"math"
	"sort"
)

// inBandShare is the share of a fault's power whose third-octave bands
// define "its own bands" for severity calibration.
const inBandShare = 0.8

// inBandRatio returns the power of fault relative to the power of healthy
// within the third-octave bands that hold inBandShare of the fault's power.
// Third-octave bands follow the base-10 layout of IEC 61260 / ANSI S1.11:
// centres 1000*10^(k/10) Hz, edges a factor 10^(1/20) either side. Above
// about 500 Hz these are close to the ear's critical bands, so the ratio
// says how prominent the fault is against the machine sound that masks it
// (critical-band masking: Zwicker and Fastl, Psychoacoustics, from memory).
func inBandRatio(fault, healthy []float64, rate int) float64 {
	n := nextPow2(len(fault))
	plan := newFFTPlan(n)
	spec := func(x []float64) []float64 {
		c := make([]complex128, n)
		for i, v := range x {
			c[i] = complex(v, 0)
		}
		plan.transform(c, false)
		p := make([]float64, n/2+1)
		for k := range p {
			p[k] = real(c[k])*real(c[k]) + imag(c[k])*imag(c[k])
		}
		return p
	}
	pf, ph := spec(fault), spec(healthy)
	type band struct{ f, h float64 }
	var bands []band
	var total float64
	for k := -17; ; k++ { // from the 20 Hz band up
		fc := 1000 * math.Pow(10, float64(k)/10)
		lo, hi := fc*math.Pow(10, -0.05), fc*math.Pow(10, 0.05)
		if lo >= float64(rate)/2 {
			break
		}
		a := int(math.Ceil(lo * float64(n) / float64(rate)))
		b := min(int(math.Floor(hi*float64(n)/float64(rate))), n/2)
		var bf, bh float64
		for i := max(a, 1); i <= b; i++ {
			bf += pf[i]
			bh += ph[i]
		}
		bands = append(bands, band{bf, bh})
		total += bf
	}
	sort.Slice(bands, func(i, j int) bool { return bands[i].f > bands[j].f })
	var sf, sh float64
	for _, b := range bands {
		if sf >= inBandShare*total {
			break
		}
		sf += b.f
		sh += b.h
	}
	if sh <= 0 {
		return math.Inf(1)
	}
	return sf / sh
}
