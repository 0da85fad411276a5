package alarm

import (
	"math"
	"time"
)

// warn and alrm index Tracker.levels; level i serves Severity i+1.
const (
	warn = 0
	alrm = 1
)

// evidence is where a condition reached its severity.
type evidence struct {
	bands  [MaxBands]Band
	nBands int
	sample int64
}

// Tracker is the alarm of one monitored machine: the debounced warning and
// alarm conditions and their annunciation state. Create it with
// NewTracker; it is not safe for concurrent use.
type Tracker struct {
	cfg        Config
	levels     [2]level
	state      State
	since      time.Time // when state was entered
	shown      Severity  // severity annunciated as present; none after Cleared and while shelved
	occSev     Severity  // severity of the current occurrence, kept after it clears
	occurrence uint64
	onset      evidence // where the present condition reached its severity
	occEv      evidence // evidence of the current occurrence
	until      time.Time
	score      float64 // latest running window's score
	running    bool    // whether the latest window was running
}

// NewTracker returns a Tracker in state NORM, or an error wrapping
// ErrConfig when cfg is invalid.
func NewTracker(cfg Config) (*Tracker, error) {
	if err := cfg.Validate(); err != nil {
		return nil, err
	}
	warnAt := cfg.WarnThreshold
	if warnAt == 0 { // no warning level: it mirrors the alarm level
		warnAt = cfg.AlarmThreshold
	}
	t := &Tracker{cfg: cfg}
	t.levels[warn] = newLevel(warnAt, cfg.ClearFraction, cfg.N)
	t.levels[alrm] = newLevel(cfg.AlarmThreshold, cfg.ClearFraction, cfg.N)
	return t, nil
}

// Observe feeds one analysis window taken at time now and appends the
// events it causes to dst, returning the extended slice. It first ends a
// shelve whose time is up. now must not decrease from call to call. It does
// not allocate when dst has room for the events (at most two).
func (t *Tracker) Observe(dst []Event, now time.Time, w Window) []Event {
	if t.state == StateShelved && !now.Before(t.until) {
		dst = t.unshelve(dst, now, "", ReasonExpired)
	}
	t.running = w.Running && !math.IsNaN(w.Score) && !math.IsInf(w.Score, 0)
	if !t.running {
		t.levels[warn].pause()
		t.levels[alrm].pause()
		return t.annunciate(dst, now)
	}
	before := t.severity()
	t.score = w.Score
	t.levels[warn].step(now, w.Score, t.cfg.K, t.cfg.OffDelay)
	t.levels[alrm].step(now, w.Score, t.cfg.K, t.cfg.OffDelay)
	if t.levels[alrm].present && !t.levels[warn].present {
		t.levels[warn].force()
	}
	if t.severity() > before {
		t.onset = evidence{bands: w.Bands, nBands: min(max(w.NBands, 0), MaxBands), sample: w.SampleIndex}
	}
	return t.annunciate(dst, now)
}

// severity returns the present condition's severity.
func (t *Tracker) severity() Severity {
	switch {
	case t.levels[alrm].present:
		return SeverityAlarm
	case t.levels[warn].present:
		return SeverityWarning
	}
	return SeverityNone
}

// annunciate brings the annunciation in line with the present condition.
func (t *Tracker) annunciate(dst []Event, now time.Time) []Event {
	if t.state == StateShelved {
		return dst
	}
	cur, was := t.severity(), t.shown
	switch {
	case cur == was:
		return dst
	case was == SeverityNone:
		t.occurrence++
		t.shown, t.occSev, t.occEv = cur, cur, t.onset
		t.enter(StateUnacked, now)
		return append(dst, t.event(Raised, now, cur))
	case cur == SeverityNone:
		t.shown = SeverityNone
		if !t.cfg.Latch {
			switch t.state {
			case StateUnacked:
				t.enter(StateReturnedUnacked, now)
			case StateAcked:
				t.enter(StateNormal, now)
			}
		}
		return append(dst, t.event(Cleared, now, was))
	}
	t.shown, t.occSev = cur, cur
	if cur > was {
		t.occEv = t.onset
		if t.state == StateAcked {
			t.enter(StateUnacked, now)
		}
	}
	e := t.event(SeverityChanged, now, cur)
	e.From = was
	return append(dst, e)
}

func (t *Tracker) enter(s State, now time.Time) { t.state, t.since = s, now }

// event fills the fields every event shares.
func (t *Tracker) event(k Kind, now time.Time, sev Severity) Event {
	e := Event{
		Kind: k, Time: now, Occurrence: t.occurrence, Severity: sev, State: t.state,
		Score: t.score, N: t.cfg.N,
		Bands: t.occEv.bands, NBands: t.occEv.nBands, SampleIndex: t.occEv.sample,
	}
	if sev != SeverityNone {
		l := &t.levels[sev-1]
		e.Threshold, e.Over = l.threshold, l.over()
	}
	return e
}

// State returns the annunciation state.
func (t *Tracker) State() State { return t.state }
