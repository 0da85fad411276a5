package features

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestDBAccuracy compares DB with 10*math.Log10 (float64) over the whole
// normal float32 range, log-spaced plus random mantissas. Bound: the
// documented 1e-4 dB (interpolation error 3.3e-5 dB plus float32
// rounding of results up to 380 dB, ulp 3e-5 dB).
func TestDBAccuracy(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	worst, at := 0.0, float32(0)
	check := func(x float32) {
		want := 10 * math.Log10(float64(x))
		if d := math.Abs(float64(DB(x)) - want); d > worst {
			worst, at = d, x
		}
	}
	for e := -126; e <= 127; e++ {
		for i := 0; i < 200; i++ {
			check(float32(math.Ldexp(1+rng.Float64(), e)))
		}
		check(float32(math.Ldexp(1, e)))
	}
	for _, x := range []float32{math.MaxFloat32, math.SmallestNonzeroFloat32 * (1 << 23), 1, 10, 0.5, 98304} {
		check(x)
	}
	if worst > 1e-4 {
		t.Errorf("max |DB - 10 log10| = %.3g dB at %g, want < 1e-4", worst, at)
	}
	t.Logf("max error %.3g dB at %g", worst, at)
}

// TestDBSpecial checks the documented special values; the exact powers
// of ten follow from the definition of the decibel.
func TestDBSpecial(t *testing.T) {
	for _, tc := range []struct {
		name string
		x    float32
		want float32
		tol  float32
	}{
		{"one", 1, 0, 0},
		{"ten", 10, 10, 1e-4},
		{"hundred", 100, 20, 1e-4},
		{"tenth", 0.1, -10, 1e-4},
		{"two", 2, 3.0103, 1e-4},
		{"zero", 0, MinDB, 0},
		{"negative", -1, MinDB, 0},
		{"subnormal", math.SmallestNonzeroFloat32, MinDB, 0},
		{"NaN", float32(math.NaN()), MinDB, 0},
		{"+Inf", float32(math.Inf(1)), float32(math.Inf(1)), 0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := DB(tc.x)
			if !(got == tc.want || math.Abs(float64(got-tc.want)) <= float64(tc.tol)) {
				t.Errorf("DB(%g) = %g, want %g", tc.x, got, tc.want)
			}
		})
	}
}

// TestDBInto checks the row loop against DB, including special values.
func TestDBInto(t *testing.T) {
	src := []float32{1, 1e-12, 98304, 0, -3, float32(math.NaN()), float32(math.Inf(1)), 1e30, 3e-39}
	dst := make([]float32, len(src))
	const sub, floor = 49.9, -100
	dbInto(dst, src, sub, floor)
	for i, x := range src {
		want := max(DB(x)-sub, floor)
		if dst[i] != want {
			t.Errorf("dbInto(%g) = %g, want %g", x, dst[i], want)
		}
	}
}
