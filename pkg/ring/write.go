package ring

// Write copies as much of p as fits into the buffer and returns how many
// samples it kept, always a prefix of p. The rest is dropped and counted
// (see Gap and Stats). Write never blocks and does not allocate. Only the
// producer may call it, and never after Close (that panics: it is a bug in
// the producer).
func (b *Buffer) Write(p []int16) int {
	if b.closed.Load() {
		panic("ring: Write after Close")
	}
	if len(p) == 0 {
		return 0
	}
	w := b.w.Load()
	free := uint64(len(b.buf)) - (w - b.r.Load())
	n := uint64(len(p))
	if n > free {
		n = free
	}
	if n > 0 {
		if b.pendOn {
			// The gap ends here: queue it before its following
			// samples become readable.
			b.gaps.push(b.pending)
			b.pendOn = false
		}
		start := w & b.mask
		c := copy(b.buf[start:], p[:n])
		copy(b.buf, p[c:n])
		b.w.Store(w + n)
	}
	if d := uint64(len(p)) - n; d > 0 {
		if !b.pendOn {
			b.pending = Gap{Pos: b.pos + n, Delivered: w + n}
			b.pendOn = true
			b.overruns.Add(1)
		}
		b.pending.Samples += d
		b.lost.Add(d)
	}
	b.pos += uint64(len(p))
	b.wake()
	return int(n)
}

// Close ends the stream: it queues a gap still open at the end and lets the
// consumer drain the buffer and then see io.EOF. Only the producer may call
// it; calling it again does nothing.
func (b *Buffer) Close() {
	if b.closed.Load() {
		return
	}
	if b.pendOn {
		b.gaps.push(b.pending)
		b.pendOn = false
	}
	b.closed.Store(true)
	b.wake()
}

// wake leaves a wake-up token for ReadWait unless one is already waiting.
func (b *Buffer) wake() {
	select {
	case b.notify <- struct{}{}:
	default:
	}
}
