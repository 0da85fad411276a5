package sim

import "math"

// AffinityLevelDB returns the change in dB of the machine's overall sound level
// when its speed goes from n1 to n2 (any consistent unit, e.g. rpm or Hz).
//
// The pump affinity laws give flow ~ N, head ~ N^2 and hydraulic power ~ N^3
// (standard pump handbooks, e.g. Karassik et al., Pump Handbook; from memory).
// Our modelling assumption, not a law: radiated acoustic power is taken as
// proportional to hydraulic power, so the level moves by
// 10 log10((N2/N1)^3) = 30 log10(N2/N1) dB.
func AffinityLevelDB(n1, n2 float64) float64 {
	return 30 * math.Log10(n2/n1)
}

// affinityGain returns the amplitude factor matching AffinityLevelDB, that is
// (n2/n1)^1.5.
func affinityGain(n1, n2 float64) float64 {
	return math.Pow(n2/n1, 1.5)
}
