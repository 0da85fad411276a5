package capture

import (
	"errors"
	"fmt"
	"runtime"
	"sync"
	"testing"
	"time"
)

// This file holds the test doubles for the capture loop: a virtual clock
// and a scripted device. The real PortAudio path is tested in
// portaudio_test.go.

// fakeClock is a clock that moves only when told: by wait (the back-off)
// and by fake reads (their duration).
type fakeClock struct {
	mu    sync.Mutex // guards the fields below
	t     time.Time
	waits []time.Duration
	block bool // wait blocks until stop instead of advancing
}

func newFakeClock() *fakeClock {
	return &fakeClock{t: time.Date(2031, 3, 14, 2, 0, 0, 0, time.UTC)}
}

func (c *fakeClock) now() time.Time {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.t
}

func (c *fakeClock) advance(d time.Duration) {
	c.mu.Lock()
	defer c.mu.Unlock()
	c.t = c.t.Add(d)
}

func (c *fakeClock) wait(d time.Duration, stop <-chan struct{}) bool {
	c.mu.Lock()
	block := c.block
	c.waits = append(c.waits, d)
	c.mu.Unlock()
	if block {
		<-stop
		return false
	}
	select {
	case <-stop:
		return false
	default:
	}
	c.advance(d)
	return true
}

func (c *fakeClock) recorded() []time.Duration {
	c.mu.Lock()
	defer c.mu.Unlock()
	return append([]time.Duration(nil), c.waits...)
}

// step scripts one read of a fake stream.
type step struct {
	err   error         // failure instead of data, or ErrInputOverflow after data
	took  time.Duration // virtual duration; 0 means the buffer's duration
	pause bool          // signal paused, then block until release before reading
}

// fakeDevice is a scripted input device and its opener. The "hardware"
// keeps one frame counter across streams: frame f, channel ch holds
// (f*channels + ch) mod 2^16, so a consumer can check every sample.
type fakeDevice struct {
	clock    *fakeClock
	rate     int
	channels int
	opens    []error                     // results of the first open calls; later opens succeed
	script   func(stream, read int) step // nil: plain reads
	release  chan struct{}               // closed by the test to end scripted pauses
	paused   chan struct{}               // receives when a read pauses
	// hold, if positive, pauses every read after that many reads have
	// delivered data (across streams) until unhold is closed, so the fake
	// stops producing once the consumer has what it checks.
	hold   int
	unhold chan struct{}

	mu      sync.Mutex // guards the fields below
	frame   uint64
	data    int // reads that delivered data
	calls   int
	streams []*fakeStream
	closes  int // opener close calls
}

func newFakeDevice(clock *fakeClock, rate, channels int) *fakeDevice {
	return &fakeDevice{clock: clock, rate: rate, channels: channels,
		release: make(chan struct{}), paused: make(chan struct{}, 16), unhold: make(chan struct{})}
}

var errNotThere = errors.New("fake: no such device")

func (d *fakeDevice) open(buf []int16) (stream, error) {
	d.mu.Lock()
	defer d.mu.Unlock()
	i := d.calls
	d.calls++
	if i < len(d.opens) && d.opens[i] != nil {
		return nil, d.opens[i]
	}
	s := &fakeStream{dev: d, buf: buf, n: len(d.streams)}
	d.streams = append(d.streams, s)
	return s, nil
}

func (d *fakeDevice) close() error {
	d.mu.Lock()
	defer d.mu.Unlock()
	d.closes++
	return nil
}

// check fails the test unless the opener and every stream were closed
// exactly once.
func (d *fakeDevice) check(t *testing.T) {
	t.Helper()
	d.mu.Lock()
	defer d.mu.Unlock()
	if d.closes != 1 {
		t.Errorf("opener closed %d times, want 1", d.closes)
	}
	for _, s := range d.streams {
		if s.closes != 1 {
			t.Errorf("stream %d closed %d times, want 1", s.n, s.closes)
		}
	}
}

type fakeStream struct {
	dev    *fakeDevice
	buf    []int16
	n      int // stream number
	reads  int
	closes int // guarded by dev.mu
}

func (s *fakeStream) read() error {
	d := s.dev
	var st step
	if d.script != nil {
		st = d.script(s.n, s.reads)
	}
	s.reads++
	d.mu.Lock()
	hold := d.hold > 0 && d.data >= d.hold
	d.mu.Unlock()
	if st.pause || hold {
		select {
		case d.paused <- struct{}{}:
		default:
		}
		if st.pause {
			<-d.release
		} else {
			<-d.unhold
		}
	}
	took := st.took
	if took == 0 {
		took = time.Duration(len(s.buf)/d.channels) * time.Second / time.Duration(d.rate)
	}
	d.clock.advance(took)
	if st.err != nil && !errors.Is(st.err, ErrInputOverflow) {
		return st.err
	}
	d.mu.Lock()
	for i := range s.buf {
		s.buf[i] = int16(uint16(d.frame*uint64(d.channels) + uint64(i)))
	}
	d.frame += uint64(len(s.buf) / d.channels)
	d.data++
	d.mu.Unlock()
	return st.err
}

func (s *fakeStream) close() error {
	s.dev.mu.Lock()
	defer s.dev.mu.Unlock()
	s.closes++
	return nil
}

func (s *fakeStream) String() string { return fmt.Sprintf("fake stream %d", s.n) }

// noLeak fails the test if, at cleanup, more goroutines run than when it
// was called. Goroutines that are ending may need a moment to disappear,
// so it polls for up to five seconds before failing.
func noLeak(t *testing.T) {
	t.Helper()
	before := runtime.NumGoroutine()
	t.Cleanup(func() {
		n := 0
		for i := 0; i < 500; i++ {
			if n = runtime.NumGoroutine(); n <= before {
				return
			}
			time.Sleep(10 * time.Millisecond)
		}
		buf := make([]byte, 1<<16)
		t.Errorf("%d goroutines after the test, %d before:\n%s", n, before, buf[:runtime.Stack(buf, true)])
	})
}
