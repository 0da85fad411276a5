package sim

import "math/rand/v2"

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
