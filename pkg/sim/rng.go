package sim

import (
	"math"
	"math/rand/v2"
)

// Stream identifiers keep independent parts of the synthesis on independent
// random sequences, so adding a component never shifts the others.
const (
	streamMachine uint64 = iota + 0x5eed0000
	streamPlan
	streamRoom
	streamClip
	streamSpeed
	streamHealthy
	streamFault
	streamAmbient
	streamNuisance
	streamNuisanceRoom
	streamGain
	streamNeighbour
	streamClank
	streamBeeper
	streamSpeech
	streamMachinePhases
)

// newRand returns a generator seeded from seed on the given stream.
func newRand(seed, stream uint64) *rand.Rand {
	return rand.New(rand.NewPCG(seed, stream))
}

// uniform returns a value uniformly distributed in [lo, hi).
func uniform(r *rand.Rand, lo, hi float64) float64 {
	return lo + (hi-lo)*r.Float64()
}

// gauss returns a standard normal value by the Box-Muller transform (G. E. P.
// Box and M. E. Muller, "A note on the generation of random normal
// deviates", Ann. Math. Statist. 29(2), 1958), always from exactly two
// uniform draws. math/rand's NormFloat64 is faster but uses a ziggurat
// whose rare fallback draws a data-dependent number of extra values, and
// the tests of that fallback (math.Log and math.Exp near a threshold) can
// come out differently by one rounding step on another architecture: the
// stream then shifts and the rest of the clip differs completely (seen on
// arm64 against amd64). Here the number of draws never depends on the
// values, so architectures differ by rounding only.
func gauss(r *rand.Rand) float64 {
	u1 := 1 - r.Float64() // in (0, 1]: the logarithm stays finite
	u2 := r.Float64()
	return math.Sqrt(-2*math.Log(u1)) * math.Cos(2*math.Pi*u2)
}
