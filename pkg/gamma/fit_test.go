package gamma

import (
	"errors"
	"math"
	"testing"
)

// ramp returns n values 1, 2, ..., n.
func ramp(n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = float64(i + 1)
	}
	return x
}

func TestFitErrors(t *testing.T) {
	with := func(i int, v float64) []float64 {
		x := ramp(12)
		x[i] = v
		return x
	}
	equal := make([]float64, 15)
	for i := range equal {
		equal[i] = 0.25
	}
	tests := []struct {
		name string
		x    []float64
		want error
	}{
		{"empty", nil, ErrTooFew},
		{"nine", ramp(9), ErrTooFew},
		{"NaN", with(3, math.NaN()), ErrNotFinite},
		{"Inf", with(0, math.Inf(1)), ErrNotFinite},
		{"zero", with(5, 0), ErrNotPositive},
		{"sum overflows", []float64{1e308, 1e308, 1e308, 1e308, 1e308, 1e308, 1e308, 1e308, 1e308, 1e308}, ErrNotFinite},
		{"negative", with(11, -1), ErrNotPositive},
		{"all equal", equal, ErrNoSpread},
		{"shape too large", []float64{1, 1, 1, 1, 1, 1, 1, 1, 1, 1 + 1e-4}, ErrNoSpread},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := Fit(tt.x); !errors.Is(err, tt.want) {
				t.Errorf("error = %v, want %v", err, tt.want)
			}
		})
	}
}

func TestFitSolvesLikelihoodEquation(t *testing.T) {
	tests := []struct {
		name string
		x    []float64
	}{
		{"ramp", ramp(10)},
		{"nearly equal", []float64{1, 1, 1, 1, 1, 1, 1, 1, 1, 1 + 1e-2}},
		{"wide", []float64{1e-8, 1e-5, 0.01, 0.1, 1, 3, 10, 100, 1e4, 1e7}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			d, err := Fit(tt.x)
			if err != nil {
				t.Fatal(err)
			}
			var sum, sumLog float64
			for _, v := range tt.x {
				sum += v
				sumLog += math.Log(v)
			}
			n := float64(len(tt.x))
			s := math.Log(sum/n) - sumLog/n
			if got := logMinusDigamma(d.Shape); math.Abs(got-s) > 1e-9*s {
				t.Errorf("ln k - ψ(k) = %v at k = %v, want s = %v", got, d.Shape, s)
			}
			if math.Abs(d.Mean()-sum/n) > 1e-12*sum/n {
				t.Errorf("fitted mean %v, sample mean %v", d.Mean(), sum/n)
			}
		})
	}
}

func TestFitDoesNotModifyInput(t *testing.T) {
	x := ramp(10)
	if _, err := Fit(x); err != nil {
		t.Fatal(err)
	}
	for i, v := range x {
		if v != float64(i+1) {
			t.Fatalf("input modified: %v", x)
		}
	}
}
