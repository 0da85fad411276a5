package features

import "fmt"

// Framer cuts a stream of int16 samples, delivered in blocks of any size,
// into frames of a fixed length whose starts are a fixed hop apart. The
// first frame starts at sample 0 of the stream. The frames delivered do
// not depend on how the stream is split into blocks.
//
// A Framer is not safe for concurrent use.
type Framer struct {
	frameLen int
	hop      int
	buf      []int16 // holds the head of a frame that spans blocks
	n        int     // valid samples in buf
	skip     int     // samples still to drop before the next frame starts
}

// NewFramer returns a Framer for frames of frameLen samples starting hop
// samples apart. It panics if frameLen or hop is not positive, which is
// programmer misuse (validate user input with Config.Validate first).
func NewFramer(frameLen, hop int) *Framer {
	if frameLen <= 0 || hop <= 0 {
		panic(fmt.Sprintf("features: NewFramer(%d, %d): frame length and hop must be positive", frameLen, hop))
	}
	return &Framer{frameLen: frameLen, hop: hop, buf: make([]int16, frameLen)}
}

// Push appends the block p to the stream and calls emit once for every
// frame completed by it, in stream order. The slice handed to emit is
// valid only during the call: emit must not retain or modify it. Frames
// that lie wholly inside p are passed without copying; a frame spanning
// blocks is assembled in an internal buffer. Push does not allocate.
func (f *Framer) Push(p []int16, emit func(frame []int16)) {
	L := f.frameLen
	i := 0
	for i < len(p) {
		if f.skip > 0 {
			d := min(f.skip, len(p)-i)
			i += d
			f.skip -= d
			continue
		}
		if f.n == 0 {
			if len(p)-i >= L {
				emit(p[i : i+L])
				f.skip = f.hop
				continue
			}
			f.n = copy(f.buf, p[i:])
			return
		}
		c := copy(f.buf[f.n:], p[i:])
		f.n += c
		i += c
		if f.n < L {
			return
		}
		emit(f.buf)
		if f.hop >= L {
			f.n = 0
			f.skip = f.hop - L
			continue
		}
		keep := L - f.hop
		if c >= keep {
			// The overlap for the next frame came from p: restart there
			// and let the next frame be passed straight from p.
			i -= keep
			f.n = 0
			continue
		}
		copy(f.buf, f.buf[f.hop:])
		f.n = keep
	}
}

// Reset forgets any partial frame, so that the next Push starts a new
// stream at sample 0.
func (f *Framer) Reset() {
	f.n = 0
	f.skip = 0
}
