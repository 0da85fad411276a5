package eval

import "fmt"

// AUC returns the area under the ROC curve of scores against labels, the
// same value as scikit-learn's roc_auc_score for binary labels: the
// probability that a random anomaly scores above a random normal item,
// counting ties as one half.
//
// It returns an error when the lengths differ, a label is not 0 or 1, a
// score is not finite, or only one class is present.
func AUC(labels []int, scores []float64) (float64, error) {
	c, err := newCurve(labels, scores, true)
	if err != nil {
		return 0, err
	}
	return trapezoid(c.fpr, c.tpr), nil
}

// PartialAUC returns the standardised partial area under the ROC curve for
// false positive rates up to maxFPR, the same value as scikit-learn's
// roc_auc_score(max_fpr=maxFPR).
//
// The curve is cut at maxFPR, with the true positive rate there found by
// linear interpolation; its area A is then standardised with the McClish
// correction 0.5*(1 + (A - p²/2)/(p - p²/2)), p = maxFPR, so that a
// random scorer gets 0.5 and a perfect one 1. Callers in this project use
// maxFPR = 0.1. With maxFPR = 1 the result equals AUC.
//
// It returns an error for maxFPR outside (0, 1] and in the cases listed
// for AUC.
func PartialAUC(labels []int, scores []float64, maxFPR float64) (float64, error) {
	if err := checkMaxFPR(maxFPR); err != nil {
		return 0, err
	}
	c, err := newCurve(labels, scores, true)
	if err != nil {
		return 0, err
	}
	if maxFPR == 1 {
		return trapezoid(c.fpr, c.tpr), nil
	}
	// stop is the first index with fpr > maxFPR; it exists because the
	// last fpr is 1, and it is at least 1 because the first fpr is 0.
	stop := 0
	for stop < len(c.fpr) && c.fpr[stop] <= maxFPR {
		stop++
	}
	x0, x1 := c.fpr[stop-1], c.fpr[stop]
	y0, y1 := c.tpr[stop-1], c.tpr[stop]
	yp := (y1-y0)/(x1-x0)*(maxFPR-x0) + y0

	fpr := append(append([]float64(nil), c.fpr[:stop]...), maxFPR)
	tpr := append(append([]float64(nil), c.tpr[:stop]...), yp)
	area := trapezoid(fpr, tpr)

	minArea := 0.5 * maxFPR * maxFPR
	maxArea := maxFPR
	return 0.5 * (1 + (area-minArea)/(maxArea-minArea)), nil
}

// trapezoid integrates y over x (x non-decreasing) by the trapezoid rule.
func trapezoid(x, y []float64) float64 {
	var s float64
	for i := 1; i < len(x); i++ {
		s += (x[i] - x[i-1]) * (y[i] + y[i-1]) / 2
	}
	return s
}

// checkMaxFPR returns ErrBadMaxFPR unless 0 < p <= 1.
func checkMaxFPR(p float64) error {
	if !(p > 0 && p <= 1) {
		return fmt.Errorf("%w (got %v)", ErrBadMaxFPR, p)
	}
	return nil
}
