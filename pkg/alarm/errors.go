package alarm

import "errors"

var (
	// ErrConfig is returned when a Config field is out of range. The
	// returned error wraps it and names the field.
	ErrConfig = errors.New("alarm: invalid config")

	// ErrNothingToAck is returned by Acknowledge when nothing waits for an
	// acknowledgement: the state is NORM, ACKED with the condition still
	// present, or SHLVD (a shelved alarm is not annunciated).
	ErrNothingToAck = errors.New("alarm: nothing to acknowledge")

	// ErrShelveNonPositive is returned by Shelve when the duration is zero
	// or negative.
	ErrShelveNonPositive = errors.New("alarm: shelve duration must be positive")

	// ErrShelveTooLong is returned by Shelve when the duration exceeds
	// Config.MaxShelve; the returned error names the limit.
	ErrShelveTooLong = errors.New("alarm: shelve duration exceeds the limit")

	// ErrNotShelved is returned by Unshelve when the alarm is not shelved.
	ErrNotShelved = errors.New("alarm: not shelved")
)
