package gate

// State is what the machine gate believes the machine is doing.
type State uint8

// The machine states.
const (
	// Unknown is the state at start and after Reset, until enough windows
	// agree (MachineConfig.StartWindows). Windows in this state should be
	// scored but neither alarm nor be used to adapt anything.
	Unknown State = iota
	// Running: the machine sounds like it did at enrolment.
	Running
	// Stopped: the machine's lines are gone and its level is not above
	// the healthy range. Windows in this state must not be scored for
	// alarms nor enrolled.
	Stopped
)

var stateNames = [...]string{"unknown", "running", "stopped"}

// String returns "unknown", "running" or "stopped".
func (s State) String() string {
	if int(s) < len(stateNames) {
		return stateNames[s]
	}
	return "invalid"
}

// MachineEvent is a change of the machine gate's state.
type MachineEvent struct {
	// From and To are the states before and after.
	From, To State
	// SamplePos is the stream position, in samples, at which the change
	// was confirmed: the End of the window that completed the dwell.
	SamplePos int64
	// OnsetPos is the Start of the first window of the evidence that led
	// to the change, in samples: the change happened at or after it. After
	// Reset it equals SamplePos.
	OnsetPos int64
	// Window is the Index of the confirming window (-1 after Reset).
	Window int64
	// LevelDBFS is that window's RMS level in dBFS (AES17), DropDB the
	// enrolled healthy mean level minus it (positive: quieter than
	// healthy) and Match its line match in [0, 1] (-1 without lines). All
	// three are zero in an event made by Reset.
	LevelDBFS, DropDB, Match float64
}

// Decision is the gate's view of one window, for trends and debugging.
type Decision struct {
	// Window is the window's Index.
	Window int64
	// LevelDBFS, DropDB and Match are as in MachineEvent.
	LevelDBFS, DropDB, Match float64
	// Evidence is what this window alone says: Running, Stopped, or
	// Unknown when it is between the thresholds.
	Evidence State
	// State is the gate's state after this window.
	State State
}
