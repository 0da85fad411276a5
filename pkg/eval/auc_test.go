package eval

import (
	"errors"
	"math"
	"testing"
)

func TestAUCErrors(t *testing.T) {
	tests := []struct {
		name   string
		labels []int
		scores []float64
		want   error
	}{
		{"length", []int{0, 1}, []float64{0.1}, ErrLengthMismatch},
		{"empty", nil, nil, ErrOneClass},
		{"only normals", []int{0, 0, 0}, []float64{1, 2, 3}, ErrOneClass},
		{"only anomalies", []int{1, 1}, []float64{1, 2}, ErrOneClass},
		{"bad label", []int{0, 2}, []float64{1, 2}, ErrBadLabel},
		{"NaN score", []int{0, 1}, []float64{math.NaN(), 2}, ErrBadScore},
		{"Inf score", []int{0, 1}, []float64{1, math.Inf(1)}, ErrBadScore},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := AUC(tt.labels, tt.scores); !errors.Is(err, tt.want) {
				t.Errorf("AUC error = %v, want %v", err, tt.want)
			}
			if _, err := PartialAUC(tt.labels, tt.scores, 0.1); !errors.Is(err, tt.want) {
				t.Errorf("PartialAUC error = %v, want %v", err, tt.want)
			}
			if _, _, _, err := ROC(tt.labels, tt.scores); !errors.Is(err, tt.want) {
				t.Errorf("ROC error = %v, want %v", err, tt.want)
			}
		})
	}
}

func TestPartialAUCBadMaxFPR(t *testing.T) {
	labels := []int{0, 1, 0, 1}
	scores := []float64{0.1, 0.9, 0.3, 0.4}
	for _, p := range []float64{0, -0.1, 1.5, math.NaN()} {
		if _, err := PartialAUC(labels, scores, p); !errors.Is(err, ErrBadMaxFPR) {
			t.Errorf("PartialAUC(maxFPR=%v) error = %v, want ErrBadMaxFPR", p, err)
		}
	}
}

func TestAUCIsPairwiseProbability(t *testing.T) {
	tests := []struct {
		name   string
		labels []int
		scores []float64
		want   float64
	}{
		{"perfect", []int{0, 0, 1, 1}, []float64{0.1, 0.2, 0.8, 0.9}, 1},
		{"inverted", []int{1, 1, 0, 0}, []float64{0.1, 0.2, 0.8, 0.9}, 0},
		{"all tied", []int{0, 1, 0, 1}, []float64{3, 3, 3, 3}, 0.5},
		{"one tie", []int{0, 1}, []float64{2, 2}, 0.5},
		// Pairs (anomaly, normal): 0.9>0.1, 0.9>0.5, 0.5=0.5, 0.5>0.1 -> 3.5/4.
		{"mixed", []int{1, 1, 0, 0}, []float64{0.9, 0.5, 0.5, 0.1}, 0.875},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := AUC(tt.labels, tt.scores)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-tt.want) > 1e-15 {
				t.Errorf("AUC = %v, want %v", got, tt.want)
			}
		})
	}
}

func TestInputsNotModified(t *testing.T) {
	labels := []int{1, 0, 1, 0}
	scores := []float64{0.2, 0.9, 0.5, 0.1}
	if _, err := PartialAUC(labels, scores, 0.1); err != nil {
		t.Fatal(err)
	}
	if labels[0] != 1 || scores[0] != 0.2 || scores[1] != 0.9 {
		t.Errorf("inputs modified: %v %v", labels, scores)
	}
}
