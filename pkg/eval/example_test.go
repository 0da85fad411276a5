package eval_test

import (
	"fmt"

	"github.com/auscult/auscult/pkg/eval"
)

func ExampleAUC() {
	labels := []int{0, 0, 1, 1}
	scores := []float64{0.1, 0.4, 0.35, 0.8}
	auc, err := eval.AUC(labels, scores)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("AUC %.2f\n", auc)
	// Output: AUC 0.75
}

func ExamplePartialAUC() {
	labels := []int{0, 0, 0, 0, 1, 1}
	scores := []float64{0.1, 0.2, 0.3, 0.9, 0.5, 0.95}
	p, err := eval.PartialAUC(labels, scores, 0.1)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("pAUC(0.1) %.4f\n", p)
	// Output: pAUC(0.1) 0.7368
}

func ExampleROC() {
	fpr, tpr, thr, err := eval.ROC([]int{0, 0, 1, 1}, []float64{0.1, 0.4, 0.35, 0.8})
	if err != nil {
		fmt.Println(err)
		return
	}
	for i := range fpr {
		fmt.Printf("score >= %v: FPR %.1f TPR %.1f\n", thr[i], fpr[i], tpr[i])
	}
	// Output:
	// score >= +Inf: FPR 0.0 TPR 0.0
	// score >= 0.8: FPR 0.0 TPR 0.5
	// score >= 0.4: FPR 0.5 TPR 0.5
	// score >= 0.35: FPR 0.5 TPR 1.0
	// score >= 0.1: FPR 1.0 TPR 1.0
}

func ExampleByGroup() {
	labels := []int{0, 0, 0, 0, 1, 1, 1}
	scores := []float64{0.1, 0.2, 0.3, 0.4, 0.9, 0.35, 0.5}
	columns := map[string][]string{
		"fault": {"none", "none", "none", "none", "impeller", "seal", "seal"},
		"load":  {"full", "part", "full", "part", "full", "part", "part"},
	}
	groups, err := eval.ByGroup(labels, scores, columns, 0.1)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, g := range groups {
		fmt.Printf("%s=%s n=%d anomalies=%d AUC=%.3f\n", g.Name, g.Value, g.N, g.Anomalies, g.AUC)
	}
	// Output:
	// fault=impeller n=5 anomalies=1 AUC=1.000
	// fault=seal n=6 anomalies=2 AUC=0.875
	// load=full n=3 anomalies=1 AUC=1.000
	// load=part n=4 anomalies=2 AUC=0.750
}

func ExampleSuggestThreshold() {
	labels := []int{0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1}
	scores := []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 12, 9.5, 4.5}
	thr, tpr, fpr, err := eval.SuggestThreshold(labels, scores, 0.1)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("alarm at score >= %v: TPR %.2f, FPR %.2f\n", thr, tpr, fpr)
	// Output: alarm at score >= 9.5: TPR 0.67, FPR 0.10
}
