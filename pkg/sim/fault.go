package sim

import (
	"math"
	"math/rand/v2"
)

// faultSignal is the extra sound a fault adds, at its final level, and the
// amplitude gain it applies to the healthy flow turbulence (1 except for dry
// running).
type faultSignal struct {
	add      []float64
	turbGain float64
}

// fault synthesises the clip's fault, if any, at SeverityDB(sev) relative
// to the healthy machine at the source, measured in the fault's own
// third-octave bands (inBandRatio).
func (s *scene) fault(h healthyParts) faultSignal {
	out := faultSignal{turbGain: 1}
	if s.c.Fault == "" {
		return out
	}
	r := newRand(s.c.Seed, streamFault)
	var x []float64
	switch s.c.Fault {
	case FaultBearingOuter:
		x = s.bearingOuter(r)
	case FaultBearingInner:
		x = s.bearingInner(r)
	case FaultCavitation:
		x = s.cavitation(r)
	case FaultImbalance:
		x = s.imbalance(r, h)
	case FaultMisalignment:
		x = s.misalignment(r)
	case FaultLooseness:
		x = s.looseness(r)
	case FaultImpellerDamage:
		x = s.impellerDamage(r, h)
	case FaultLeak:
		x = s.leak(r)
	case FaultDryRunning:
		x = s.dryRunning(r)
		out.turbGain = dbToAmp(map[string]float64{"mild": -0.5, "moderate": -1.5, "severe": -3}[s.c.Severity])
	default:
		return out
	}
	for i := range x {
		x[i] *= s.aff[i]
	}
	healthy := make([]float64, s.n)
	for i := range healthy {
		healthy[i] = h.at(s.pre + i)
	}
	if r := inBandRatio(s.visible(x), healthy, s.rate); r > 0 && !math.IsInf(r, 0) {
		scale(x, math.Sqrt(dbToPow(SeverityDB(s.c.Severity))/r))
	}
	out.add = x
	return out
}

// mixUnit returns the sum of the parts, each first normalised to unit power
// over the visible window and weighted by the matching power share.
func (s *scene) mixUnit(parts [][]float64, shares []float64) []float64 {
	x := make([]float64, s.total)
	for i, p := range parts {
		normalise(p, s.pre, s.total)
		addScaled(x, p, math.Sqrt(shares[i]))
	}
	return x
}

// bearingOuter: impacts at BPFO (Bearing.BPFO) of nearly constant strength,
// since a defect on the stationary race stays in the load zone, ringing the
// housing resonance.
func (s *scene) bearingOuter(r *rand.Rand) []float64 {
	ratio := s.m.Bearing.BPFO(1)
	x := s.impactTrain(r, ratio, 0.01, 0, func(int) float64 { return math.Max(0, 1+0.15*gauss(r)) })
	return s.ring(x, s.m.ResonanceHz, uniform(r, 15, 30), uniform(r, 1.3, 1.8))
}

// bearingInner: impacts at BPFI (Bearing.BPFI) whose strength follows the
// defect through the load zone once per shaft turn, so the train is
// amplitude-modulated at shaft rate (Randall and Antoni 2011; from memory).
func (s *scene) bearingInner(r *rand.Rand) []float64 {
	ratio := s.m.Bearing.BPFI(1)
	p := 2 * math.Pi * r.Float64()
	x := s.impactTrain(r, ratio, 0.01, 0, func(i int) float64 {
		load := 0.5 + 0.5*math.Cos(2*math.Pi*s.shaft.cyclesAt(i)+p)
		return (0.25 + 0.75*load) * math.Max(0, 1+0.15*gauss(r))
	})
	return s.ring(x, s.m.ResonanceHz*uniform(r, 0.9, 1.1), uniform(r, 15, 30), uniform(r, 1.3, 1.8))
}

// cavitation: irregular crackle of bubble collapse (bursts above 2 kHz whose
// rate wanders and pulses with vane passing) over a raised broadband floor
// above 2 kHz.
func (s *scene) cavitation(r *rand.Rand) []float64 {
	wob := slowWobble(r, s.rate, s.total, 1)
	vane := make([]float64, s.total)
	s.shaft.add(vane, []partial{{mult: float64(s.m.Vanes), amp: 0.7, phase: 2 * math.Pi * r.Float64()}})
	base := uniform(r, 80, 250)
	crackle := s.bursts(r, func(i int) float64 { return base * math.Exp(0.5*wob[i]) * (1 + vane[i]) })
	broad := white(r, s.total)
	for _, x := range [][]float64{crackle, broad} {
		for range 2 {
			f := highpass(s.rate, 2000, math.Sqrt2/2)
			f.run(x)
		}
	}
	lp := lowpass(s.rate, 7000, math.Sqrt2/2)
	lp.run(broad)
	for i := range broad {
		broad[i] *= math.Exp(0.3 * wob[i])
	}
	return s.mixUnit([][]float64{crackle, broad}, []float64{0.6, 0.4})
}

// imbalance: a raised 1x shaft tone and a slight amplitude modulation of the
// whole machine at 1x.
func (s *scene) imbalance(r *rand.Rand, h healthyParts) []float64 {
	tone := make([]float64, s.total)
	s.shaft.add(tone, []partial{{mult: 1, amp: 1, phase: 2 * math.Pi * r.Float64()}})
	cos1 := make([]float64, s.total)
	s.shaft.add(cos1, []partial{{mult: 1, amp: 1, phase: 2 * math.Pi * r.Float64()}})
	am := make([]float64, s.total)
	for i := range am {
		am[i] = cos1[i] * h.at(i) / s.aff[i]
	}
	return s.mixUnit([][]float64{tone, am}, []float64{0.6, 0.4})
}

// misalignment: raised 2x and 3x with some 1x and 4x, and a little vane-pass
// modulation at 2x (sidebands at V +- 2).
func (s *scene) misalignment(r *rand.Rand) []float64 {
	v := float64(s.m.Vanes)
	ph := func() float64 { return 2 * math.Pi * r.Float64() }
	x := make([]float64, s.total)
	s.shaft.add(x, groupPartials(1,
		[]partial{{mult: 1, phase: ph()}, {mult: 2, phase: ph()}, {mult: 3, phase: ph()}, {mult: 4, phase: ph()},
			{mult: v - 2, phase: ph()}, {mult: v + 2, phase: ph()}},
		[]float64{0.2, 0.45, 0.2, 0.05, 0.05, 0.05}))
	return x
}

// looseness: many shaft harmonics including half orders, and rattling impacts
// about once per turn that ring a low, broad resonance.
func (s *scene) looseness(r *rand.Rand) []float64 {
	var ps []partial
	var rel []float64
	for j := 1; j <= 20; j++ {
		ps = append(ps, partial{mult: float64(j) / 2, phase: 2 * math.Pi * r.Float64()})
		rel = append(rel, uniform(r, 0.3, 1)/(1+0.2*float64(j)))
	}
	harm := make([]float64, s.total)
	s.shaft.add(harm, groupPartials(1, ps, rel))
	imp := s.impactTrain(r, 1, 0.04, 0.25, func(int) float64 { return math.Exp(0.5 * gauss(r)) })
	rattle := s.ring(imp, uniform(r, 600, 2500), uniform(r, 3, 6), uniform(r, 2, 2.6))
	return s.mixUnit([][]float64{harm, rattle}, []float64{0.5, 0.5})
}

// impellerDamage: vane-pass sidebands at +-1x and +-2x shaft, a raised
// vane-pass tone and sidebands around 2V. The added vane-pass component is
// kept in quadrature with the healthy tone so that
// it raises the level by about its own power rather than by a coherent
// cross term, which would make the fault louder than its severity says.
func (s *scene) impellerDamage(r *rand.Rand, h healthyParts) []float64 {
	v := float64(s.m.Vanes)
	ph := func() float64 { return 2 * math.Pi * r.Float64() }
	x := make([]float64, s.total)
	s.shaft.add(x, groupPartials(1,
		[]partial{{mult: v - 1, phase: ph()}, {mult: v + 1, phase: ph()}, {mult: v - 2, phase: ph()}, {mult: v + 2, phase: ph()},
			{mult: v, phase: h.vanePhase + math.Pi/2}, {mult: 2*v - 1, phase: ph()}, {mult: 2*v + 1, phase: ph()}},
		[]float64{0.22, 0.22, 0.1, 0.1, 0.2, 0.08, 0.08}))
	return x
}

// leak: steady hiss, noise band-limited to 2-7 kHz with a slight flutter.
func (s *scene) leak(r *rand.Rand) []float64 {
	x := white(r, s.total)
	lo, hi := uniform(r, 1800, 2500), uniform(r, 6000, 7000)
	for range 2 {
		a := highpass(s.rate, lo, math.Sqrt2/2)
		a.run(x)
		b := lowpass(s.rate, hi, math.Sqrt2/2)
		b.run(x)
	}
	wob := slowWobble(r, s.rate, s.total, 0.3)
	for i := range x {
		x[i] *= 1 + 0.1*wob[i]
	}
	return x
}

// dryRunning: an intermittent rubbing squeal whose pitch wobbles with the
// shaft and at random, plus friction noise above 3 kHz modulated at shaft
// rate. (The loss of flow turbulence is applied by the caller.)
func (s *scene) dryRunning(r *rand.Rand) []float64 {
	fs := float64(s.rate)
	f0 := uniform(r, 1200, 3500)
	wob := slowWobble(r, s.rate, s.total, 2)
	env := make([]float64, s.total)
	ramp := 0.02 * fs
	for i := 0; i < s.total; {
		on := int(uniform(r, 0.15, 1.2) * fs)
		for j := 0; j < on && i+j < s.total; j++ {
			env[i+j] = smoothStep(float64(j)/ramp) * smoothStep(float64(on-j)/ramp)
		}
		i += on + int(uniform(r, 0.05, 0.6)*fs)
	}
	sq := make([]float64, s.total)
	var phase float64
	p := 2 * math.Pi * r.Float64()
	for i := range sq {
		f := f0 * (1 + 0.015*math.Sin(2*math.Pi*s.shaft.cyclesAt(i)+p) + 0.01*wob[i])
		phase += 2 * math.Pi * f / fs
		if phase > 2*math.Pi {
			phase -= 2 * math.Pi
		}
		if env[i] == 0 {
			continue
		}
		sn, cs := math.Sincos(phase)
		s2 := 2 * sn * cs
		c2 := cs*cs - sn*sn
		s3 := sn*c2 + cs*s2
		v := sn + 0.5*s2*boolf(2*f < 0.45*fs) + 0.25*s3*boolf(3*f < 0.45*fs)
		sq[i] = env[i] * v
	}
	fr := white(r, s.total)
	for range 2 {
		h := highpass(s.rate, 3000, math.Sqrt2/2)
		h.run(fr)
	}
	for i := range fr {
		fr[i] *= 1 + 0.5*math.Cos(2*math.Pi*s.shaft.cyclesAt(i)+p)
	}
	return s.mixUnit([][]float64{sq, fr}, []float64{0.5, 0.5})
}

func boolf(b bool) float64 {
	if b {
		return 1
	}
	return 0
}
