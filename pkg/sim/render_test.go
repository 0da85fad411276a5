package sim

import (
	"fmt"
	"math"
	"sort"
	"testing"
)

// goertzelPower returns |sum x[n] exp(-2 pi i f n / rate)|^2 / len(x), the
// DFT power at one frequency (G. Goertzel, Am. Math. Monthly 65(1), 1958;
// evaluated directly here).
func goertzelPower(x []float64, rate int, f float64) float64 {
	var re, im float64
	w := 2 * math.Pi * f / float64(rate)
	for n, v := range x {
		s, c := math.Sincos(w * float64(n))
		re += v * c
		im -= v * s
	}
	return (re*re + im*im) / float64(len(x))
}

// windowedPower averages goertzelPower over consecutive windows of win samples.
func windowedPower(x []float64, rate, win int, f float64) float64 {
	var p float64
	k := 0
	for i := 0; i+win <= len(x); i += win {
		p += goertzelPower(x[i:i+win], rate, f)
		k++
	}
	return p / float64(k)
}

func db(p float64) float64 { return 10 * math.Log10(p) }

func TestRenderDeterministic(t *testing.T) {
	m := NewMachine(5)
	c := Clip{Fault: FaultCavitation, Severity: "moderate", SNRdB: 0, SetpointHz: m.Setpoints[1],
		Nuisance: "neighbour+clank+beeper+speech", Seed: 42}
	render := func(m Machine, c Clip) []int16 {
		dst := make([]int16, 16000*3)
		Render(m, c, 16000, 3, dst)
		return dst
	}
	a, b := render(m, c), render(m, c)
	c2 := c
	c2.Seed = 43
	other := render(m, c2)
	m2 := NewMachine(6)
	c3 := c
	c3.SetpointHz = m2.Setpoints[1]
	otherMachine := render(m2, c3)
	same := func(x, y []int16) bool {
		for i := range x {
			if x[i] != y[i] {
				return false
			}
		}
		return true
	}
	tests := []struct {
		name string
		x, y []int16
		want bool
	}{
		{"same seed same samples", a, b, true},
		{"different clip seed", a, other, false},
		{"different machine seed", a, otherMachine, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := same(tc.x, tc.y); got != tc.want {
				t.Errorf("identical = %v, want %v", got, tc.want)
			}
		})
	}
}

func TestSNRAchieved(t *testing.T) {
	// SNR = machine power / all-background power over the clip at the
	// microphone; design tolerance 0.5 dB (project rule). The parts must also
	// be what Render writes (within the recorder self-noise, a few LSB).
	m := NewMachine(3)
	for i, snr := range SNRSet() {
		for _, nuis := range []string{"none", "neighbour+clank+beeper+speech"} {
			t.Run(fmt.Sprintf("%+g dB %s", snr, nuis), func(t *testing.T) {
				c := Clip{SNRdB: snr, SetpointHz: m.Setpoints[i%3], Nuisance: nuis, Seed: uint64(100 + i)}
				p := renderParts(m, c, 16000, 4)
				got := db(meanPower(p.machine) / meanPower(p.background))
				if math.Abs(got-snr) > 0.5 {
					t.Errorf("SNR %.2f dB, want %.0f +- 0.5", got, snr)
				}
				dst := make([]int16, 16000*4)
				Render(m, c, 16000, 4, dst)
				for j, v := range dst {
					want := (p.machine[j] + p.background[j]) * p.gain[j] * 32767
					if math.Abs(want) < 32000 && math.Abs(float64(v)-want) > 4 {
						t.Fatalf("sample %d: Render %d, parts %.1f", j, v, want)
					}
				}
			})
		}
	}
}

func TestFaultLevelAndLoudness(t *testing.T) {
	// Fault power relative to the healthy machine at the source, in the
	// fault's own third-octave bands, must match SeverityDB within 0.1 dB
	// (design). Honesty check (project rule: not detectable by loudness
	// alone): at mild the machine's level at the microphone moves by under
	// 1.5 dB, inside the +-3 dB microphone gain spread; a severe fault in a
	// band where the machine is loud (vane-pass, shaft harmonics) may raise
	// the level by several dB, as a badly damaged pump does.
	m := NewMachine(4)
	base := Clip{SNRdB: 3, SetpointHz: m.Setpoints[2], Nuisance: "none", Seed: 777}
	healthy := renderParts(m, base, 16000, 3)
	hp := meanPower(healthy.machine)
	for _, f := range Faults() {
		for _, sev := range Severities() {
			t.Run(f+"/"+sev, func(t *testing.T) {
				c := base
				c.Label, c.Fault, c.Severity = 1, f, sev
				p := renderParts(m, c, 16000, 3)
				got := db(inBandRatio(p.fault, p.healthy, 16000))
				if math.Abs(got-SeverityDB(sev)) > 0.1 {
					t.Errorf("fault at %.2f dB re machine, want %.0f", got, SeverityDB(sev))
				}
				dl := math.Abs(db(meanPower(p.machine) / hp))
				limit := map[string]float64{"mild": 1.5, "moderate": 4, "severe": 9}[sev]
				if dl > limit {
					t.Errorf("machine level moved %.2f dB, limit %.1f", dl, limit)
				}
			})
		}
	}
}

func TestClipping(t *testing.T) {
	// Fewer than 0.1 % of samples at the int16 rails (project rule), on the
	// hardest clips of a plan: lowest SNR, most nuisances.
	if testing.Short() {
		t.Skip("renders 10 s clips")
	}
	for _, seed := range []int64{1, 2, 3} {
		m, clips := Plan(DefaultOptions(seed))
		sort.SliceStable(clips, func(i, j int) bool {
			if clips[i].SNRdB != clips[j].SNRdB {
				return clips[i].SNRdB < clips[j].SNRdB
			}
			return len(clips[i].Nuisance) > len(clips[j].Nuisance)
		})
		dst := make([]int16, 160000)
		for _, c := range clips[:8] {
			t.Run(fmt.Sprintf("seed%d/%s", seed, c.Name), func(t *testing.T) {
				Render(m, c, 16000, 10, dst)
				n := 0
				for _, v := range dst {
					if v == 32767 || v == -32768 {
						n++
					}
				}
				if frac := float64(n) / float64(len(dst)); frac >= 0.001 {
					t.Errorf("%.3f %% clipped (%s, %+g dB)", 100*frac, c.Nuisance, c.SNRdB)
				}
			})
		}
	}
}

func TestVanePassTonePresent(t *testing.T) {
	// Spectral sanity: at +10 dB SNR the vane-pass tone (VanePassHz at the
	// set-point) stands at least 6 dB above the spectrum half a shaft order
	// either side (threshold: common practice, no source; typical margins are
	// 18-26 dB, but the hall can put a dip on a tone, as real rooms do).
	// Windows of 0.5 s tolerate the +-0.5 % speed wander.
	for _, seed := range []int64{1, 2, 3} {
		m := NewMachine(seed)
		for k, sp := range m.Setpoints {
			t.Run(fmt.Sprintf("seed%d/%.1fHz", seed, sp), func(t *testing.T) {
				c := Clip{SNRdB: 10, SetpointHz: sp, Nuisance: "none", Seed: uint64(seed*10 + int64(k))}
				dst := make([]int16, 16000*4)
				Render(m, c, 16000, 4, dst)
				x := make([]float64, len(dst))
				for i, v := range dst {
					x[i] = float64(v)
				}
				fr, vp := m.ShaftHz(sp), m.VanePassHz(sp)
				tone := windowedPower(x, 16000, 8000, vp)
				var ref float64
				for _, o := range []float64{-0.55, -0.45, 0.45, 0.55} {
					ref += windowedPower(x, 16000, 8000, vp+o*fr) / 4
				}
				got := db(tone / ref)
				t.Logf("vane pass %.1f Hz: %.1f dB above neighbourhood", vp, got)
				if got < 6 {
					t.Errorf("vane pass %.1f Hz only %.1f dB above its neighbourhood", vp, got)
				}
			})
		}
	}
}

func TestBearingImpactRates(t *testing.T) {
	// The envelope (squared signal) of a bearing fault repeats at BPFO for an
	// outer-race defect and BPFI for an inner-race one (Kim, An and Choi 2020;
	// Randall and Antoni 2011): its power there must exceed the power at
	// unrelated frequencies by 10 dB (threshold: common practice, no source).
	m := NewMachine(7)
	sp := m.Setpoints[1]
	fr := m.ShaftHz(sp)
	tests := []struct {
		fault string
		rate  float64
	}{
		{FaultBearingOuter, m.Bearing.BPFO(fr)},
		{FaultBearingInner, m.Bearing.BPFI(fr)},
	}
	for _, tc := range tests {
		t.Run(tc.fault, func(t *testing.T) {
			c := Clip{Label: 1, Fault: tc.fault, Severity: "severe", SNRdB: 0, SetpointHz: sp, Nuisance: "none", Seed: 9}
			p := renderParts(m, c, 16000, 4)
			env := make([]float64, len(p.fault))
			var mean float64
			for i, v := range p.fault {
				env[i] = v * v
				mean += env[i] / float64(len(env))
			}
			for i := range env {
				env[i] -= mean
			}
			on := windowedPower(env, 16000, 16000, tc.rate)
			var off float64
			for _, o := range []float64{0.62, 0.81, 1.27, 1.43} {
				off += windowedPower(env, 16000, 16000, tc.rate*o) / 4
			}
			if got := db(on / off); got < 10 {
				t.Errorf("envelope at %.1f Hz only %.1f dB above elsewhere", tc.rate, got)
			}
		})
	}
}

func BenchmarkRender10s(b *testing.B) {
	m, clips := Plan(DefaultOptions(1))
	dst := make([]int16, 160000)
	b.ResetTimer()
	for i := 0; b.Loop(); i++ {
		Render(m, clips[i%len(clips)], 16000, 10, dst)
	}
	b.ReportMetric(10*float64(b.N)/b.Elapsed().Seconds(), "audio-s/s")
}

func TestPartsFiniteAtOtherRates(t *testing.T) {
	// Every fault with every nuisance at several sample rates yields finite
	// parts (int16 conversion of NaN would be silent garbage).
	m := NewMachine(8)
	for _, rate := range []int{8000, 16000, 22050} {
		for i, f := range append([]string{""}, Faults()...) {
			t.Run(fmt.Sprintf("%d/%s", rate, f), func(t *testing.T) {
				c := Clip{Fault: f, SNRdB: -6, SetpointHz: m.Setpoints[i%3], Nuisance: "neighbour+clank+beeper+speech", Seed: uint64(i)}
				if f != "" {
					c.Label, c.Severity = 1, "severe"
				}
				p := renderParts(m, c, rate, 2)
				for _, x := range [][]float64{p.machine, p.background, p.gain, p.healthy, p.fault} {
					for j, v := range x {
						if math.IsNaN(v) || math.IsInf(v, 0) {
							t.Fatalf("non-finite value at %d", j)
						}
					}
				}
				if len(p.machine) != 2*rate {
					t.Fatalf("%d samples, want %d", len(p.machine), 2*rate)
				}
			})
		}
	}
}
