package sim

import (
	"math"
)

// background is the background before the SNR scaling: ambient is diffuse
// plant noise that needs no room; sources are the localised nuisances, dry,
// to be placed in the hall. Both are in units of the ambient's rms.
type background struct {
	ambient, sources []float64
}

// ambient synthesises plant ambient noise: a random mix of brown-ish rumble
// and pink noise rolling off above a few kHz, with faint mains hum from
// transformers at twice and four times the line frequency (magnetostriction;
// common practice, no source). It has unit power over the visible window.
func (s *scene) ambient() []float64 {
	r := newRand(s.c.Seed, streamAmbient)
	brown := white(r, s.total)
	brownFilter(brown, s.rate, uniform(r, 5, 15))
	normalise(brown, s.pre, s.total)
	pink := white(r, s.total)
	pinkFilter(pink, s.rate, 20)
	lp := lowpass(s.rate, uniform(r, 3000, 7000), math.Sqrt2/2)
	lp.run(pink)
	normalise(pink, s.pre, s.total)
	wb := uniform(r, 0.3, 0.7)
	x := make([]float64, s.total)
	addScaled(x, brown, math.Sqrt(wb))
	addScaled(x, pink, math.Sqrt(1-wb))
	mains := newTrack(s.rate, s.total, []float64{s.m.LineHz}, 0)
	mains.add(x, groupPartials(dbToPow(uniform(r, -20, -12)),
		[]partial{{mult: 2, phase: 2 * math.Pi * r.Float64()}, {mult: 4, phase: 2 * math.Pi * r.Float64()}},
		[]float64{0.8, 0.2}))
	return normalise(x, s.pre, s.total)
}

// background builds the ambient and every nuisance listed in the clip.
func (s *scene) background() background {
	b := background{ambient: s.ambient(), sources: make([]float64, s.total)}
	if hasNuisance(s.c.Nuisance, "neighbour") {
		addScaled(b.sources, s.neighbour(), 1)
	}
	if hasNuisance(s.c.Nuisance, "clank") {
		addScaled(b.sources, s.clanks(), 1)
	}
	if hasNuisance(s.c.Nuisance, "beeper") {
		addScaled(b.sources, s.beeper(), 1)
	}
	if hasNuisance(s.c.Nuisance, "speech") {
		addScaled(b.sources, s.speech(), 1)
	}
	return b
}

// setActiveLevel scales x so that its mean power over the samples where
// active is true equals dbToPow(levelDB) (ambient units).
func setActiveLevel(x []float64, active []bool, levelDB float64) {
	var p float64
	var k int
	for i, a := range active {
		if a {
			p += x[i] * x[i]
			k++
		}
	}
	if k == 0 || p == 0 {
		return
	}
	scale(x, math.Sqrt(dbToPow(levelDB)/(p/float64(k))))
}

// sec converts a time in the visible clip (seconds) to a sample index in the
// full buffer.
func (s *scene) sec(t float64) int { return s.pre + int(t*float64(s.rate)) }
