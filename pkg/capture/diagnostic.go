package capture

import (
	"fmt"
	"strings"
	"time"
)

// Kind says what a Diagnostic reports.
type Kind int

// Diagnostic kinds.
const (
	// KindOpened: a stream was opened and started (the first time, or
	// again after a failure). Device names it; after an outage, Duration
	// is how long the input was down and Samples estimates how many
	// samples that was (Duration × Rate).
	KindOpened Kind = iota + 1
	// KindOpenFailed: an attempt to open the device failed (Err); the next
	// attempt follows after Duration. Attempt counts consecutive failures.
	KindOpenFailed
	// KindDeviceError: a read failed (Err); the stream is closed and will
	// be reopened.
	KindDeviceError
	// KindInputOverflow: PortAudio discarded input before the buffer that
	// starts at SamplePos; how many samples is unknown (Samples 0).
	KindInputOverflow
	// KindRingOverrun: the consumer fell behind and the ring dropped
	// Samples samples from SamplePos on; reported when the gap ends.
	KindRingOverrun
	// KindSlowRead: the read that ended at SamplePos took Duration, far
	// longer than its buffer lasts (see Config.SlowRead).
	KindSlowRead
)

// String returns a short lower-case name such as "input overflow".
func (k Kind) String() string {
	switch k {
	case KindOpened:
		return "opened"
	case KindOpenFailed:
		return "open failed"
	case KindDeviceError:
		return "device error"
	case KindInputOverflow:
		return "input overflow"
	case KindRingOverrun:
		return "ring overrun"
	case KindSlowRead:
		return "slow read"
	}
	return fmt.Sprintf("kind(%d)", int(k))
}

// Diagnostic is one event of the capture goroutine. Fields that do not
// apply to a Kind are zero.
type Diagnostic struct {
	Kind Kind
	// Time is the wall-clock time (UTC) when the capture goroutine noticed
	// the event.
	Time time.Time
	// SamplePos is the device sample counter at the event: mono samples
	// read from the device since New, including those the ring dropped.
	// For a gap it is the position of its first missing sample.
	SamplePos uint64
	// StreamPos is how many samples had entered the consumer's stream
	// before the event: the consumer's read position at which it lies.
	StreamPos uint64
	// Samples is how many samples were lost: exact for a ring overrun, an
	// estimate for the outage ended by KindOpened, 0 when unknown.
	Samples uint64
	// Duration: see the Kind.
	Duration time.Duration
	// Attempt counts consecutive failed opens (KindOpenFailed) or the
	// attempts it took (KindOpened after an outage).
	Attempt int
	// Device describes the opened device (KindOpened).
	Device string
	// Err is the cause (KindOpenFailed, KindDeviceError,
	// KindInputOverflow).
	Err error
	// Dropped is how many diagnostics were discarded just before this one
	// because the Diagnostics channel was full.
	Dropped uint64
}

// String formats d as one log line, e.g. "ring overrun: gap of 1600
// samples at sample 48000 (stream sample 48000)".
func (d Diagnostic) String() string {
	var b strings.Builder
	b.WriteString(d.Kind.String())
	switch d.Kind {
	case KindOpened:
		fmt.Fprintf(&b, ": %s at sample %d", d.Device, d.SamplePos)
		if d.Attempt > 0 {
			fmt.Fprintf(&b, " after %d failed attempts", d.Attempt)
		}
		if d.Duration > 0 {
			fmt.Fprintf(&b, "; input was down %v (about %d samples)", d.Duration.Round(time.Millisecond), d.Samples)
		}
	case KindOpenFailed:
		fmt.Fprintf(&b, " (attempt %d), retrying in %v", d.Attempt, d.Duration)
	case KindRingOverrun:
		fmt.Fprintf(&b, ": gap of %d samples at sample %d (stream sample %d)", d.Samples, d.SamplePos, d.StreamPos)
	case KindInputOverflow:
		fmt.Fprintf(&b, ": gap of unknown length before sample %d (stream sample %d)", d.SamplePos, d.StreamPos)
	case KindSlowRead:
		fmt.Fprintf(&b, ": a read took %v, ending at sample %d", d.Duration.Round(time.Millisecond), d.SamplePos)
	case KindDeviceError:
		fmt.Fprintf(&b, " at sample %d (stream sample %d), reopening in %v", d.SamplePos, d.StreamPos, d.Duration)
	}
	if d.Err != nil {
		fmt.Fprintf(&b, ": %v", d.Err)
	}
	if d.Dropped > 0 {
		fmt.Fprintf(&b, " [%d earlier diagnostics dropped: channel full]", d.Dropped)
	}
	return b.String()
}
