package alarm

import (
	"fmt"
	"time"
)

// Acknowledge records an operator's acknowledgement at time now by the
// named person and appends the Acknowledged event to dst. UNACK with the
// condition present goes to ACKED; RTNUN, and a latched alarm whose
// condition has cleared (UNACK or ACKED), go to NORM. In any other state it
// returns dst unchanged and an error wrapping ErrNothingToAck.
func (t *Tracker) Acknowledge(dst []Event, now time.Time, by string) ([]Event, error) {
	switch {
	case t.state == StateUnacked && t.shown != SeverityNone:
		t.enter(StateAcked, now)
	case t.state == StateUnacked, t.state == StateReturnedUnacked,
		t.state == StateAcked && t.shown == SeverityNone:
		t.enter(StateNormal, now)
	default:
		return dst, fmt.Errorf("%w: state %s", ErrNothingToAck, t.state)
	}
	e := t.event(Acknowledged, now, t.occSev)
	e.By = by
	return append(dst, e), nil
}

// Shelve removes the alarm from annunciation from now for d, recording who
// and why, and appends the Shelved event to dst. It works in every state;
// shelving a shelved alarm replaces its end. d must be positive (else
// ErrShelveNonPositive) and at most Config.MaxShelve (else
// ErrShelveTooLong); on error dst is returned unchanged.
func (t *Tracker) Shelve(dst []Event, now time.Time, d time.Duration, reason, by string) ([]Event, error) {
	if d <= 0 {
		return dst, fmt.Errorf("%w: got %v", ErrShelveNonPositive, d)
	}
	if d > t.cfg.MaxShelve {
		return dst, fmt.Errorf("%w: asked for %v, the limit is %v (MaxShelve)", ErrShelveTooLong, d, t.cfg.MaxShelve)
	}
	t.until = now.Add(d)
	t.shown = SeverityNone
	t.enter(StateShelved, now)
	e := t.event(Shelved, now, t.severity())
	e.By, e.Reason, e.Until = by, reason, t.until
	return append(dst, e), nil
}

// Unshelve ends a shelve at time now on request of the named person and
// appends the Unshelved event to dst, followed by a Raised event if a
// condition is present. It returns an error wrapping ErrNotShelved, and dst
// unchanged, when the alarm is not shelved.
func (t *Tracker) Unshelve(dst []Event, now time.Time, by string) ([]Event, error) {
	if t.state != StateShelved {
		return dst, fmt.Errorf("%w: state %s", ErrNotShelved, t.state)
	}
	dst = t.unshelve(dst, now, by, "")
	return t.annunciate(dst, now), nil
}

// unshelve ends the shelve; the caller annunciates a present condition.
func (t *Tracker) unshelve(dst []Event, now time.Time, by, reason string) []Event {
	t.until = time.Time{}
	t.enter(StateNormal, now)
	e := t.event(Unshelved, now, t.severity())
	e.By, e.Reason = by, reason
	return append(dst, e)
}
