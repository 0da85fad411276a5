package alarm

import "time"

// Snapshot is the alarm's present state, for a status page or a periodic
// report.
type Snapshot struct {
	// State is the annunciation state and Since when it was entered (the
	// zero time before the first change).
	State State
	Since time.Time
	// Severity is the condition present now, whatever the annunciation:
	// SeverityNone for a latched alarm whose condition has cleared, and the
	// tracked condition while shelved.
	Severity Severity
	// Occurrence is the number of the latest raise (0 before the first).
	Occurrence uint64
	// ShelvedUntil is the end of the shelve in state SHLVD, else zero.
	ShelvedUntil time.Time
	// Score is the latest running window's score; Running tells whether
	// the latest window was running (false: it was skipped).
	Score   float64
	Running bool
	// OverWarning and OverAlarm are how many of the last N running windows
	// were at or above each level's threshold (the same count twice when
	// the warning level is disabled).
	OverWarning, OverAlarm, N int
	// Bands, NBands and SampleIndex are the evidence of the latest
	// occurrence: the window where it was raised or last escalated.
	Bands       [MaxBands]Band
	NBands      int
	SampleIndex int64
}

// Snapshot returns the present state.
func (t *Tracker) Snapshot() Snapshot {
	return Snapshot{
		State: t.state, Since: t.since, Severity: t.severity(), Occurrence: t.occurrence,
		ShelvedUntil: t.until, Score: t.score, Running: t.running,
		OverWarning: t.levels[warn].over(), OverAlarm: t.levels[alrm].over(), N: t.cfg.N,
		Bands: t.occEv.bands, NBands: t.occEv.nBands, SampleIndex: t.occEv.sample,
	}
}
