// Package eval computes detection metrics for anomaly scores: the ROC
// curve, the area under it (AUC), the standardised partial AUC up to a
// false-positive-rate limit, per-group breakdowns, threshold suggestions
// and a self-contained SVG plot of ROC curves.
//
// Conventions used throughout:
//
//   - labels are 1 for an anomaly (the positive class) and 0 for a normal
//     item; any other value is rejected;
//   - a higher score means more anomalous, and an item is flagged when its
//     score is greater than or equal to the threshold;
//   - scores must be finite.
//
// The definitions follow scikit-learn's roc_curve and roc_auc_score for
// binary labels (ROC built at distinct score values, so tied scores form a
// single diagonal step; area by the trapezoid rule; partial AUC with the
// McClish standardisation). The package tests compare against values
// produced by scikit-learn 1.2.1 (scripts/ref/make_eval_fixture.py).
//
// The package does no file or network I/O.
package eval
