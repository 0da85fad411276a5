package sim

import (
	"math"
)

// speech synthesises one to three speech-like utterances of 1-3.5 s with a
// cascade formant synthesiser (Klatt 1980, see klattResonator): a glottal
// pulse train at 90-220 Hz with intonation and 1 % jitter, smoothed to a
// falling source spectrum and differentiated for lip radiation, drives three
// or four formant resonators whose targets move from syllable to syllable.
// Syllables come at 3-5 per second with raised-cosine on/off envelopes and
// short gaps; some start with a fricative (noise above 2.5 kHz). Speech is
// 0-12 dB above the ambient while it lasts. It carries no words.
func (s *scene) speech() []float64 {
	r := newRand(s.c.Seed, streamSpeech)
	fs := float64(s.rate)
	T := float64(s.n) / fs
	x := make([]float64, s.total)
	active := make([]bool, s.total)
	f0 := uniform(r, 90, 220)
	nform := 3
	if 3800 < 0.45*fs {
		nform = 4
	}
	const update = 32 // samples between formant retunings
	for range 1 + r.IntN(3) {
		start := s.sec(uniform(r, 0, 0.8) * T)
		end := min(s.total, start+int(uniform(r, 1, 3.5)*fs))
		sylRate := uniform(r, 3, 5)
		var res [4]klattResonator
		var cur, tgt [4]float64
		bw := [4]float64{uniform(r, 60, 120), uniform(r, 80, 150), uniform(r, 120, 200), uniform(r, 150, 250)}
		pickTargets := func() {
			tgt = [4]float64{uniform(r, 300, 850), uniform(r, 850, 2300), uniform(r, 2300, 3100), uniform(r, 3300, 3800)}
		}
		pickTargets()
		cur = tgt
		var g1, g2, prev float64 // glottal smoothing and lip radiation state
		nextPulse := 0.0
		hiss := highpass(s.rate, 2500, math.Sqrt2/2)
		glide := math.Exp(-float64(update) / (0.03 * fs))
		i := start
		for i < end {
			// one syllable
			l := int(uniform(r, 0.7, 1.3) / sylRate * fs)
			gap := int(uniform(r, 0.02, 0.12) * fs)
			fric := r.Float64() < 0.3
			fricLen := int(uniform(r, 0.05, 0.12) * fs)
			pickTargets()
			for k := 0; k < l && i < end; k, i = k+1, i+1 {
				if k%update == 0 {
					for j := range nform {
						cur[j] = glide*cur[j] + (1-glide)*tgt[j]
						res[j].set(s.rate, cur[j], bw[j])
					}
				}
				env := math.Sin(math.Pi * float64(k) / float64(l))
				t := float64(i-start) / fs
				pitch := f0 * (1 + 0.08*math.Sin(2*math.Pi*0.7*t) - 0.05*t)
				var src float64
				if fric && k < fricLen {
					src = 0.3 * gauss(r) * env
				} else {
					nextPulse -= 1
					if nextPulse <= 0 {
						src = env
						nextPulse += fs / pitch * (1 + 0.01*gauss(r))
					}
					src += 0.02 * gauss(r) * env // aspiration
				}
				// two one-pole low-passes give the glottal roll-off; a first
				// difference stands in for radiation at the lips
				g1 = 0.97*g1 + src
				g2 = 0.9*g2 + g1
				v := g2 - prev
				prev = g2
				for j := range nform {
					v = res[j].step(v)
				}
				if fric && k < fricLen {
					v += 4 * hiss.step(src) // frication bypasses the formants
				}
				x[i] = v
				active[i] = true
			}
			i += gap
		}
	}
	hp := highpass(s.rate, 80, math.Sqrt2/2)
	hp.run(x)
	setActiveLevel(x, active, uniform(r, 0, 12))
	return x
}
