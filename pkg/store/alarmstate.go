package store

import "fmt"

// AlarmState is the alarm condition a trend point or summary records. The
// store does not interpret it beyond its name; the agent maps its alarm
// machine onto these values.
type AlarmState uint8

// Alarm states, stored as one byte.
const (
	// AlarmNormal: no alarm.
	AlarmNormal AlarmState = iota
	// AlarmPending: the score is over the threshold but the on-delay has
	// not run out.
	AlarmPending
	// AlarmActive: raised and not acknowledged.
	AlarmActive
	// AlarmAcknowledged: raised and acknowledged by a person.
	AlarmAcknowledged
	// AlarmLatched: the condition cleared but the alarm waits for a
	// person to reset it.
	AlarmLatched
	// AlarmShelved: suppressed by a person for a while.
	AlarmShelved
	// AlarmUnknown: not scored (machine stopped, sensor fault).
	AlarmUnknown

	alarmStates = iota
)

var alarmNames = [alarmStates]string{"normal", "pending", "active", "acknowledged", "latched", "shelved", "unknown"}

// String returns the lower-case name of a, or "alarm_state(n)" for an
// undefined value.
func (a AlarmState) String() string {
	if int(a) < len(alarmNames) {
		return alarmNames[a]
	}
	return fmt.Sprintf("alarm_state(%d)", uint8(a))
}

func (a AlarmState) validate(kind string) error {
	if a >= alarmStates {
		return fmt.Errorf("%w: %s: alarm state %d is undefined", ErrInvalid, kind, uint8(a))
	}
	return nil
}

// ISA returns a's ISA-18.2 state name, as messages and exports carry it:
// UNACK, ACKED, RTNUN, SHLVD, or NORM for normal, pending and unknown.
func (a AlarmState) ISA() string {
	switch a {
	case AlarmActive:
		return "UNACK"
	case AlarmAcknowledged:
		return "ACKED"
	case AlarmLatched:
		return "RTNUN"
	case AlarmShelved:
		return "SHLVD"
	}
	return "NORM"
}
