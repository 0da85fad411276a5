package publish

import "time"

// Live is the agent's present state, asked for each time a status message
// is made.
type Live struct {
	Machine      string    // running, stopped, unknown
	Alarm        string    // ISA-18.2 state name
	Severity     string    // none, warning, alarm
	ShelvedUntil time.Time // zero unless shelved
	Score        float64   // last window's score
	LastWindow   time.Time // time of the last window decided; zero before the first
	SensorFaults []string  // active microphone faults
}

// Operator carries out commands on the agent's alarm, at the agent's own
// time (which, for a replayed recording, is the recording's).
type Operator interface {
	Acknowledge(by string) error
	Shelve(d time.Duration, reason, by string) error
	Unshelve(by string) error
	// Live reports the present state.
	Live() Live
}

// StatusBaseline describes the baseline in force.
type StatusBaseline struct {
	ID        string  `json:"id"`
	Enrolled  string  `json:"enrolled,omitempty"`
	EnrolledS float64 `json:"enrolled_s"`
}

// StatusThresholds are the score levels in force.
type StatusThresholds struct {
	Alarm   float64 `json:"alarm"`
	Warning float64 `json:"warning"`
}

// StatusOutbox describes the messages waiting for the broker.
type StatusOutbox struct {
	Depth        int               `json:"depth"`
	Bytes        int64             `json:"bytes"`
	Oldest       string            `json:"oldest,omitempty"`
	DroppedTotal uint64            `json:"dropped_total"`
	DroppedBy    map[string]uint64 `json:"dropped_by_kind"`
}

// Status is the retained payload of the status topic.
type Status struct {
	Envelope
	State        string           `json:"state"` // online or offline
	Reason       string           `json:"reason,omitempty"`
	AgentVersion string           `json:"agent_version"`
	ClientID     string           `json:"client_id"`
	Started      string           `json:"started"`
	Baseline     StatusBaseline   `json:"baseline"`
	Thresholds   StatusThresholds `json:"thresholds"`
	ConfigSHA256 string           `json:"config_sha256"`
	Machine      string           `json:"machine,omitempty"`
	AlarmState   string           `json:"alarm_state,omitempty"`
	Severity     string           `json:"severity,omitempty"`
	ShelvedUntil string           `json:"shelved_until,omitempty"`
	Score        *float64         `json:"score,omitempty"`
	LastWindow   string           `json:"last_window,omitempty"`
	SensorFaults []string         `json:"sensor_faults,omitempty"`
	Outbox       *StatusOutbox    `json:"outbox,omitempty"`
}

// Offline reasons.
const (
	ReasonStopped = "stopped"         // the agent stopped cleanly
	ReasonLost    = "connection_lost" // the will: the broker lost the agent
)
