package sim

import (
	"math"
	"math/rand/v2"
)

// wanderLimit bounds the drive frequency's slow random walk around its
// set-point, as a fraction (+-0.5 %).
const wanderLimit = 0.005

// driveHzPerBlock returns the drive output frequency in each block of a clip:
// the set-point times (1 + w), where w is a random walk reflected at
// +-wanderLimit (a stand-in for load and controller hunting; common practice,
// no source).
// The walk starts at w0 (a fraction within +-wanderLimit).
func driveHzPerBlock(r *rand.Rand, blocks int, setpointHz, w0 float64) []float64 {
	hz := make([]float64, blocks)
	w := w0
	const stepStd = 1.2e-4 // per 10 ms block: about 0.4 % rms after 10 s
	for i := range hz {
		w += stepStd * gauss(r)
		if w > wanderLimit {
			w = 2*wanderLimit - w
		}
		if w < -wanderLimit {
			w = -2*wanderLimit - w
		}
		hz[i] = setpointHz * (1 + w)
	}
	return hz
}

// affinityPerSample returns, for every sample, the amplitude factor of the
// affinity-law level (drive / line)^1.5 (see AffinityLevelDB).
func affinityPerSample(t track, n int, lineHz float64) []float64 {
	a := make([]float64, n)
	for b := 0; b*t.block < n; b++ {
		g := affinityGain(lineHz, t.hz[min(b, len(t.hz)-1)])
		for i := b * t.block; i < min(n, (b+1)*t.block); i++ {
			a[i] = g
		}
	}
	return a
}

// smoothStep is 0 below 0, 1 above 1 and a raised-cosine ramp between.
func smoothStep(x float64) float64 {
	if x <= 0 {
		return 0
	}
	if x >= 1 {
		return 1
	}
	return 0.5 - 0.5*math.Cos(math.Pi*x)
}
