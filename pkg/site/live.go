package site

import "time"

// Live is the agent's present state for the status page. The agent fills
// it from its monitor and its broker link.
type Live struct {
	Asset, Site string
	// Machine is running, stopped or unknown.
	Machine string
	// Score is the last window's distance, at LastWindow; Threshold and
	// WarnThreshold the levels in force (0: none).
	Score, Threshold, WarnThreshold float64
	LastWindow                      time.Time
	// Alarm is the ISA-18.2 state, Severity none, warning or alarm.
	Alarm, Severity string
	ShelvedUntil    time.Time
	// SensorFaults lists the active microphone faults.
	SensorFaults []string
	// Windows is how many windows were decided since start; LagMean the
	// mean delay from sound to decision.
	Windows int64
	LagMean time.Duration
	// Overruns counts capture gaps since start.
	Overruns int64
	// Baseline in force: id, enrolment time, seconds of sound it learnt.
	BaselineID  string
	Enrolled    time.Time
	EnrolledFor time.Duration
	// Broker: empty when none is configured.
	Broker          string
	BrokerConnected bool
	BrokerError     string
	// Started is when the agent started; Version its build.
	Started time.Time
	Version string
}
