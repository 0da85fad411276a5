package alarm

import "time"

// MaxBands is how many deviating frequency bands a Window and an Event
// carry at most.
const MaxBands = 3

// Band is one frequency band and how far it deviates from the healthy
// baseline in a window.
type Band struct {
	// LowHz and HighHz bound the band, in Hz.
	LowHz, HighHz float64
	// Deviation is how far the band lies from healthy, in the caller's
	// unit (for example dB or standard deviations); larger is worse.
	Deviation float64
}

// Window is the outcome of one analysis window, as Tracker.Observe takes it.
type Window struct {
	// Score is the cosine distance to the enrolled healthy mean, 0..1.
	Score float64
	// Running is false when the gate says the machine is stopped or the
	// sensor is unhealthy; such a window is skipped by the debounce. The
	// zero value (false) therefore skips the window.
	Running bool
	// Bands holds the NBands most deviating bands of this window, most
	// deviating first. NBands outside 0..MaxBands is clamped.
	Bands  [MaxBands]Band
	NBands int
	// SampleIndex is the window's position in the audio stream, in
	// samples, used to cut the evidence clip around a raise.
	SampleIndex int64
}

// ReasonExpired is Event.Reason of an Unshelved event caused by the end of
// the shelve time.
const ReasonExpired = "expired"

// Event reports one change of the alarm. It is a plain value.
type Event struct {
	// Kind says what happened.
	Kind Kind
	// Time is the now passed to the call that made the event.
	Time time.Time
	// Occurrence numbers the raises of this alarm from 1; every event
	// carries the number of the latest raise (0 before the first).
	Occurrence uint64
	// Severity is the severity the event is about: the new one for Raised
	// and SeverityChanged, the one that cleared for Cleared, the
	// occurrence's for Acknowledged, and the present condition's (possibly
	// SeverityNone) for Shelved and Unshelved.
	Severity Severity
	// From is the previous severity of a SeverityChanged event, else
	// SeverityNone.
	From Severity
	// State is the annunciation state after the event.
	State State
	// Score is the score of the latest running window.
	Score float64
	// Threshold is Severity's threshold and Over how many of the last N
	// running windows were at or above it; both are zero when Severity is
	// SeverityNone.
	Threshold float64
	Over, N   int
	// Bands, NBands and SampleIndex are the evidence: the deviating bands
	// and stream position of the window where the condition reached its
	// severity (see the package documentation).
	Bands       [MaxBands]Band
	NBands      int
	SampleIndex int64
	// By is who acknowledged, shelved or unshelved; empty for expiry.
	By string
	// Reason is the reason given to Shelve, or ReasonExpired.
	Reason string
	// Until is the end of the shelve, for Shelved events.
	Until time.Time
}
