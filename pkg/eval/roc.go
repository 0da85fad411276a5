package eval

import (
	"fmt"
	"math"
	"sort"
)

// ROC returns the receiver operating characteristic of scores against
// labels, like scikit-learn's roc_curve with drop_intermediate=False.
//
// There is one point per distinct score value, in order of decreasing
// threshold, preceded by the point (0, 0). Point i gives the false and true
// positive rates obtained when every item with score >= thresholds[i] is
// flagged. thresholds[0] is +Inf (nothing flagged), as in scikit-learn 1.3
// and later; scikit-learn 1.2 used the largest score plus one instead. The
// last point is always (1, 1).
//
// It returns an error when the lengths differ, a label is not 0 or 1, a
// score is not finite, or only one class is present.
func ROC(labels []int, scores []float64) (fpr, tpr, thresholds []float64, err error) {
	c, err := newCurve(labels, scores, false)
	if err != nil {
		return nil, nil, nil, err
	}
	return c.fpr, c.tpr, c.thr, nil
}

// curve is a ROC curve with its thresholds; see ROC.
type curve struct {
	fpr, tpr, thr []float64
}

// checkInput validates labels and scores and counts anomalies.
func checkInput(labels []int, scores []float64) (anomalies int, err error) {
	if len(labels) != len(scores) {
		return 0, fmt.Errorf("%w (%d labels, %d scores)", ErrLengthMismatch, len(labels), len(scores))
	}
	for i, l := range labels {
		if l != 0 && l != 1 {
			return 0, fmt.Errorf("%w (item %d has %d)", ErrBadLabel, i, l)
		}
		if math.IsNaN(scores[i]) || math.IsInf(scores[i], 0) {
			return 0, fmt.Errorf("%w (item %d has %v)", ErrBadScore, i, scores[i])
		}
		anomalies += l
	}
	if anomalies == 0 || anomalies == len(labels) {
		return 0, fmt.Errorf("%w (%d items, %d anomalies)", ErrOneClass, len(labels), anomalies)
	}
	return anomalies, nil
}

// newCurve builds the ROC curve. With drop set, points that lie on a
// straight line between their neighbours are removed, which is what
// scikit-learn's roc_curve does by default (and therefore what its
// roc_auc_score integrates); it does not change the area.
func newCurve(labels []int, scores []float64, drop bool) (curve, error) {
	if _, err := checkInput(labels, scores); err != nil {
		return curve{}, err
	}
	order := make([]int, len(scores))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return scores[order[a]] > scores[order[b]] })

	// Cumulative counts at the last item of each run of equal scores.
	var fps, tps, thr []float64
	var tp float64
	for i, idx := range order {
		tp += float64(labels[idx])
		if i == len(order)-1 || scores[order[i+1]] != scores[idx] {
			tps = append(tps, tp)
			fps = append(fps, float64(i+1)-tp)
			thr = append(thr, scores[idx])
		}
	}
	if drop && len(fps) > 2 {
		fps, tps, thr = dropCollinear(fps, tps, thr)
	}

	n := len(fps)
	c := curve{
		fpr: make([]float64, n+1),
		tpr: make([]float64, n+1),
		thr: make([]float64, n+1),
	}
	c.thr[0] = math.Inf(1)
	for i := 0; i < n; i++ {
		c.fpr[i+1] = fps[i] / fps[n-1]
		c.tpr[i+1] = tps[i] / tps[n-1]
		c.thr[i+1] = thr[i]
	}
	return c, nil
}

// dropCollinear keeps the first and last points and every point where the
// second difference of fps or tps is non-zero.
func dropCollinear(fps, tps, thr []float64) (f, t, h []float64) {
	last := len(fps) - 1
	for i := range fps {
		keep := i == 0 || i == last ||
			fps[i+1]-2*fps[i]+fps[i-1] != 0 || tps[i+1]-2*tps[i]+tps[i-1] != 0
		if keep {
			f = append(f, fps[i])
			t = append(t, tps[i])
			h = append(h, thr[i])
		}
	}
	return f, t, h
}
