package baseline

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// Recording summarises one healthy recording for the enrolment checks.
type Recording struct {
	Name         string
	Seconds      float64   // duration analysed
	LevelsDBFS   []float64 // one RMS level per analysis window
	ClipFraction float64   // share of samples at full scale over the recording
}

// QualityLimits are the enrolment checks' thresholds. They are common
// practice for acoustic monitoring set-ups, not values from a standard.
type QualityLimits struct {
	MinSeconds  float64 // total healthy audio, default 300 s
	MinWindows  int     // total analysis windows, default 120
	SilentDBFS  float64 // a recording quieter than this is silent, default -70 dBFS
	MaxClip     float64 // largest share of clipped samples, default 0.001 (0.1 %)
	MaxSpreadDB float64 // largest spread of window levels in one recording, default 20 dB
	MaxAcrossDB float64 // largest spread of recording median levels, default 25 dB
}

// DefaultQualityLimits returns the limits enrolment applies by default.
func DefaultQualityLimits() QualityLimits {
	return QualityLimits{MinSeconds: 300, MinWindows: 120, SilentDBFS: -70, MaxClip: 0.001,
		MaxSpreadDB: 20, MaxAcrossDB: 25}
}

// Sentinel errors of the enrolment checks.
var (
	// ErrTooShort is returned when there is too little healthy audio.
	ErrTooShort = errors.New("baseline: too little healthy audio")
	// ErrSilent is returned when a recording is silent or nearly so.
	ErrSilent = errors.New("baseline: recording is silent")
	// ErrClipped is returned when a recording clips too often.
	ErrClipped = errors.New("baseline: recording is clipped")
	// ErrNonStationary is returned when levels swing so much that the
	// machine probably started, stopped or changed duty during recording.
	ErrNonStationary = errors.New("baseline: recording is not stationary")
)

// CheckQuality refuses healthy data that would make a poor baseline. The
// error says which recording and why; all problems found are joined.
func CheckQuality(recs []Recording, lim QualityLimits) error {
	var errs []error
	var total float64
	windows := 0
	var medians []float64
	for _, r := range recs {
		total += r.Seconds
		windows += len(r.LevelsDBFS)
		if len(r.LevelsDBFS) == 0 {
			continue
		}
		lv := append([]float64(nil), r.LevelsDBFS...)
		sort.Float64s(lv)
		med := quantile(lv, 0.5)
		medians = append(medians, med)
		switch {
		case med < lim.SilentDBFS:
			errs = append(errs, fmt.Errorf("%w: %s has a median level of %.1f dBFS (limit %.0f dBFS); check the microphone and its gain",
				ErrSilent, r.Name, med, lim.SilentDBFS))
			continue
		case lv[len(lv)-1]-lv[0] > lim.MaxSpreadDB:
			errs = append(errs, fmt.Errorf("%w: levels in %s span %.1f dB (limit %.0f dB); was the machine started or stopped during it?",
				ErrNonStationary, r.Name, lv[len(lv)-1]-lv[0], lim.MaxSpreadDB))
		}
		if r.ClipFraction > lim.MaxClip {
			errs = append(errs, fmt.Errorf("%w: %.2f %% of the samples in %s are at full scale (limit %.2f %%); lower the input gain",
				ErrClipped, 100*r.ClipFraction, r.Name, 100*lim.MaxClip))
		}
	}
	if len(medians) > 1 {
		sort.Float64s(medians)
		if s := medians[len(medians)-1] - medians[0]; s > lim.MaxAcrossDB {
			errs = append(errs, fmt.Errorf("%w: recording levels differ by %.1f dB (limit %.0f dB); enrol one operating state at one gain setting",
				ErrNonStationary, s, lim.MaxAcrossDB))
		}
	}
	if total < lim.MinSeconds || windows < lim.MinWindows {
		errs = append(errs, fmt.Errorf("%w: %.0f s in %d windows, need at least %.0f s and %d windows",
			ErrTooShort, total, windows, lim.MinSeconds, lim.MinWindows))
	}
	return errors.Join(errs...)
}

// LevelStats is the healthy level distribution, used by the level scorer.
type LevelStats struct {
	MeanDBFS float64 `json:"mean_dbfs"`
	StdDB    float64 `json:"std_db"`
}

// Levels summarises window levels.
func Levels(levels []float64) LevelStats {
	var s, ss float64
	for _, v := range levels {
		s += v
	}
	n := float64(max(len(levels), 1))
	m := s / n
	for _, v := range levels {
		ss += (v - m) * (v - m)
	}
	return LevelStats{MeanDBFS: m, StdDB: math.Sqrt(ss / n)}
}
