package capture

import "time"

// opener opens the configured input device. The PortAudio backend
// implements it; tests substitute fakes to drive the capture loop.
type opener interface {
	// open opens and starts a stream whose reads fill buf, interleaved
	// frames of the configured channel count. Only the capture goroutine
	// (or New, before it starts) calls it.
	open(buf []int16) (stream, error)
	// close releases what the opener holds (the PortAudio reference). It
	// is called once, after the last stream has been closed.
	close() error
}

// stream is one open input stream.
type stream interface {
	// read blocks until buf is full. It returns nil; an error wrapping
	// ErrInputOverflow when samples were lost before buf (buf is still
	// full and valid); or any other error when the device failed.
	read() error
	// close stops and closes the stream.
	close() error
	// String describes the device for diagnostics.
	String() string
}

// clock is the time the capture goroutine uses; tests run it virtually.
type clock interface {
	now() time.Time
	// wait waits for d or until stop is closed and reports whether the
	// whole of d elapsed.
	wait(d time.Duration, stop <-chan struct{}) bool
}

// backoff yields the waits between reopen attempts: min, doubling, capped
// at max.
type backoff struct {
	min, max, next time.Duration
}

// delay returns the next wait and doubles the one after it.
func (b *backoff) delay() time.Duration {
	if b.next < b.min {
		b.next = b.min
	}
	d := b.next
	b.next = min(2*b.next, b.max)
	return d
}

// reset starts the sequence again at min.
func (b *backoff) reset() { b.next = b.min }
