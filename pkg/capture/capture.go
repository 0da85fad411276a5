package capture

import (
	"context"
	"fmt"
	"sync"
	"sync/atomic"
	"time"

	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/ring"
)

var _ audio.Source = (*Capture)(nil)

// Capture is a running live input. Its goroutine reads the device into a
// ring buffer; Read and ReadContext are the consumer's side and implement
// audio.Source for one consumer goroutine. Stats, LastReadAge and Close
// may be called from any goroutine.
type Capture struct {
	cfg  Config
	ring *ring.Buffer
	open opener
	clk  clock
	base time.Time // clk.now() at New; LastReadAge counts from here

	diag chan Diagnostic // closed by the capture goroutine when it ends
	stop chan struct{}   // closed by Close
	done chan struct{}   // closed when the capture goroutine has ended

	stopOnce sync.Once // guards close(stop)

	// Counters written by the capture goroutine, read by Stats.
	captured, overflows, slowReads    atomic.Uint64
	deviceErrors, openFailures, opens atomic.Uint64
	diagDropped                       atomic.Uint64
	longestRead, lastRead             atomic.Int64 // ns; lastRead since base

	unsent uint64 // diagnostics dropped since the last one sent; capture goroutine only
}

// start builds a Capture around o and starts its goroutine. Unless
// cfg.WaitForDevice, the first open happens here and its error is
// returned (after o.close). cfg must have its defaults applied.
func start(cfg Config, o opener, clk clock) (*Capture, error) {
	rb, err := ring.New(ring.Config{Samples: cfg.ringSamples()})
	if err != nil {
		o.close()
		return nil, fmt.Errorf("capture: %w", err)
	}
	c := &Capture{
		cfg:  cfg,
		ring: rb,
		open: o,
		clk:  clk,
		base: clk.now(),
		diag: make(chan Diagnostic, cfg.DiagnosticBuffer),
		stop: make(chan struct{}),
		done: make(chan struct{}),
	}
	buf := make([]int16, cfg.FramesPerRead*cfg.Channels)
	var first stream
	if !cfg.WaitForDevice {
		if first, err = o.open(buf); err != nil {
			o.close()
			return nil, err
		}
		c.opens.Add(1)
	}
	go c.run(first, buf)
	return c, nil
}

// Rate returns the sample rate in Hz.
func (c *Capture) Rate() int { return c.cfg.Rate }

// Read waits for captured samples and copies up to len(p) of them into p.
// After Close, and once every captured sample has been read, it returns
// 0, io.EOF. While the device is being reopened it waits (use ReadContext
// to bound the wait). It does not allocate.
func (c *Capture) Read(p []int16) (int, error) {
	return c.ring.ReadWait(context.Background(), p)
}

// ReadContext is Read that also returns 0, ctx.Err() when ctx is done
// first.
func (c *Capture) ReadContext(ctx context.Context, p []int16) (int, error) {
	return c.ring.ReadWait(ctx, p)
}

// Diagnostics returns the channel of fault and state reports (see Kind).
// It is closed when the capture goroutine ends, after its last report. If
// nobody drains it, reports beyond its capacity are counted in
// Stats.DiagnosticsDropped and in the Dropped field of the next report
// that fits.
func (c *Capture) Diagnostics() <-chan Diagnostic { return c.diag }

// LastReadAge returns how long ago the last device read completed (or New
// ran, before the first). It grows without bound while a read is stuck in
// the driver or the device is being reopened; a supervisor should compare
// it with a few read durations (Config.FramesPerRead / Rate).
func (c *Capture) LastReadAge() time.Duration {
	return c.clk.now().Sub(c.base) - time.Duration(c.lastRead.Load())
}

// Close stops the capture goroutine and waits for it to end: at most one
// device read, or ctx. If ctx ends first (a read stuck in the driver) it
// returns an error wrapping ctx.Err() and the goroutine ends when the read
// returns. After Close, Read drains the captured samples and then returns
// io.EOF. Close may be called more than once.
func (c *Capture) Close(ctx context.Context) error {
	c.stopOnce.Do(func() { close(c.stop) })
	select {
	case <-c.done:
		return nil
	case <-ctx.Done():
		return fmt.Errorf("capture: close: the capture goroutine is still in a device read (%v since the last one completed): %w",
			c.LastReadAge().Round(time.Millisecond), ctx.Err())
	}
}

// stopping reports whether Close has been called.
func (c *Capture) stopping() bool {
	select {
	case <-c.stop:
		return true
	default:
		return false
	}
}
