package ring

import (
	"context"
	"io"
)

// Read copies up to len(p) buffered samples into p and returns how many.
// It does not wait: with nothing buffered it returns 0, nil while the
// stream is open and 0, io.EOF once the producer has closed it and every
// sample has been read. Only the consumer may call it. It does not
// allocate.
func (b *Buffer) Read(p []int16) (int, error) {
	// Load closed before w: the producer stores w before closed, so
	// seeing closed guarantees seeing the final w.
	closed := b.closed.Load()
	w := b.w.Load()
	r := b.r.Load()
	avail := w - r
	if avail == 0 {
		if closed {
			return 0, io.EOF
		}
		return 0, nil
	}
	n := uint64(len(p))
	if n > avail {
		n = avail
	}
	start := r & b.mask
	c := copy(p[:n], b.buf[start:])
	copy(p[c:n], b.buf)
	b.r.Store(r + n)
	return int(n), nil
}

// ReadWait is Read that waits, without spinning, until at least one sample
// is buffered, the stream has ended (0, io.EOF) or ctx is done (0,
// ctx.Err()). With len(p) == 0 it returns 0, nil at once. Only the
// consumer may call it. It does not allocate.
func (b *Buffer) ReadWait(ctx context.Context, p []int16) (int, error) {
	if len(p) == 0 {
		return 0, nil
	}
	done := ctx.Done()
	for {
		n, err := b.Read(p)
		if n > 0 || err != nil {
			return n, err
		}
		// The producer stores w (or closed) before it sends the token,
		// so a token sent after our Read saw nothing is still in the
		// channel: no wake-up is lost. A stale token costs one loop.
		select {
		case <-b.notify:
		case <-done:
			return 0, ctx.Err()
		}
	}
}

// NextGap returns the oldest ended gap not yet returned, or false when
// there is none. Gaps come in stream order. After a Read that brought the
// consumer to position P (samples read so far), every gap with
// Delivered < P has been queued, so calling NextGap until it returns false
// after each Read sees each gap no later than the first sample after it.
// Only the consumer may call it.
func (b *Buffer) NextGap() (Gap, bool) {
	return b.gaps.pop()
}
