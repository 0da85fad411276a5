package monitor

import (
	"time"

	"github.com/auscult/auscult/pkg/alarm"
	"github.com/auscult/auscult/pkg/gate"
)

// Status is the monitor's state at its last window, for status messages and
// pages.
type Status struct {
	Asset      string
	BaselineID string
	// Time is the time stamped on the last window (zero before the first).
	Time time.Time
	// Score is the last window's cosine distance; Threshold and
	// WarnThreshold are the levels in force (WarnThreshold 0: no warning
	// level).
	Score, Threshold, WarnThreshold float64
	// LevelDBFS is the last window's RMS level.
	LevelDBFS float64
	// Machine is "running", "stopped" or "unknown"; Scored says whether the
	// last window counted for the alarm logic (running and a healthy sensor).
	Machine string
	Scored  bool
	// Alarm is the ISA-18.2 state name (NORM, UNACK, ACKED, RTNUN, SHLVD),
	// Severity "none", "warning" or "alarm", ShelvedUntil the end of a shelve.
	Alarm        string
	Severity     string
	ShelvedUntil time.Time
	// SensorFaults lists the active sensor diagnostics by name.
	SensorFaults []string
	// Windows counts the windows processed since the monitor started.
	Windows int64
	// LagMean and LagMax are how long after the time its last sample was
	// due (Clock of the window's end) each window was decided: the
	// latency from sample to decision when the source runs in real time.
	// Meaningless for a wall clock (always about zero) or a replay faster
	// than real time (negative).
	LagMean, LagMax time.Duration
	lagSum          time.Duration
}

func (s *Status) update(now time.Time, score, level float64, scored bool, machine gate.State, snap alarm.Snapshot) {
	s.Time, s.Score, s.LevelDBFS, s.Scored = now, score, level, scored
	s.Machine = machine.String()
	s.Alarm, s.Severity, s.ShelvedUntil = snap.State.String(), snap.Severity.String(), snap.ShelvedUntil
	s.Windows++
	lag := time.Since(now)
	s.lagSum += lag
	s.LagMean = s.lagSum / time.Duration(s.Windows)
	if s.Windows == 1 || lag > s.LagMax {
		s.LagMax = lag
	}
}

// Status returns a copy of the current status.
func (m *Monitor) Status() Status {
	m.mu.Lock()
	defer m.mu.Unlock()
	s := m.status
	s.SensorFaults = nil
	for k := gate.Kind(0); k < gate.NumKinds; k++ {
		if m.sensor.Active(k) {
			s.SensorFaults = append(s.SensorFaults, k.String())
		}
	}
	return s
}
