package gate

import "errors"

// Errors of the constructors and the line learner. Returned errors wrap one
// of these and name the offending field or value.
var (
	// ErrConfig is returned when a SensorConfig or MachineConfig field is out
	// of range.
	ErrConfig = errors.New("gate: invalid config")
	// ErrReference is returned when a Reference does not fit the embedding
	// layout it is used with: a line band that is not a fine-view dimension,
	// templates of the wrong length, or a level statistic that is not finite.
	ErrReference = errors.New("gate: invalid reference")
	// ErrTooFewWindows is returned when a LineLearner is asked for Lines
	// before it has seen MinWindows enrolment windows.
	ErrTooFewWindows = errors.New("gate: too few enrolment windows")
)
