package alarm

import "strconv"

// State is the annunciation state of an alarm, named after the ANSI/ISA-18.2
// alarm state transition diagram (from memory). The zero value is
// StateNormal.
type State uint8

const (
	// StateNormal (NORM): nothing annunciated.
	StateNormal State = iota
	// StateUnacked (UNACK): raised and not yet acknowledged. With
	// Config.Latch it may also be a raised alarm whose condition has since
	// cleared (Snapshot.Severity is then SeverityNone).
	StateUnacked
	// StateAcked (ACKED): raised and acknowledged. With Config.Latch it may
	// also be an acknowledged alarm whose condition has cleared, waiting for
	// an acknowledgement of the return.
	StateAcked
	// StateReturnedUnacked (RTNUN): the condition cleared before the alarm
	// was acknowledged (only without Config.Latch).
	StateReturnedUnacked
	// StateShelved (SHLVD): removed from annunciation by Shelve until
	// Snapshot.ShelvedUntil.
	StateShelved
)

var stateNames = [...]string{"NORM", "UNACK", "ACKED", "RTNUN", "SHLVD"}

// String returns the ISA-18.2 abbreviation, such as "UNACK".
func (s State) String() string {
	if int(s) < len(stateNames) {
		return stateNames[s]
	}
	return "State(" + strconv.Itoa(int(s)) + ")"
}

// Severity is how bad a condition is. The zero value, SeverityNone, means
// no condition is present.
type Severity uint8

const (
	// SeverityNone: no condition present.
	SeverityNone Severity = iota
	// SeverityWarning: the warning level's condition is present.
	SeverityWarning
	// SeverityAlarm: the alarm level's condition is present.
	SeverityAlarm
)

var severityNames = [...]string{"none", "warning", "alarm"}

// String returns "none", "warning" or "alarm".
func (s Severity) String() string {
	if int(s) < len(severityNames) {
		return severityNames[s]
	}
	return "Severity(" + strconv.Itoa(int(s)) + ")"
}

// Kind says what an Event reports. The zero value is not a valid kind.
type Kind uint8

const (
	// Raised: a condition appeared and is annunciated as a new occurrence.
	Raised Kind = iota + 1
	// Cleared: the annunciated condition cleared (after its off-delay).
	Cleared
	// Acknowledged: an operator acknowledged the alarm.
	Acknowledged
	// Shelved: an operator shelved the alarm until Event.Until.
	Shelved
	// Unshelved: the shelve ended, by Unshelve or by expiry.
	Unshelved
	// SeverityChanged: an annunciated condition escalated or de-escalated
	// between warning and alarm; Event.From holds the previous severity.
	SeverityChanged
)

var kindNames = [...]string{"", "raised", "cleared", "acknowledged", "shelved", "unshelved", "severity_changed"}

// String returns a lower-case word, such as "raised".
func (k Kind) String() string {
	if k > 0 && int(k) < len(kindNames) {
		return kindNames[k]
	}
	return "Kind(" + strconv.Itoa(int(k)) + ")"
}
