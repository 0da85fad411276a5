package ring

import "sync/atomic"

// Gap is one run of consecutive samples that Write dropped because the
// buffer was full.
type Gap struct {
	// Pos is the producer position of the first dropped sample: how many
	// samples had been offered to Write before it, kept or dropped.
	Pos uint64
	// Delivered is how many samples had entered the buffer before the gap:
	// the consumer's read position at which the discontinuity lies (the
	// gap falls between sample Delivered-1 and sample Delivered).
	Delivered uint64
	// Samples is the length of the run, at least 1.
	Samples uint64
}

// gapQueue is a bounded single-producer single-consumer queue of Gaps with
// the same discipline as the sample ring.
type gapQueue struct {
	q    []Gap
	mask uint64
	w    atomic.Uint64 // gaps queued; written by the producer
	r    atomic.Uint64 // gaps taken; written by the consumer
	lost atomic.Uint64 // gaps dropped because q was full
}

// push queues g, or counts it as lost when the queue is full. Producer only.
func (g *gapQueue) push(gap Gap) {
	w := g.w.Load()
	if w-g.r.Load() == uint64(len(g.q)) {
		g.lost.Add(1)
		return
	}
	g.q[w&g.mask] = gap
	g.w.Store(w + 1)
}

// pop takes the oldest queued gap. Consumer only.
func (g *gapQueue) pop() (Gap, bool) {
	r := g.r.Load()
	if r == g.w.Load() {
		return Gap{}, false
	}
	gap := g.q[r&g.mask]
	g.r.Store(r + 1)
	return gap, true
}
