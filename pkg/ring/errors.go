package ring

import "errors"

// Sentinel errors; New wraps them with the offending value.
var (
	// ErrCapacity is returned by New when Config.Samples is below 1 or
	// above MaxSamples.
	ErrCapacity = errors.New("ring: capacity out of range")

	// ErrGapQueue is returned by New when Config.Gaps is negative or above
	// MaxGaps.
	ErrGapQueue = errors.New("ring: gap queue size out of range")
)
