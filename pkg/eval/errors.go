package eval

import "errors"

var (
	// ErrLengthMismatch is returned when labels, scores or a group column
	// have different lengths.
	ErrLengthMismatch = errors.New("eval: labels and scores differ in length")

	// ErrBadLabel is returned when a label is neither 0 (normal) nor
	// 1 (anomaly).
	ErrBadLabel = errors.New("eval: label must be 0 or 1")

	// ErrBadScore is returned when a score is NaN or infinite.
	ErrBadScore = errors.New("eval: score must be finite")

	// ErrOneClass is returned when the labels do not contain both normal
	// and anomalous items, so a ROC curve is not defined.
	ErrOneClass = errors.New("eval: need both normal (0) and anomaly (1) labels")

	// ErrBadMaxFPR is returned when a false-positive-rate limit is outside
	// (0, 1].
	ErrBadMaxFPR = errors.New("eval: max FPR must be in (0, 1]")

	// ErrBadCurve is returned when a Curve given to WriteROCSVG has no
	// points, FPR and TPR of different lengths, or a coordinate outside
	// [0, 1].
	ErrBadCurve = errors.New("eval: invalid curve")
)
