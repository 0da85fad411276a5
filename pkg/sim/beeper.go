package sim

import "math"

// beeper synthesises a vehicle reversing beeper (one tone, on half of each
// 0.8-1.2 s cycle) or a two-tone alarm, sounding for 2-7 s, as a square-ish
// wave (odd harmonics 1, 1/3, 1/5 weighted down) with 5 ms ramps, 0-12 dB
// above the ambient while it sounds.
func (s *scene) beeper() []float64 {
	r := newRand(s.c.Seed, streamBeeper)
	fs := float64(s.rate)
	T := float64(s.n) / fs
	x := make([]float64, s.total)
	active := make([]bool, s.total)
	start := s.sec(uniform(r, 0, 0.7) * T)
	dur := int(uniform(r, 2, 7) * fs)
	reversing := r.Float64() < 0.6
	f1 := uniform(r, 1000, 2800)
	period := uniform(r, 0.8, 1.2) * fs
	if !reversing {
		f1 = uniform(r, 600, 1200)
		period = 2 * uniform(r, 0.2, 0.5) * fs
	}
	f2 := f1 * uniform(r, 1.2, 1.5)
	ramp := 0.005 * fs
	var phase float64
	for k := 0; k < dur && start+k < s.total; k++ {
		pos := math.Mod(float64(k), period)
		half := period / 2
		f, env := f1, 0.0
		if reversing {
			if pos < half {
				env = smoothStep(pos/ramp) * smoothStep((half-pos)/ramp)
			}
		} else {
			p := pos
			if pos >= half {
				f, p = f2, pos-half
			}
			env = smoothStep(p/ramp) * smoothStep((half-p)/ramp)
		}
		phase = math.Mod(phase+2*math.Pi*f/fs, 2*math.Pi)
		v := math.Sin(phase)
		if 3*f < 0.45*fs {
			v += math.Sin(3*phase) / 3 * 0.6
		}
		if 5*f < 0.45*fs {
			v += math.Sin(5*phase) / 5 * 0.4
		}
		x[start+k] = env * v
		active[start+k] = env > 0.5
	}
	setActiveLevel(x, active, uniform(r, 0, 12))
	return x
}
