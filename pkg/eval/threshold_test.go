package eval

import (
	"errors"
	"math"
	"testing"
)

func TestSuggestThreshold(t *testing.T) {
	// Normals score 1..10; anomalies 12, 11, 9.5 and 5.
	labels := []int{0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1}
	scores := []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 12, 11, 9.5, 5}
	tests := []struct {
		name          string
		maxFPR        float64
		thr, tpr, fpr float64
	}{
		{"one normal allowed", 0.1, 9.5, 0.75, 0.1},
		{"no normal allowed", 0.05, 11, 0.5, 0},
		{"everything allowed", 1, 5, 1, 0.6},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			thr, tpr, fpr, err := SuggestThreshold(labels, scores, tt.maxFPR)
			if err != nil {
				t.Fatal(err)
			}
			if thr != tt.thr || math.Abs(tpr-tt.tpr) > 1e-15 || math.Abs(fpr-tt.fpr) > 1e-15 {
				t.Errorf("got (%v, %v, %v), want (%v, %v, %v)", thr, tpr, fpr, tt.thr, tt.tpr, tt.fpr)
			}
		})
	}
}

func TestSuggestThresholdFlagsNothing(t *testing.T) {
	thr, tpr, fpr, err := SuggestThreshold([]int{0, 1}, []float64{2, 1}, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsInf(thr, 1) || tpr != 0 || fpr != 0 {
		t.Errorf("got (%v, %v, %v), want (+Inf, 0, 0)", thr, tpr, fpr)
	}
}

func TestSuggestThresholdErrors(t *testing.T) {
	tests := []struct {
		name   string
		labels []int
		scores []float64
		maxFPR float64
		want   error
	}{
		{"max FPR zero", []int{0, 1}, []float64{1, 2}, 0, ErrBadMaxFPR},
		{"one class", []int{1, 1}, []float64{1, 2}, 0.1, ErrOneClass},
		{"length", []int{0, 1}, []float64{1}, 0.1, ErrLengthMismatch},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, _, _, err := SuggestThreshold(tt.labels, tt.scores, tt.maxFPR); !errors.Is(err, tt.want) {
				t.Errorf("error = %v, want %v", err, tt.want)
			}
		})
	}
}

func TestYoudenThreshold(t *testing.T) {
	labels := []int{0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1}
	scores := []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 12, 11, 9.5, 5}
	thr, tpr, fpr, err := YoudenThreshold(labels, scores)
	if err != nil {
		t.Fatal(err)
	}
	// J = 0.75 - 0.1 at 9.5 beats 1 - 0.6 at 5.
	if thr != 9.5 || tpr != 0.75 || fpr != 0.1 {
		t.Errorf("got (%v, %v, %v), want (9.5, 0.75, 0.1)", thr, tpr, fpr)
	}
	if _, _, _, err := YoudenThreshold([]int{0}, []float64{1}); !errors.Is(err, ErrOneClass) {
		t.Errorf("one class error = %v", err)
	}
}
