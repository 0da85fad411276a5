package eval

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// sklearnCase is one case of testdata/eval/sklearn_cases.json, written by
// scripts/ref/make_eval_fixture.py with scikit-learn 1.2.1 (Debian
// python3-sklearn) and numpy 1.24.2.
type sklearnCase struct {
	Name          string             `json:"name"`
	Labels        []int              `json:"labels"`
	Scores        []float64          `json:"scores"`
	AUC           float64            `json:"auc"`
	PAUC          map[string]float64 `json:"pauc"`
	ROCFPR        []float64          `json:"roc_fpr"`
	ROCTPR        []float64          `json:"roc_tpr"`
	ROCThresholds []float64          `json:"roc_thresholds"`
}

// loadSklearnCases reads the scikit-learn fixture.
func loadSklearnCases(t *testing.T) []sklearnCase {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("..", "..", "testdata", "eval", "sklearn_cases.json"))
	if err != nil {
		t.Fatalf("read fixture: %v", err)
	}
	var f struct {
		Source string        `json:"source"`
		Cases  []sklearnCase `json:"cases"`
	}
	if err := json.Unmarshal(raw, &f); err != nil {
		t.Fatalf("parse fixture: %v", err)
	}
	if len(f.Cases) == 0 {
		t.Fatal("fixture has no cases")
	}
	t.Logf("reference: %s", f.Source)
	return f.Cases
}

const sklearnTol = 1e-12

func TestAUCMatchesSklearn(t *testing.T) {
	for _, c := range loadSklearnCases(t) {
		t.Run(c.Name, func(t *testing.T) {
			// Reference: sklearn.metrics.roc_auc_score, scikit-learn 1.2.1.
			got, err := AUC(c.Labels, c.Scores)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-c.AUC) > sklearnTol {
				t.Errorf("AUC = %.17g, sklearn %.17g", got, c.AUC)
			}
		})
	}
}

func TestPartialAUCMatchesSklearn(t *testing.T) {
	for _, c := range loadSklearnCases(t) {
		for key, want := range c.PAUC {
			t.Run(c.Name+"/max_fpr="+key, func(t *testing.T) {
				p, err := strconv.ParseFloat(key, 64)
				if err != nil {
					t.Fatal(err)
				}
				// Reference: sklearn.metrics.roc_auc_score(max_fpr=p), scikit-learn 1.2.1.
				got, err := PartialAUC(c.Labels, c.Scores, p)
				if err != nil {
					t.Fatal(err)
				}
				if math.Abs(got-want) > sklearnTol {
					t.Errorf("PartialAUC = %.17g, sklearn %.17g", got, want)
				}
			})
		}
	}
}

func TestROCMatchesSklearn(t *testing.T) {
	for _, c := range loadSklearnCases(t) {
		t.Run(c.Name, func(t *testing.T) {
			// Reference: sklearn.metrics.roc_curve(drop_intermediate=False),
			// scikit-learn 1.2.1; its first threshold (max+1) is not stored.
			fpr, tpr, thr, err := ROC(c.Labels, c.Scores)
			if err != nil {
				t.Fatal(err)
			}
			if len(fpr) != len(c.ROCFPR) || len(tpr) != len(c.ROCTPR) || len(thr) != len(c.ROCThresholds)+1 {
				t.Fatalf("lengths %d/%d/%d, sklearn %d/%d/%d+1",
					len(fpr), len(tpr), len(thr), len(c.ROCFPR), len(c.ROCTPR), len(c.ROCThresholds))
			}
			if !math.IsInf(thr[0], 1) {
				t.Errorf("thresholds[0] = %v, want +Inf", thr[0])
			}
			for i := range fpr {
				if math.Abs(fpr[i]-c.ROCFPR[i]) > sklearnTol || math.Abs(tpr[i]-c.ROCTPR[i]) > sklearnTol {
					t.Errorf("point %d = (%v, %v), sklearn (%v, %v)", i, fpr[i], tpr[i], c.ROCFPR[i], c.ROCTPR[i])
				}
				if i > 0 && thr[i] != c.ROCThresholds[i-1] {
					t.Errorf("threshold %d = %v, sklearn %v", i, thr[i], c.ROCThresholds[i-1])
				}
			}
		})
	}
}
