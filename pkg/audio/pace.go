package audio

import (
	"errors"
	"fmt"
	"math"
	"time"
)

// ErrSpeed is returned by NewPaced when the speed is negative, NaN or
// infinite. (It lives here rather than in errors.go only because this file
// was added separately; it belongs with the other sentinels.)
var ErrSpeed = errors.New("audio: replay speed out of range")

// paceMaxLag is how far behind its schedule a Paced source may fall before
// it gives up catching up and restarts the schedule from now.
const paceMaxLag = time.Second

// Clock is the time a Paced source waits on. WallClock is the real one;
// tests pass a fake whose Sleep only advances its Now.
type Clock interface {
	// Now returns the current time; only differences between calls are
	// used, so a monotonic reading is what matters.
	Now() time.Time
	// Sleep waits for d (d > 0).
	Sleep(d time.Duration)
}

// WallClock is the real Clock: time.Now and time.Sleep.
type WallClock struct{}

// Now returns time.Now().
func (WallClock) Now() time.Time { return time.Now() }

// Sleep calls time.Sleep(d).
func (WallClock) Sleep(d time.Duration) { time.Sleep(d) }

// Paced wraps a Source so that it delivers samples no faster than speed
// times real time, as a microphone would: a Read that returns k samples
// returns no earlier than the moment the last of them would have been
// recorded, counted from the first Read. It is meant for replaying a WAV
// file, a folder or a synthetic stream through the live service, in real
// time (speed 1) or accelerated for a demo (speed 60 plays an hour in a
// minute).
//
// A Read of k samples takes about k/(rate*speed) seconds and cannot be
// interrupted, so callers should read in blocks of, say, 100 ms of audio
// to keep shutdown prompt. If the reader falls more than a second of wall
// time behind the schedule (a slow consumer, a suspended process), Paced
// does not rush through the backlog; it restarts its schedule from the
// current block, as a live device would (a live device would also have
// lost samples; Paced never drops any). Paced adds no allocation to Read.
// It is not safe for concurrent use.
type Paced struct {
	src     Source
	clock   Clock
	nsPer   float64   // wall nanoseconds per sample; 0 = unpaced
	start   time.Time // when sample 0 was due
	started bool
	n       uint64 // samples delivered since start
}

// NewPaced returns src paced at speed times real time. speed 0 means no
// pacing: Read passes straight through (the "as fast as the CPU allows"
// of batch runs). A nil clock means WallClock. Errors wrap ErrSpeed or
// ErrSampleRate (when src reports a rate outside 1..MaxSampleRate).
func NewPaced(src Source, speed float64, clock Clock) (*Paced, error) {
	if speed < 0 || math.IsNaN(speed) || math.IsInf(speed, 0) {
		return nil, fmt.Errorf("%w: %v, want 0 (unpaced) or a positive factor such as 1 (real time) or 60", ErrSpeed, speed)
	}
	rate := src.Rate()
	if rate < 1 || rate > MaxSampleRate {
		return nil, fmt.Errorf("%w: source rate %d Hz, want 1..%d", ErrSampleRate, rate, MaxSampleRate)
	}
	if clock == nil {
		clock = WallClock{}
	}
	p := &Paced{src: src, clock: clock}
	if speed > 0 {
		p.nsPer = float64(time.Second) / (float64(rate) * speed)
	}
	return p, nil
}

// Rate returns the wrapped source's rate in Hz.
func (p *Paced) Rate() int { return p.src.Rate() }

// Read reads from the wrapped source into buf and then waits until the
// samples read so far are due; errors (io.EOF included) are passed on
// unchanged, after the wait for any samples that came with them.
func (p *Paced) Read(buf []int16) (int, error) {
	if p.nsPer == 0 {
		return p.src.Read(buf)
	}
	if !p.started {
		p.start = p.clock.Now()
		p.started = true
	}
	n, err := p.src.Read(buf)
	if n == 0 {
		return n, err
	}
	now := p.clock.Now()
	if late := now.Sub(p.due(p.n)); late > paceMaxLag {
		// Behind schedule: this block starts now.
		p.start, p.n = now, 0
	}
	p.n += uint64(n)
	if wait := p.due(p.n).Sub(now); wait > 0 {
		p.clock.Sleep(wait)
	}
	return n, err
}

// due returns when sample i (counted from start) is due.
func (p *Paced) due(i uint64) time.Time {
	return p.start.Add(time.Duration(float64(i) * p.nsPer))
}
