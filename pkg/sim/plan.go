package sim

import (
	"fmt"
	"math/rand/v2"
	"strings"
)

// Nuisance probabilities per clip, the same for training and test clips and
// for healthy and faulty ones (a design choice: commissioning recordings are
// never clean).
var nuisanceOdds = []struct {
	name string
	p    float64
}{{"neighbour", 0.30}, {"clank", 0.35}, {"beeper", 0.20}, {"speech", 0.30}}

// Plan returns the machine for opt.Seed and the whole data set: opt.TrainClips
// healthy training clips, then the test clips (opt.TestNormal healthy ones and
// opt.TestPerFaultSeverity for every fault and severity) shuffled together and
// named test_0001.wav onwards in shuffled order. Set-points and SNRs are
// balanced within the training set, the healthy test clips and the faulty test
// clips separately, and nuisances are drawn with the same odds everywhere, so
// no condition gives the label away.
func Plan(opt Options) (Machine, []Clip) {
	opt = opt.withDefaults()
	m := NewMachine(opt.Seed)
	r := newRand(uint64(opt.Seed), streamPlan)

	train := make([]Clip, opt.TrainClips)
	conditions(r, m, train)
	for i := range train {
		train[i].Name = fmt.Sprintf("train_%04d.wav", i+1)
		train[i].Split = "train"
	}

	normal := make([]Clip, opt.TestNormal)
	conditions(r, m, normal)
	var faulty []Clip
	for _, f := range Faults() {
		for _, s := range Severities() {
			for range opt.TestPerFaultSeverity {
				faulty = append(faulty, Clip{Label: 1, Fault: f, Severity: s})
			}
		}
	}
	conditions(r, m, faulty)
	test := append(normal, faulty...)
	r.Shuffle(len(test), func(i, j int) { test[i], test[j] = test[j], test[i] })
	for i := range test {
		test[i].Name = fmt.Sprintf("test_%04d.wav", i+1)
		test[i].Split = "test"
	}
	return m, append(train, test...)
}

// conditions fills set-point, SNR, nuisance and seed of every clip. Set-points
// and SNRs each cycle through their sets and are shuffled independently, so
// both are balanced and not tied to each other.
func conditions(r *rand.Rand, m Machine, clips []Clip) {
	snrs := SNRSet()
	sp := balanced(r, len(clips), len(m.Setpoints))
	sn := balanced(r, len(clips), len(snrs))
	for i := range clips {
		clips[i].SetpointHz = m.Setpoints[sp[i]]
		clips[i].SNRdB = snrs[sn[i]]
		clips[i].Nuisance = drawNuisance(r)
		clips[i].Seed = r.Uint64()
	}
}

// balanced returns n indices cycling through 0..k-1, shuffled.
func balanced(r *rand.Rand, n, k int) []int {
	idx := make([]int, n)
	off := r.IntN(k)
	for i := range idx {
		idx[i] = (i + off) % k
	}
	r.Shuffle(n, func(i, j int) { idx[i], idx[j] = idx[j], idx[i] })
	return idx
}

// drawNuisance draws which nuisances a clip holds.
func drawNuisance(r *rand.Rand) string {
	var parts []string
	for _, o := range nuisanceOdds {
		if r.Float64() < o.p {
			parts = append(parts, o.name)
		}
	}
	if len(parts) == 0 {
		return "none"
	}
	return strings.Join(parts, "+")
}

// hasNuisance reports whether the summary lists the named nuisance.
func hasNuisance(summary, name string) bool {
	for _, p := range strings.Split(summary, "+") {
		if p == name {
			return true
		}
	}
	return false
}
