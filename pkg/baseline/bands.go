package baseline

import (
	"math"

	"github.com/auscult/auscult/pkg/embed"
)

// Band is a frequency range whose sound deviates from the healthy baseline.
type Band struct {
	// Part is the embedding part the range belongs to ("mel_low", "fine",
	// ...): it tells a steady floor from low-frequency lines.
	Part string
	// LoHz and HiHz bound the range.
	LoHz, HiHz float64
	// Deviation is the largest standardised deviation in the range, in
	// healthy standard deviations; positive when louder than healthy.
	Deviation float64
}

// BandFinder picks the most deviating frequency ranges of a window without
// allocating. Not safe for concurrent use.
type BandFinder struct {
	layout []embed.Dim
	used   []bool
}

// NewBandFinder returns a finder for embeddings with the given layout.
func NewBandFinder(layout []embed.Dim) *BandFinder {
	return &BandFinder{layout: layout, used: make([]bool, len(layout))}
}

// Find appends to dst[:0] up to cap(dst) ranges, strongest first. dev holds one
// standardised deviation per dimension (Scorer.Deviations, or a mean of them).
// Each range grows from its strongest dimension over neighbours of the same
// part that deviate the same way by at least half as much, so a broadband
// rise reads as one range, not as several adjacent bands.
func (f *BandFinder) Find(dev []float32, dst []Band) []Band {
	dst = dst[:0]
	clear(f.used)
	for len(dst) < cap(dst) {
		best := -1
		for i, v := range dev {
			if !f.used[i] && (best < 0 || math.Abs(float64(v)) > math.Abs(float64(dev[best]))) {
				best = i
			}
		}
		if best < 0 || dev[best] == 0 {
			break
		}
		peak := float64(dev[best])
		f.used[best] = true
		d := f.layout[best]
		b := Band{Part: d.Part, LoHz: d.LoHz, HiHz: d.HiHz, Deviation: peak}
		same := func(j int) bool {
			v := float64(dev[j])
			return !f.used[j] && f.layout[j].Part == d.Part && v*peak > 0 && math.Abs(v) >= math.Abs(peak)/2
		}
		for j := best - 1; j >= 0 && same(j); j-- {
			f.used[j] = true
			b.LoHz = f.layout[j].LoHz
		}
		for j := best + 1; j < len(dev) && same(j); j++ {
			f.used[j] = true
			b.HiHz = f.layout[j].HiHz
		}
		dst = append(dst, b)
	}
	return dst
}
