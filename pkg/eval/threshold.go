package eval

// SuggestThreshold returns the score threshold that flags the most
// anomalies while keeping the false positive rate on these labels at or
// below maxFPR, with the true and false positive rates it achieves. Items
// with score >= thr are flagged.
//
// Among thresholds with equal true positive rate the highest one (lowest
// false positive rate) is chosen. The threshold is always one of the
// scores, or +Inf (flag nothing) when even the highest score would exceed
// maxFPR. The rates are measured on the data given, so a threshold chosen
// on a small evaluation set is optimistic.
//
// It returns an error for maxFPR outside (0, 1] and in the cases listed
// for AUC.
func SuggestThreshold(labels []int, scores []float64, maxFPR float64) (thr, tpr, fpr float64, err error) {
	if err := checkMaxFPR(maxFPR); err != nil {
		return 0, 0, 0, err
	}
	c, err := newCurve(labels, scores, false)
	if err != nil {
		return 0, 0, 0, err
	}
	best := 0
	for i := 1; i < len(c.fpr) && c.fpr[i] <= maxFPR; i++ {
		if c.tpr[i] > c.tpr[best] {
			best = i
		}
	}
	return c.thr[best], c.tpr[best], c.fpr[best], nil
}

// YoudenThreshold returns the score threshold maximising Youden's J
// statistic, J = TPR - FPR, with the true and false positive rates it
// achieves. Items with score >= thr are flagged. Ties in J go to the
// highest threshold. Unlike SuggestThreshold it puts no limit on the false
// positive rate, so it suits balanced costs rather than alarm budgets.
//
// It returns an error in the cases listed for AUC.
func YoudenThreshold(labels []int, scores []float64) (thr, tpr, fpr float64, err error) {
	c, err := newCurve(labels, scores, false)
	if err != nil {
		return 0, 0, 0, err
	}
	best := 0
	for i := 1; i < len(c.fpr); i++ {
		if c.tpr[i]-c.fpr[i] > c.tpr[best]-c.fpr[best] {
			best = i
		}
	}
	return c.thr[best], c.tpr[best], c.fpr[best], nil
}
