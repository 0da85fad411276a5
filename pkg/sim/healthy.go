package sim

import (
	"math"
)

// healthyParts is the healthy machine at the source, at its final level
// (nominalDBFS, affinity law and wander applied), full length. Flow
// turbulence is kept apart because dry running takes it away.
type healthyParts struct {
	rest, turb []float64
	vanePhase  float64 // phase of the vane-pass partial, radians
}

// total returns rest + turb at sample i.
func (h healthyParts) at(i int) float64 { return h.rest[i] + h.turb[i] }

// powerOf returns the healthy machine's mean power over the visible window.
func (s *scene) healthyPower(h healthyParts) float64 {
	var p float64
	for i := s.pre; i < s.total; i++ {
		v := h.at(i)
		p += v * v
	}
	return p / float64(s.n)
}

// groupPartials returns partials with relative powers rel (any scale) rescaled
// so that together they carry the given mean power.
func groupPartials(power float64, ps []partial, rel []float64) []partial {
	var sum float64
	for _, w := range rel {
		sum += w
	}
	out := make([]partial, len(ps))
	for i, p := range ps {
		p.amp = math.Sqrt(2 * power * rel[i] / sum) // sinusoid power is amp^2/2
		out[i] = p
	}
	return out
}

// healthy synthesises the healthy pump skid:
//   - shaft 1x and 2x (small in health),
//   - vane pass Vx with harmonics 2V, 3V and sidebands V+-1 from a slight
//     amplitude modulation at shaft rate (VanePassHz),
//   - the motor cooling fan's blade pass and its second harmonic,
//   - magnetic hum at twice the drive frequency with harmonics 4f, 6f
//     (radial magnetic force has twice the supply frequency; e.g. Randall
//     2011; from memory),
//   - drive PWM whine at the carrier and its sidebands at carrier +- 2f and
//     +- 4f (common for sine-triangle PWM; from memory),
//   - flow turbulence: pink noise rolling off above TurbulenceCornerHz scaled
//     by speed, weakly modulated at vane pass,
//   - cooling-fan broadband noise and faint bearing noise near ResonanceHz.
//
// Shares come from Machine.Mix with +-1 dB clip-to-clip jitter; tone phases
// are fixed per machine.
func (s *scene) healthy() healthyParts {
	m := s.m
	mp := newRand(uint64(m.Seed), streamMachinePhases)
	r := newRand(s.c.Seed, streamHealthy)
	share := func(db float64) float64 { return dbToPow(db + uniform(r, -1, 1)) }
	ph := func() float64 { return 2 * math.Pi * mp.Float64() }
	v := float64(m.Vanes)
	b := float64(m.FanBlades)

	vanePhase := ph()
	vp := groupPartials(share(m.Mix.VanePass),
		[]partial{{mult: v, phase: vanePhase}, {mult: 2 * v, phase: ph()}, {mult: 3 * v, phase: ph()}},
		[]float64{1, 0.3, 0.1})
	aV := vp[0].amp
	am := m.VaneAM * (1 + 0.2*gauss(r))
	amPhase := ph()
	// (1 + am cos(phi + p)) sin(V phi + q) has sidebands of amplitude am/2 at
	// (V+1) phi + q + p and (V-1) phi + q - p.
	vp = append(vp,
		partial{mult: v + 1, amp: aV * am / 2, phase: vanePhase + amPhase},
		partial{mult: v - 1, amp: aV * am / 2, phase: vanePhase - amPhase})
	sync := append(vp, groupPartials(share(m.Mix.Shaft),
		[]partial{{mult: 1, phase: ph()}, {mult: 2, phase: ph()}}, []float64{0.7, 0.3})...)
	sync = append(sync, groupPartials(share(m.Mix.FanTonal),
		[]partial{{mult: b, phase: ph()}, {mult: 2 * b, phase: ph()}}, []float64{0.8, 0.2})...)
	tonal := make([]float64, s.total)
	s.shaft.add(tonal, sync)

	elec := groupPartials(share(m.Mix.Hum),
		[]partial{{mult: 2, phase: ph()}, {mult: 4, phase: ph()}, {mult: 6, phase: ph()}},
		[]float64{0.8, 0.15, 0.05})
	fc := m.CarrierHz
	elec = append(elec, groupPartials(share(m.Mix.Carrier),
		[]partial{{offsetHz: fc, phase: ph()}, {mult: 2, offsetHz: fc, phase: ph()}, {mult: -2, offsetHz: fc, phase: ph()},
			{mult: 4, offsetHz: fc, phase: ph()}, {mult: -4, offsetHz: fc, phase: ph()}},
		[]float64{0.1, 0.35, 0.35, 0.1, 0.1})...)
	s.drive.add(tonal, elec)

	// Flow turbulence, with a weak cyclostationary modulation at vane pass.
	turb := white(r, s.total)
	pinkFilter(turb, s.rate, 20)
	corner := m.TurbulenceCornerHz * s.c.SetpointHz / m.LineHz
	for range 2 {
		f := lowpass(s.rate, corner, math.Sqrt2/2)
		f.run(turb)
	}
	hp := highpass(s.rate, 20, math.Sqrt2/2)
	hp.run(turb)
	mod := make([]float64, s.total)
	s.shaft.add(mod, []partial{{mult: v, amp: 0.1, phase: vanePhase}})
	for i := range turb {
		turb[i] *= 1 + mod[i]
	}
	normalise(turb, s.pre, s.total)
	scale(turb, math.Sqrt(share(m.Mix.Turbulence)))

	fan := white(r, s.total)
	fbp := bandpass(s.rate, uniform(mp, 700, 2000), 0.7)
	fbp.run(fan)
	normalise(fan, s.pre, s.total)

	brg := white(r, s.total)
	bbp := bandpass(s.rate, m.ResonanceHz, 3)
	bbp.run(brg)
	normalise(brg, s.pre, s.total)

	rest := tonal
	addScaled(rest, fan, math.Sqrt(share(m.Mix.FanBroadband)))
	addScaled(rest, brg, math.Sqrt(share(m.Mix.BearingNoise)))

	// Slow flow unsteadiness (+-3 % rms), the affinity-law level and the
	// nominal calibration apply to everything the machine radiates.
	wob := slowWobble(r, s.rate, s.total, 0.3)
	a0 := dbToAmp(nominalDBFS)
	for i := range rest {
		g := a0 * s.aff[i] * (1 + 0.03*wob[i])
		rest[i] *= g
		turb[i] *= g
	}
	return healthyParts{rest: rest, turb: turb, vanePhase: vanePhase}
}
