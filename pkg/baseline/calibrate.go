package baseline

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"

	"github.com/auscult/auscult/pkg/gamma"
)

// Calibration turns distances into a threshold with a stated false-alarm
// rate.
type Calibration struct {
	// Shape, Scale and Loc are the gamma distribution fitted to the
	// held-out healthy distances.
	Shape float64 `json:"gamma_shape"`
	Scale float64 `json:"gamma_scale"`
	Loc   float64 `json:"gamma_loc"`
	// KS is the Kolmogorov-Smirnov statistic of that fit (smaller is better).
	KS float64 `json:"gamma_ks"`
	// FalseAlarmProb is the per-window false-alarm probability the threshold
	// was set for.
	FalseAlarmProb float64 `json:"false_alarm_prob_per_window"`
	// Threshold is the distance at which a window counts as over, for an
	// alarm.
	Threshold float64 `json:"threshold"`
	// WarnProb and WarnThreshold are the same for the lower warning level:
	// sound that is unusual but not yet alarming.
	WarnProb      float64 `json:"warn_prob_per_window"`
	WarnThreshold float64 `json:"warn_threshold"`
	// HeldOutOverWarn is the measured share of held-out windows above
	// WarnThreshold.
	HeldOutOverWarn float64 `json:"held_out_over_warn"`
	// K and N are the debounce the rate below assumes: raise when K of the
	// last N windows are over.
	K int `json:"debounce_k"`
	N int `json:"debounce_n"`
	// StepSeconds is the time between windows; WindowsPerDay follows.
	StepSeconds   float64 `json:"step_s"`
	WindowsPerDay float64 `json:"windows_per_day"`
	// FalseAlarmsPerDay is the expected number of raised alarms per day on
	// healthy sound if windows were independent (see RaiseRate), using the
	// larger of FalseAlarmProb and HeldOutOver.
	FalseAlarmsPerDay float64 `json:"false_alarms_per_day"`
	// HeldOutWindows is how many held-out windows the fit used, Folds how
	// many folds they came from, and HeldOutOver the measured share of them
	// above Threshold.
	HeldOutWindows int     `json:"held_out_windows"`
	Folds          int     `json:"folds"`
	HeldOutOver    float64 `json:"held_out_over"`
	// HeldOutMedian and HeldOutP99 summarise the held-out distances.
	HeldOutMedian float64 `json:"held_out_median"`
	HeldOutP99    float64 `json:"held_out_p99"`
	// HeldOutLogLik is the mean log-likelihood of the held-out windows
	// under the chosen model (per window, natural log, up to a constant);
	// it chose the number of operating-point centres.
	HeldOutLogLik float64 `json:"held_out_loglik,omitempty"`
}

// CalibrationOptions sets the calibration targets.
type CalibrationOptions struct {
	FalseAlarmProb float64 // per window, default 0.002
	WarnProb       float64 // per window for the warning level, default 0.02
	K, N           int     // debounce, default 3 of 5
	StepSeconds    float64 // seconds between windows
	Folds          int     // default 5
}

// LocFraction places the gamma's fixed location at this fraction of the
// smallest held-out distance.
const LocFraction = 0.9

// RaiseRate is the probability that a given window raises an alarm under a
// k-of-n debounce when every window is over independently with probability
// p: the window is over and exactly k-1 of the n-1 before it are, the
// leading term of the binomial tail. Overlapping windows are correlated, so
// the real rate can be higher; the measured HeldOutOver shows the per-window
// part directly.
func RaiseRate(p float64, k, n int) float64 {
	return binom(n-1, k-1) * math.Pow(p, float64(k)) * math.Pow(1-p, float64(n-k))
}

func binom(n, k int) float64 {
	r := 1.0
	for i := 1; i <= k; i++ {
		r = r * float64(n-k+i) / float64(i)
	}
	return r
}

// MaxThreshold is the largest usable threshold: cosine distances stay
// below 1, so a threshold near 1 could never be crossed.
const MaxThreshold = 0.98

// ErrCalibration is returned when the held-out healthy distances cannot
// give a usable threshold.
var ErrCalibration = errors.New("baseline: calibration failed")

// ErrTooFewGroups is returned when the healthy data cannot be split into at
// least two folds for held-out calibration.
var ErrTooFewGroups = errors.New("baseline: healthy data must hold at least two separate recordings or blocks for held-out calibration")

// Enroll fits the model on all windows and calibrates it on held-out folds.
// groups[i] names the recording or block window i came from; windows of one
// group never sit on both sides of a fold.
//
// When mo.Centroids allows several operating points, the number of centres
// is chosen on the same folds: every count from 1 to mo.Centroids is fitted
// without each fold, and the count whose models give the held-out windows
// the highest mean log-likelihood wins (cross-validated model selection).
// Centres that only learn one recording's quirks do not carry over to
// recordings they never saw, so they lose to fewer centres.
func Enroll(x [][]float32, groups []int, mo ModelOptions, co CalibrationOptions) (*Model, Calibration, error) {
	if len(x) != len(groups) {
		return nil, Calibration{}, errors.New("baseline: one group per window needed")
	}
	ids := distinct(groups)
	folds := min(co.Folds, len(ids))
	if folds < 2 {
		return nil, Calibration{}, ErrTooFewGroups
	}
	foldOf := make(map[int]int, len(ids))
	for i, g := range ids {
		foldOf[g] = i % folds
	}
	held, bestK, bestLL, err := chooseCentroids(x, groups, foldOf, folds, mo)
	if err != nil {
		return nil, Calibration{}, err
	}
	mo.Centroids = bestK
	model, err := Fit(x, mo)
	if err != nil {
		return nil, Calibration{}, err
	}
	cal, err := Calibrate(held, co)
	if err != nil {
		return nil, Calibration{}, err
	}
	cal.Folds = folds
	cal.HeldOutLogLik = bestLL
	return model, cal, nil
}

// SelectCentroids returns the number of operating-point centres, from 1 to
// mo.Centroids, that Enroll would choose for windows x grouped by groups,
// with the given number of folds.
func SelectCentroids(x [][]float32, groups []int, mo ModelOptions, folds int) (int, error) {
	ids := distinct(groups)
	folds = min(folds, len(ids))
	if folds < 2 {
		return 0, ErrTooFewGroups
	}
	foldOf := make(map[int]int, len(ids))
	for i, g := range ids {
		foldOf[g] = i % folds
	}
	_, k, _, err := chooseCentroids(x, groups, foldOf, folds, mo)
	return k, err
}

// chooseCentroids tries every number of centres from 1 to mo.Centroids and
// returns the held-out distances, count and mean log-likelihood of the one
// with the highest held-out log-likelihood.
func chooseCentroids(x [][]float32, groups []int, foldOf map[int]int, folds int, mo ModelOptions) ([]float64, int, float64, error) {
	var held []float64
	bestK, bestLL := 1, math.Inf(-1)
	for k := 1; k <= max(mo.Centroids, 1); k++ {
		opt := mo
		opt.Centroids = k
		d, ll, err := heldOut(x, groups, foldOf, folds, opt)
		if err != nil {
			return nil, 0, 0, err
		}
		if ll > bestLL {
			bestK, bestLL, held = k, ll, d
		}
	}
	return held, bestK, bestLL, nil
}

// heldOut scores every fold with a model fitted without it and returns the
// held-out distances and their mean log-likelihood.
func heldOut(x [][]float32, groups []int, foldOf map[int]int, folds int, mo ModelOptions) ([]float64, float64, error) {
	var held []float64
	var ll float64
	for f := 0; f < folds; f++ {
		var train, test [][]float32
		for i, v := range x {
			if foldOf[groups[i]] == f {
				test = append(test, v)
			} else {
				train = append(train, v)
			}
		}
		m, err := Fit(train, mo)
		if err != nil {
			return nil, 0, fmt.Errorf("baseline: fold %d: %w", f+1, err)
		}
		s := m.NewScorer()
		for _, v := range test {
			held = append(held, s.Distance(v))
			ll += s.LogDensity(v)
		}
	}
	return held, ll / float64(len(held)), nil
}

// Calibrate fits a gamma distribution to held-out healthy cosine distances
// and sets the threshold at its 1 - FalseAlarmProb quantile. Held-out
// distances have a hard lower edge (no healthy window sits exactly on the
// mean) and a long upper tail, so the gamma's location is fixed just below
// the smallest of them (LocFraction of it), as scipy.stats.gamma.fit(x,
// floc=L) does, and shape and scale are fitted by maximum likelihood to the
// distances above it. The measured share of held-out windows above the
// threshold is kept beside the design value; the expected false alarms per
// day use whichever of the two is larger.
func Calibrate(held []float64, co CalibrationOptions) (Calibration, error) {
	if !(co.FalseAlarmProb > 0 && co.FalseAlarmProb < 0.5) {
		return Calibration{}, fmt.Errorf("baseline: false-alarm probability must be in (0, 0.5), got %g", co.FalseAlarmProb)
	}
	if co.K < 1 || co.N < co.K {
		return Calibration{}, fmt.Errorf("baseline: debounce needs 1 <= k <= n, got %d of %d", co.K, co.N)
	}
	if len(held) == 0 {
		return Calibration{}, errors.New("baseline: no held-out distances to calibrate on")
	}
	loc := LocFraction * slices.Min(held)
	shifted := make([]float64, len(held))
	for i, v := range held {
		shifted[i] = v - loc
	}
	d, err := gamma.Fit(shifted)
	if err != nil {
		return Calibration{}, fmt.Errorf("%w: the gamma fit of %d held-out distances failed (%v); enrol more healthy audio",
			ErrCalibration, len(held), err)
	}
	c := Calibration{Shape: d.Shape, Scale: d.Scale, Loc: loc, KS: gamma.KSStat(shifted, d),
		FalseAlarmProb: co.FalseAlarmProb, K: co.K, N: co.N, StepSeconds: co.StepSeconds,
		HeldOutWindows: len(held)}
	c.Threshold = loc + d.Quantile(1-co.FalseAlarmProb)
	if co.WarnProb > 0 {
		if !(co.WarnProb > co.FalseAlarmProb && co.WarnProb < 0.5) {
			return Calibration{}, fmt.Errorf("baseline: warning probability must be in (%g, 0.5), got %g", co.FalseAlarmProb, co.WarnProb)
		}
		c.WarnProb = co.WarnProb
		c.WarnThreshold = loc + d.Quantile(1-co.WarnProb)
	}
	if !(c.Threshold < MaxThreshold) {
		return Calibration{}, fmt.Errorf("%w: held-out healthy windows lie so far from the rest (threshold %.4f, limit %.2f) "+
			"that no fault could stand out; the healthy recordings are too few or differ too much from each other: "+
			"enrol more healthy audio covering the usual operating range", ErrCalibration, c.Threshold, MaxThreshold)
	}
	over := 0
	for _, v := range held {
		if v > c.Threshold {
			over++
		}
	}
	c.HeldOutOver = float64(over) / float64(len(held))
	over = 0
	for _, v := range held {
		if c.WarnThreshold > 0 && v > c.WarnThreshold {
			over++
		}
	}
	c.HeldOutOverWarn = float64(over) / float64(len(held))
	sorted := slices.Clone(held)
	sort.Float64s(sorted)
	c.HeldOutMedian = quantile(sorted, 0.5)
	c.HeldOutP99 = quantile(sorted, 0.99)
	if co.StepSeconds > 0 {
		c.WindowsPerDay = 86400 / co.StepSeconds
		c.FalseAlarmsPerDay = c.WindowsPerDay * RaiseRate(max(co.FalseAlarmProb, c.HeldOutOver), co.K, co.N)
	}
	return c, nil
}

// quantile is the linear-interpolation quantile of sorted values
// (numpy's default method).
func quantile(sorted []float64, q float64) float64 {
	if len(sorted) == 0 {
		return math.NaN()
	}
	pos := q * float64(len(sorted)-1)
	i := int(pos)
	if i >= len(sorted)-1 {
		return sorted[len(sorted)-1]
	}
	f := pos - float64(i)
	return sorted[i]*(1-f) + sorted[i+1]*f
}

func distinct(g []int) []int {
	seen := map[int]bool{}
	var out []int
	for _, v := range g {
		if !seen[v] {
			seen[v] = true
			out = append(out, v)
		}
	}
	sort.Ints(out)
	return out
}
