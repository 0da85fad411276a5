package capture

import "time"

// Stats is a snapshot of a Capture's counters. Sample counts are mono
// samples at Config.Rate.
type Stats struct {
	Captured  uint64 // samples read from the device since New
	Delivered uint64 // samples the consumer has read
	Buffered  int    // samples waiting in the ring

	RingOverruns uint64 // gaps the ring made because the consumer fell behind
	RingLost     uint64 // samples those gaps dropped

	InputOverflows uint64 // device reads that reported an input overflow
	SlowReads      uint64 // device reads slower than Config.SlowRead
	DeviceErrors   uint64 // device reads that failed
	OpenFailures   uint64 // failed attempts to open the device
	Opens          uint64 // streams opened, the first one included

	DiagnosticsDropped uint64        // diagnostics not queued: channel full
	LongestRead        time.Duration // slowest device read so far
}

// Stats returns the counters. It may be called from any goroutine; the
// fields are read one by one, so they may be a block apart while the
// capture runs.
func (c *Capture) Stats() Stats {
	r := c.ring.Stats()
	return Stats{
		Captured:           c.captured.Load(),
		Delivered:          r.Read,
		Buffered:           int(r.Written - r.Read),
		RingOverruns:       r.Overruns,
		RingLost:           r.Lost,
		InputOverflows:     c.overflows.Load(),
		SlowReads:          c.slowReads.Load(),
		DeviceErrors:       c.deviceErrors.Load(),
		OpenFailures:       c.openFailures.Load(),
		Opens:              c.opens.Load(),
		DiagnosticsDropped: c.diagDropped.Load(),
		LongestRead:        time.Duration(c.longestRead.Load()),
	}
}
