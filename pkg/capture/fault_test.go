package capture

import (
	"context"
	"errors"
	"io"
	"strings"
	"testing"
	"time"
)

// TestRingOverrun lets the fake device deliver 10 reads into a ring that
// holds 4, then checks the one merged gap it reports and that the stream
// continues after it.
func TestRingOverrun(t *testing.T) {
	noLeak(t)
	const F = 64
	// 256 samples (4 reads) of ring at 1 kHz
	cfg := testConfig(func(c *Config) { c.FramesPerRead, c.RingSeconds = F, 0.256 })
	clk := newFakeClock()
	dev := newFakeDevice(clk, cfg.Rate, 1)
	dev.script = func(s, r int) step { return step{pause: r == 10} }
	c, err := start(cfg, dev, clk)
	if err != nil {
		t.Fatal(err)
	}
	<-dev.paused // reads 0..9 done: 4 kept, 6 dropped
	readCounter(t, c, 4*F, 0, 1, 0)
	if s := c.Stats(); s.RingOverruns != 1 || s.RingLost != 6*F || s.Captured != 10*F {
		t.Errorf("stats %+v, want 1 overrun of %d samples after %d captured", s, 6*F, 10*F)
	}
	close(dev.release) // the gap ends with read 10
	readCounter(t, c, 3*F, 10*F, 1, 0)
	diags := finish(t, c, dev)
	checkDiags(t, diags[:2], []want{
		{Kind: KindOpened},
		{Kind: KindRingOverrun, SamplePos: 4 * F, StreamPos: 4 * F, Sample: 6 * F},
	})
	if got := diags[1].String(); got != "ring overrun: gap of 384 samples at sample 256 (stream sample 256)" {
		t.Errorf("String() = %q", got)
	}
}

// TestDiagnosticsFull fills a 2-slot Diagnostics channel nobody reads and
// checks that the next report that fits says how many were dropped.
func TestDiagnosticsFull(t *testing.T) {
	noLeak(t)
	cfg := testConfig(func(c *Config) { c.DiagnosticBuffer = 2 })
	clk := newFakeClock()
	dev := newFakeDevice(clk, cfg.Rate, 1)
	dev.script = func(s, r int) step {
		switch r {
		case 1, 2, 3, 5:
			return step{err: ErrInputOverflow}
		case 4:
			return step{pause: true}
		}
		return step{}
	}
	c, err := start(cfg, dev, clk)
	if err != nil {
		t.Fatal(err)
	}
	<-dev.paused
	first := []Diagnostic{<-c.Diagnostics(), <-c.Diagnostics()} // opened, overflow at read 1
	if s := c.Stats(); s.DiagnosticsDropped != 2 || s.InputOverflows != 3 {
		t.Errorf("stats %+v, want 2 dropped diagnostics of 3 overflows", s)
	}
	dev.hold = 6
	close(dev.release)
	readCounter(t, c, 600, 0, 1, 0)
	rest := finish(t, c, dev)
	checkDiags(t, append(first, rest...), []want{
		{Kind: KindOpened},
		{Kind: KindInputOverflow, SamplePos: 100, StreamPos: 100, Err: true},
		{Kind: KindInputOverflow, SamplePos: 500, StreamPos: 500, Err: true, Dropped: 2},
	})
}

// TestLastReadAge checks the watchdog timestamp on the virtual clock while
// a read hangs.
func TestLastReadAge(t *testing.T) {
	noLeak(t)
	cfg := testConfig(nil)
	clk := newFakeClock()
	dev := newFakeDevice(clk, cfg.Rate, 1)
	dev.script = func(s, r int) step { return step{pause: r == 3} }
	c, err := start(cfg, dev, clk)
	if err != nil {
		t.Fatal(err)
	}
	<-dev.paused // read 3 hangs
	if age := c.LastReadAge(); age != 0 {
		t.Errorf("age %v right after read 2 completed, want 0", age)
	}
	clk.advance(7 * time.Second)
	if age := c.LastReadAge(); age != 7*time.Second {
		t.Errorf("age %v while read 3 hangs for 7 s, want 7s", age)
	}
	// Close cannot interrupt the hung read: it reports that and gives up
	// when its context ends; a later Close succeeds once the read returns.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	err = c.Close(ctx)
	if !errors.Is(err, context.Canceled) || !strings.Contains(err.Error(), "still in a device read (7s since the last one completed)") {
		t.Errorf("Close during a hung read: %v", err)
	}
	finish(t, c, dev)
}

func TestFirstOpenFails(t *testing.T) {
	noLeak(t)
	clk := newFakeClock()
	dev := newFakeDevice(clk, 1000, 1)
	dev.opens = []error{errNotThere}
	c, err := start(testConfig(nil), dev, clk)
	if c != nil || !errors.Is(err, errNotThere) {
		t.Fatalf("start: %v, %v; want the open error", c, err)
	}
	if dev.closes != 1 {
		t.Errorf("opener closed %d times, want 1", dev.closes)
	}
}

// TestCloseDuringBackoff closes a capture whose device never appears.
func TestCloseDuringBackoff(t *testing.T) {
	noLeak(t)
	clk := newFakeClock()
	clk.block = true
	dev := newFakeDevice(clk, 1000, 1)
	dev.opens = []error{errNotThere}
	c, err := start(testConfig(func(c *Config) { c.WaitForDevice = true }), dev, clk)
	if err != nil {
		t.Fatal(err)
	}
	d := <-c.Diagnostics()
	if d.Kind != KindOpenFailed || !errors.Is(d.Err, errNotThere) {
		t.Fatalf("first diagnostic %v", d)
	}
	done := make(chan error, 1)
	go func() { // a consumer waiting for audio that never comes
		_, err := c.Read(make([]int16, 10))
		done <- err
	}()
	diags := finish(t, c, dev)
	if err := <-done; err != io.EOF {
		t.Errorf("waiting Read returned %v after Close, want EOF", err)
	}
	if len(diags) != 0 {
		t.Errorf("further diagnostics %v", diags)
	}
	if s := c.Stats(); s.Opens != 0 || s.OpenFailures != 1 {
		t.Errorf("stats %+v", s)
	}
}

// TestPerBlockPathDoesNotAllocate measures allocations in the whole
// process while the consumer reads blocks from a free-running fake device
// (stereo, mixed, with ring overruns): the capture goroutine's per-block
// path must not allocate.
func TestPerBlockPathDoesNotAllocate(t *testing.T) {
	noLeak(t)
	cfg := testConfig(func(c *Config) { c.Channels, c.Channel = 2, -1 })
	clk := newFakeClock()
	dev := newFakeDevice(clk, cfg.Rate, 2)
	c, err := start(cfg, dev, clk)
	if err != nil {
		t.Fatal(err)
	}
	p := make([]int16, 100)
	c.Read(p) // first reads past
	allocs := testing.AllocsPerRun(200, func() {
		if _, err := c.Read(p); err != nil {
			t.Fatal(err)
		}
	})
	finish(t, c, dev)
	if allocs != 0 {
		t.Errorf("%v allocations per block", allocs)
	}
}
