package eval

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// groupData is a small labelled set: six normals and five anomalies of
// two fault types, each item in an SNR band.
func groupData() ([]int, []float64, map[string][]string) {
	labels := []int{0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 1}
	scores := []float64{0.10, 0.20, 0.30, 0.35, 0.50, 0.60, 0.90, 0.40, 0.55, 0.70, 0.80}
	cols := map[string][]string{
		"fault": {"none", "", "None", "none", "", "none", "bearing", "bearing", "cavitation", "cavitation", "cavitation"},
		"snr":   {"low", "high", "low", "high", "low", "high", "low", "high", "low", "high", "mid"},
	}
	return labels, scores, cols
}

// subset returns the labels and scores at the given indices.
func subset(labels []int, scores []float64, idx []int) ([]int, []float64) {
	l := make([]int, len(idx))
	s := make([]float64, len(idx))
	for i, j := range idx {
		l[i], s[i] = labels[j], scores[j]
	}
	return l, s
}

func TestByGroup(t *testing.T) {
	labels, scores, cols := groupData()
	groups, err := ByGroup(labels, scores, cols, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	normals := []int{0, 1, 2, 3, 4, 5}
	tests := []struct {
		name, value string
		idx         []int
		err         bool
	}{
		// Fault: normals have no value, so every normal joins each group.
		{"fault", "bearing", append(append([]int{}, normals...), 6, 7), false},
		{"fault", "cavitation", append(append([]int{}, normals...), 8, 9, 10), false},
		// SNR: normals have a band, so only items of that band are used.
		{"snr", "high", []int{1, 3, 5, 7, 9}, false},
		{"snr", "low", []int{0, 2, 4, 6, 8}, false},
		{"snr", "mid", []int{10}, true},
	}
	if len(groups) != len(tests) {
		t.Fatalf("got %d groups, want %d: %+v", len(groups), len(tests), groups)
	}
	for i, tt := range tests {
		t.Run(tt.name+"="+tt.value, func(t *testing.T) {
			g := groups[i]
			if g.Name != tt.name || g.Value != tt.value {
				t.Fatalf("group %d is %s=%s", i, g.Name, g.Value)
			}
			l, s := subset(labels, scores, tt.idx)
			anomalies := 0
			for _, v := range l {
				anomalies += v
			}
			if g.N != len(tt.idx) || g.Anomalies != anomalies {
				t.Errorf("N, Anomalies = %d, %d, want %d, %d", g.N, g.Anomalies, len(tt.idx), anomalies)
			}
			if tt.err {
				if g.Err == "" || g.AUC != 0 || g.PAUC != 0 {
					t.Errorf("want Err and zero metrics, got %+v", g)
				}
				return
			}
			if g.Err != "" {
				t.Fatalf("unexpected Err %q", g.Err)
			}
			wantAUC, _ := AUC(l, s)
			wantPAUC, _ := PartialAUC(l, s, 0.1)
			if math.Abs(g.AUC-wantAUC) > 1e-15 || math.Abs(g.PAUC-wantPAUC) > 1e-15 {
				t.Errorf("AUC, PAUC = %v, %v, want %v, %v", g.AUC, g.PAUC, wantAUC, wantPAUC)
			}
		})
	}
}

func TestByGroupErrors(t *testing.T) {
	labels, scores, cols := groupData()
	cols["short"] = []string{"a"}
	if _, err := ByGroup(labels, scores, cols, 0.1); !errors.Is(err, ErrLengthMismatch) || !strings.Contains(err.Error(), `"short"`) {
		t.Errorf("short column error = %v", err)
	}
	labels, scores, cols = groupData()
	if _, err := ByGroup(labels, scores, cols, 2); !errors.Is(err, ErrBadMaxFPR) {
		t.Errorf("max FPR error = %v", err)
	}
	if _, err := ByGroup(labels[:6], scores[:6], nil, 0.1); !errors.Is(err, ErrOneClass) {
		t.Errorf("one class error = %v", err)
	}
}
