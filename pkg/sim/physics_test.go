package sim

import (
	"fmt"
	"math"
	"testing"
)

func TestBearingDefectFrequencies(t *testing.T) {
	// Worked example: n = 9, d = 7.9375 mm, D = 38.50 mm, theta = 0. Orders
	// from the Curtin University bearing test-rig data description
	// (G. Forbes, CC-BY 4.0): FTF 0.3969, BPFO 3.572, BPFI 5.428, BSF 2.32 x
	// shaft; at 29 Hz 11.51, 103.59, 157.41, 67.34 Hz. Relations: Kim, An and
	// Choi, "Diagnostics 101", Appl. Sci. 10(20):7302, 2020, eqs. 1-4.
	curtin := Bearing{Balls: 9, BallDiameter: 7.9375, PitchDiameter: 38.50}
	// Second example: CWRU drive-end bearing, n = 9, d = 0.3126 in,
	// D = 1.537 in (geometry and orders BPFI 5.4152, BPFO 3.5848,
	// FTF 0.39828 quoted from memory, not looked up).
	cwru := Bearing{Balls: 9, BallDiameter: 0.3126, PitchDiameter: 1.537}
	tests := []struct {
		name  string
		b     Bearing
		fn    func(Bearing, float64) float64
		shaft float64
		want  float64
		tol   float64
	}{
		{"curtin FTF order", curtin, Bearing.FTF, 1, 0.3969, 0.0001},
		{"curtin BPFO order", curtin, Bearing.BPFO, 1, 3.572, 0.001},
		{"curtin BPFI order", curtin, Bearing.BPFI, 1, 5.428, 0.001},
		{"curtin BSF order", curtin, Bearing.BSF, 1, 2.32, 0.005},
		{"curtin FTF 29 Hz", curtin, Bearing.FTF, 29, 11.51, 0.01},
		{"curtin BPFO 29 Hz", curtin, Bearing.BPFO, 29, 103.59, 0.01},
		{"curtin BPFI 29 Hz", curtin, Bearing.BPFI, 29, 157.41, 0.01},
		{"curtin BSF 29 Hz", curtin, Bearing.BSF, 29, 67.34, 0.02},
		{"cwru BPFI order", cwru, Bearing.BPFI, 1, 5.4152, 0.0005},
		{"cwru BPFO order", cwru, Bearing.BPFO, 1, 3.5848, 0.0005},
		{"cwru FTF order", cwru, Bearing.FTF, 1, 0.39828, 0.0001},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.fn(tc.b, tc.shaft); math.Abs(got-tc.want) > tc.tol {
				t.Errorf("got %.5f, want %.5f +- %g", got, tc.want, tc.tol)
			}
		})
	}
}

func TestBearingIdentities(t *testing.T) {
	// BPFO + BPFI = n fr and BPFO = n FTF follow from eqs. 1-3 of Kim, An and
	// Choi 2020 directly.
	for _, b := range []Bearing{{9, 7.9375, 38.5, 0}, {12, 10, 50, 15}} {
		t.Run(fmt.Sprint(b.Balls), func(t *testing.T) {
			fr := 24.5
			if d := b.BPFO(fr) + b.BPFI(fr) - float64(b.Balls)*fr; math.Abs(d) > 1e-9 {
				t.Errorf("BPFO+BPFI-n fr = %g", d)
			}
			if d := b.BPFO(fr) - float64(b.Balls)*b.FTF(fr); math.Abs(d) > 1e-9 {
				t.Errorf("BPFO-n FTF = %g", d)
			}
		})
	}
}

func TestMotorAndPumpRelations(t *testing.T) {
	// Synchronous speed 120 f / p and fr = f (2/p)(1 - s): standard motor
	// relations (e.g. Chapman, Electric Machinery Fundamentals; from memory).
	// 50 Hz 4-pole: 1500 rpm; 60 Hz 2-pole: 3600 rpm; 2 % slip at 50 Hz
	// 4-pole: 24.5 Hz = 1470 rpm. Vane pass = vanes x fr (Randall 2011; from
	// memory): 6 vanes at 24.5 Hz give 147 Hz.
	tests := []struct {
		name      string
		got, want float64
	}{
		{"sync 50 Hz 4-pole", SyncSpeedRPM(50, 4), 1500},
		{"sync 60 Hz 2-pole", SyncSpeedRPM(60, 2), 3600},
		{"shaft 50 Hz 4-pole 2 %", ShaftHz(50, 4, 0.02), 24.5},
		{"shaft 60 Hz 2-pole 1 %", ShaftHz(60, 2, 0.01), 59.4},
		{"shaft rpm", ShaftHz(50, 4, 0.02) * 60, 1470},
		{"vane pass 6 x 24.5", VanePassHz(6, 24.5), 147},
		{"vane pass 5 x 59.4", VanePassHz(5, 59.4), 297},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if math.Abs(tc.got-tc.want) > 1e-9 {
				t.Errorf("got %g, want %g", tc.got, tc.want)
			}
		})
	}
}

func TestAffinityLevel(t *testing.T) {
	// Affinity laws: power ~ N^3 (pump handbooks, e.g. Karassik; from memory);
	// our assumption of acoustic power ~ hydraulic power gives
	// 30 log10(N2/N1): doubling speed +9.03 dB, 60 % speed -6.66 dB.
	tests := []struct {
		name   string
		n1, n2 float64
		want   float64
	}{
		{"double", 1, 2, 9.0309},
		{"sixty percent", 50, 30, -6.6555},
		{"same", 1480, 1480, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := AffinityLevelDB(tc.n1, tc.n2); math.Abs(got-tc.want) > 1e-3 {
				t.Errorf("got %.4f dB, want %.4f dB", got, tc.want)
			}
			if got := 20 * math.Log10(affinityGain(tc.n1, tc.n2)); math.Abs(got-tc.want) > 1e-3 {
				t.Errorf("amplitude factor gives %.4f dB, want %.4f dB", got, tc.want)
			}
		})
	}
}

func ExampleBearing_BPFO() {
	b := Bearing{Balls: 9, BallDiameter: 7.9375, PitchDiameter: 38.50}
	fmt.Printf("FTF %.2f Hz, BPFO %.2f Hz, BPFI %.2f Hz, BSF %.2f Hz\n", b.FTF(29), b.BPFO(29), b.BPFI(29), b.BSF(29))
	// Output: FTF 11.51 Hz, BPFO 103.59 Hz, BPFI 157.41 Hz, BSF 67.34 Hz
}

func ExampleShaftHz() {
	fr := ShaftHz(50, 4, 0.02)
	fmt.Printf("shaft %.1f Hz (%.0f rpm), vane pass with 6 vanes %.1f Hz\n", fr, fr*60, VanePassHz(6, fr))
	// Output: shaft 24.5 Hz (1470 rpm), vane pass with 6 vanes 147.0 Hz
}
