package gamma

import (
	"errors"
	"fmt"
	"math"
	"testing"
)

func TestDistEdges(t *testing.T) {
	d := Dist{Shape: 2, Scale: 3}
	inf := math.Inf(1)
	tests := []struct {
		name string
		got  float64
		want float64
	}{
		{"CDF at 0", d.CDF(0), 0},
		{"CDF below 0", d.CDF(-1), 0},
		{"CDF at +Inf", d.CDF(inf), 1},
		{"Survival at 0", d.Survival(0), 1},
		{"Survival at +Inf", d.Survival(inf), 0},
		{"Quantile 0", d.Quantile(0), 0},
		{"Quantile 1", d.Quantile(1), inf},
		{"Mean", d.Mean(), 6},
		// Shape 1 is the exponential distribution: CDF = 1 - exp(-x/θ).
		{"exponential CDF", Dist{Shape: 1, Scale: 2}.CDF(3), 1 - math.Exp(-1.5)},
		{"exponential quantile", Dist{Shape: 1, Scale: 2}.Quantile(0.5), 2 * math.Ln2},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if tt.got != tt.want && math.Abs(tt.got-tt.want) > 1e-14*math.Abs(tt.want) {
				t.Errorf("got %.17g, want %.17g", tt.got, tt.want)
			}
		})
	}
}

func TestDistInvalid(t *testing.T) {
	bad := []Dist{{}, {Shape: -1, Scale: 1}, {Shape: 1, Scale: 0}, {Shape: math.NaN(), Scale: 1}, {Shape: 1, Scale: math.Inf(1)}, {Shape: 1e-11, Scale: 1}, {Shape: 2e6, Scale: 1}}
	for _, d := range bad {
		if err := d.Validate(); !errors.Is(err, ErrBadDist) {
			t.Errorf("%+v: Validate = %v", d, err)
		}
		for name, v := range map[string]float64{
			"CDF": d.CDF(1), "Survival": d.Survival(1), "Quantile": d.Quantile(0.5),
			"Mean": d.Mean(), "KSStat": KSStat([]float64{1, 2}, d),
		} {
			if !math.IsNaN(v) {
				t.Errorf("%+v: %s = %v, want NaN", d, name, v)
			}
		}
	}
	good := Dist{Shape: 2, Scale: 1}
	if err := good.Validate(); err != nil {
		t.Errorf("Validate(%+v) = %v", good, err)
	}
	for _, p := range []float64{-0.1, 1.1, math.NaN()} {
		if q := good.Quantile(p); !math.IsNaN(q) {
			t.Errorf("Quantile(%v) = %v, want NaN", p, q)
		}
	}
	if v := good.CDF(math.NaN()); !math.IsNaN(v) {
		t.Errorf("CDF(NaN) = %v", v)
	}
}

func TestQuantileInvertsCDF(t *testing.T) {
	for _, d := range []Dist{{0.3, 10}, {0.8, 2.5}, {9, 0.05}, {250, 0.01}} {
		for _, p := range []float64{1e-6, 0.01, 0.5, 0.9, 0.999, 0.999999} {
			x := d.Quantile(p)
			if got := d.CDF(x); math.Abs(got-p) > 1e-12 {
				t.Errorf("%+v: CDF(Quantile(%v)) = %v", d, p, got)
			}
		}
	}
}

func TestKSStat(t *testing.T) {
	// Exponential with mean 1; the sample sits exactly on its quartiles,
	// so the largest gap is 1/4 (just below each point).
	d := Dist{Shape: 1, Scale: 1}
	x := []float64{d.Quantile(0.75), d.Quantile(0.25), d.Quantile(0.5)}
	if got := KSStat(x, d); math.Abs(got-0.25) > 1e-15 {
		t.Errorf("KSStat = %v, want 0.25", got)
	}
	if x[0] != d.Quantile(0.75) {
		t.Error("KSStat modified its input")
	}
	if got := KSStat(nil, d); !math.IsNaN(got) {
		t.Errorf("KSStat(empty) = %v, want NaN", got)
	}
	if got := KSStat([]float64{1, math.NaN()}, d); !math.IsNaN(got) {
		t.Errorf("KSStat(NaN) = %v, want NaN", got)
	}
}

func TestQuantileLowerTail(t *testing.T) {
	// Reference: scipy.special.gammaincinv(k, p), SciPy 1.10.1.
	tests := []struct {
		k, p, want float64
	}{
		{0.3, 1e-30, 6.972699096408959e-101},
		{0.3, 1e-6, 6.97269909640939e-21},
		{0.8, 1e-30, 2.893415694251295e-38},
		{9, 1e-300, 1.924944067037612e-33},
		{250, 1e-30, 109.43470833290189},
		{0.3, 1e-300, 0},
		{1e6, 1e-300, 963408.6539398656},
		{1e6, 1e-16, 991800.1048048277},
		{1e6, 0.25, 999325.3286845871},
	}
	for _, tt := range tests {
		d := Dist{Shape: tt.k, Scale: 1}
		if got := d.Quantile(tt.p); relErr(got, tt.want) > 1e-9 {
			t.Errorf("Quantile(%v) with k = %v: %.17g, scipy %.17g", tt.p, tt.k, got, tt.want)
		}
	}
}

func TestExtremeInputsDoNotPanic(t *testing.T) {
	tiny, huge := math.SmallestNonzeroFloat64, math.MaxFloat64
	dists := []Dist{{MinShape, 1}, {MaxShape, 1}, {1, tiny}, {1, huge}, {1e-3, 1e-3}, {1e6, 1e6}, {tiny, 1}, {huge, 1}}
	xs := []float64{tiny, 1e-300, 0.5, 1, 1e300, huge}
	ps := []float64{tiny, 1e-300, 1e-16, 0.25, 0.5, 1 - 1e-16}
	for _, d := range dists {
		t.Run(fmt.Sprintf("%g_%g", d.Shape, d.Scale), func(t *testing.T) {
			defer func() {
				if r := recover(); r != nil {
					t.Errorf("panic: %v", r)
				}
			}()
			for _, x := range xs {
				_ = d.CDF(x)
				_ = d.Survival(x)
			}
			for _, p := range ps {
				_ = d.Quantile(p)
			}
			_ = KSStat(xs, d)
		})
	}
}
