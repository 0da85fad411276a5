package monitor

// evidence keeps the last few seconds of sound and, when asked, turns them
// and the next few seconds into a clip. Push does not allocate; Trigger
// allocates one clip buffer.
type evidence struct {
	past    []int16 // ring of the most recent len(past) samples
	filled  int     // how much of past holds sound
	head    int     // next write position in past
	pos     int64   // stream position after the last pushed sample
	after   int     // samples to collect after a trigger
	pending []pendingClip
}

type pendingClip struct {
	eventSeq uint64
	clipID   uint64 // reserved id, 0 for a new one
	start    int64  // stream position of samples[0]
	samples  []int16
	want     int
}

// maxPendingClips bounds the clips collected at once: alarms raised in
// quick succession share sound anyway.
const maxPendingClips = 4

func newEvidence(before, after int) *evidence {
	return &evidence{past: make([]int16, max(before, 1)), after: after,
		pending: make([]pendingClip, 0, maxPendingClips)}
}

// push records a block; it returns the clips that became complete, valid
// until the next call.
func (e *evidence) push(block []int16, done []pendingClip) []pendingClip {
	done = done[:0]
	for i := range e.pending {
		p := &e.pending[i]
		n := min(p.want-len(p.samples), len(block))
		p.samples = append(p.samples, block[:n]...)
	}
	for i := 0; i < len(e.pending); {
		if p := e.pending[i]; len(p.samples) == p.want {
			done = append(done, p)
			e.pending = append(e.pending[:i], e.pending[i+1:]...)
			continue
		}
		i++
	}
	for len(block) > 0 {
		n := copy(e.past[e.head:], block)
		block = block[n:]
		e.head = (e.head + n) % len(e.past)
		e.filled = min(e.filled+n, len(e.past))
		e.pos += int64(n)
	}
	return done
}

// room reports whether another clip can be collected now.
func (e *evidence) room() bool { return len(e.pending) < cap(e.pending) }

// trigger starts a clip holding the sound already kept and the next `after`
// samples, to be stored under clipID (0: a new id). It reports false when
// too many clips are already being collected.
func (e *evidence) trigger(eventSeq, clipID uint64) bool {
	if !e.room() {
		return false
	}
	want := e.filled + e.after
	s := make([]int16, e.filled, want)
	tail := (e.head - e.filled + len(e.past)) % len(e.past)
	n := copy(s, e.past[tail:min(tail+e.filled, len(e.past))])
	copy(s[n:], e.past[:e.filled-n])
	e.pending = append(e.pending, pendingClip{eventSeq: eventSeq, clipID: clipID, start: e.pos - int64(e.filled), samples: s, want: want})
	return true
}

// flushAll returns the clips still collecting, cut short (at the end of a
// finite source).
func (e *evidence) flushAll() []pendingClip {
	out := e.pending
	e.pending = nil
	return out
}
