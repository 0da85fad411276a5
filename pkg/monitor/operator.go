package monitor

import "time"

// Acknowledge acknowledges the active or returned alarm on behalf of by (a
// person or a system). It fails with the tracker's error when there is
// nothing to acknowledge.
func (m *Monitor) Acknowledge(now time.Time, by string) error {
	m.mu.Lock()
	defer m.mu.Unlock()
	var err error
	m.alarmEv, err = m.tracker.Acknowledge(m.alarmEv[:0], now, by)
	m.logAlarmEvents()
	return firstErr(err, m.err)
}

// Shelve suppresses annunciation for d (bounded by the configured maximum)
// with a reason.
func (m *Monitor) Shelve(now time.Time, d time.Duration, reason, by string) error {
	m.mu.Lock()
	defer m.mu.Unlock()
	var err error
	m.alarmEv, err = m.tracker.Shelve(m.alarmEv[:0], now, d, reason, by)
	m.logAlarmEvents()
	return firstErr(err, m.err)
}

// Unshelve ends a shelve early.
func (m *Monitor) Unshelve(now time.Time, by string) error {
	m.mu.Lock()
	defer m.mu.Unlock()
	var err error
	m.alarmEv, err = m.tracker.Unshelve(m.alarmEv[:0], now, by)
	m.logAlarmEvents()
	return firstErr(err, m.err)
}

func (m *Monitor) logAlarmEvents() {
	for _, e := range m.alarmEv {
		m.alarmEvent(e)
	}
	snap := m.tracker.Snapshot()
	m.status.Alarm, m.status.Severity, m.status.ShelvedUntil = snap.State.String(), snap.Severity.String(), snap.ShelvedUntil
}

func firstErr(errs ...error) error {
	for _, e := range errs {
		if e != nil {
			return e
		}
	}
	return nil
}

// RetuneAlarm applies new alarm settings without losing the alarm state:
// only the clear fraction, off-delay, latching and shelve limit may change
// (see alarm.Tracker.Retune); thresholds and the debounce need a restart.
func (m *Monitor) RetuneAlarm(clearFraction float64, offDelay time.Duration, latch bool, maxShelve time.Duration) error {
	m.mu.Lock()
	defer m.mu.Unlock()
	c := m.cfg.Alarm
	c.ClearFraction, c.OffDelay, c.Latch, c.MaxShelve = clearFraction, offDelay, latch, maxShelve
	if err := m.tracker.Retune(c); err != nil {
		return err
	}
	m.cfg.Alarm = c
	return nil
}
