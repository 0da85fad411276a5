package ring

import "sync/atomic"

// cacheLine pads the producer's and the consumer's fields apart so that
// their stores do not invalidate each other's cache line.
type cacheLine [64]byte

// Buffer is a single-producer single-consumer ring of int16 samples. The
// zero value is not usable; call New. See the package documentation for
// which goroutine may call which method.
type Buffer struct {
	buf  []int16 // len is a power of two; never reallocated
	mask uint64  // len(buf) - 1

	// notify carries at most one wake-up token from the producer to a
	// consumer waiting in ReadWait. The producer sends without blocking
	// after every Write and in Close.
	notify chan struct{}

	gaps gapQueue

	_ cacheLine
	// Producer-owned. w is read by the consumer, the others only by Stats.
	w        atomic.Uint64 // delivered position: samples that entered buf
	lost     atomic.Uint64 // samples dropped by Write
	overruns atomic.Uint64 // gaps begun
	closed   atomic.Bool
	pos      uint64 // producer position; touched only by the producer
	pending  Gap    // the gap being extended while pendingOn
	pendOn   bool   // the last sample offered to Write was dropped

	_ cacheLine
	// Consumer-owned. r is read by the producer to find free space.
	r atomic.Uint64 // samples taken out of buf
	_ cacheLine
}

// New returns an empty Buffer sized by cfg. It is the only method that
// allocates.
func New(cfg Config) (*Buffer, error) {
	n, g, err := cfg.sizes()
	if err != nil {
		return nil, err
	}
	return &Buffer{
		buf:    make([]int16, n),
		mask:   uint64(n - 1),
		notify: make(chan struct{}, 1),
		gaps:   gapQueue{q: make([]Gap, g), mask: uint64(g - 1)},
	}, nil
}

// Cap returns the capacity in samples: Config.Samples rounded up to a power
// of two.
func (b *Buffer) Cap() int { return len(b.buf) }

// Len returns how many samples are buffered and unread. Called by anyone
// but the two ends it is a snapshot that may be stale at once.
func (b *Buffer) Len() int {
	r := b.r.Load()
	return int(b.w.Load() - r)
}

// Free returns how many samples Write would accept now without dropping.
// Called by the producer it is a lower bound (the consumer can only free
// more); called by anyone else it is a snapshot.
func (b *Buffer) Free() int { return len(b.buf) - b.Len() }

// Stats is a snapshot of a Buffer's counters, all in samples except
// Overruns and GapsLost. The fields are loaded one by one, so while both
// ends run they may be a few samples apart; after Close and a full drain
// they are exact: Written == Read and Written+Lost is the producer
// position.
type Stats struct {
	Written  uint64 // samples Write kept, since New
	Read     uint64 // samples the consumer has taken out
	Lost     uint64 // samples Write dropped because the buffer was full
	Overruns uint64 // gaps: runs of consecutive dropped samples
	GapsLost uint64 // gaps not queued because the gap queue was full
}

// Stats returns the counters. It may be called from any goroutine.
func (b *Buffer) Stats() Stats {
	return Stats{
		Written:  b.w.Load(),
		Read:     b.r.Load(),
		Lost:     b.lost.Load(),
		Overruns: b.overruns.Load(),
		GapsLost: b.gaps.lost.Load(),
	}
}
