package capture

import "errors"

// run is the capture goroutine: read the device into the ring until Close,
// reopening with back-off after failures. first is the stream New opened,
// or nil to open one here. It owns buf and every stream.
func (c *Capture) run(first stream, buf []int16) {
	defer close(c.done)
	w := blockWriter{c: c, buf: buf, mono: buf}
	if c.cfg.Channels > 1 {
		w.mono = make([]int16, c.cfg.FramesPerRead)
	}
	bo := backoff{min: c.cfg.ReopenMin, max: c.cfg.ReopenMax}
	s := first
	if s != nil {
		c.emit(Diagnostic{Kind: KindOpened, Device: s.String()})
	}
	down := c.base // when the input went down
	failed := 0    // consecutive failed opens
	for !c.stopping() {
		if s == nil {
			var err error
			if s, err = c.open.open(buf); err != nil {
				failed++
				c.openFailures.Add(1)
				d := bo.delay()
				c.emit(Diagnostic{Kind: KindOpenFailed, SamplePos: w.pos, StreamPos: w.delivered, Err: err, Attempt: failed, Duration: d})
				c.clk.wait(d, c.stop)
				continue
			}
			c.opens.Add(1)
			out := c.clk.now().Sub(down)
			c.emit(Diagnostic{Kind: KindOpened, Device: s.String(), SamplePos: w.pos, StreamPos: w.delivered,
				Attempt: failed, Duration: out, Samples: uint64(out.Seconds() * float64(c.cfg.Rate))})
			failed = 0
		}
		opened := c.clk.now()
		err := c.pump(s, &w)
		s.close() // a failing device may fail to close too; the read error says more
		s = nil
		if err == nil {
			break
		}
		c.deviceErrors.Add(1)
		down = c.clk.now()
		if down.Sub(opened) >= bo.max {
			bo.reset() // it ran well for a while: start the back-off afresh
		}
		d := bo.delay()
		c.emit(Diagnostic{Kind: KindDeviceError, SamplePos: w.pos, StreamPos: w.delivered, Err: err, Duration: d})
		c.clk.wait(d, c.stop)
	}
	c.open.close()
	w.endGap()
	c.ring.Close()
	close(c.diag)
}

// pump reads s into the ring until Close (nil) or a device failure (the
// error). This is the per-block path: it does not allocate.
func (c *Capture) pump(s stream, w *blockWriter) error {
	for !c.stopping() {
		t0 := c.clk.now()
		err := s.read()
		t1 := c.clk.now()
		c.lastRead.Store(int64(t1.Sub(c.base)))
		took := t1.Sub(t0)
		if int64(took) > c.longestRead.Load() {
			c.longestRead.Store(int64(took))
		}
		overflow := err != nil && errors.Is(err, ErrInputOverflow)
		if err != nil && !overflow {
			return err
		}
		if took > c.cfg.SlowRead {
			c.slowReads.Add(1)
			c.emit(Diagnostic{Kind: KindSlowRead, SamplePos: w.pos + uint64(len(w.mono)), StreamPos: w.delivered, Duration: took})
		}
		if overflow {
			c.overflows.Add(1)
			c.emit(Diagnostic{Kind: KindInputOverflow, SamplePos: w.pos, StreamPos: w.delivered, Err: err})
		}
		w.write()
	}
	return nil
}

// emit queues d on the Diagnostics channel without ever blocking the
// capture goroutine; when the channel is full, d is counted instead.
func (c *Capture) emit(d Diagnostic) {
	d.Time = c.clk.now().UTC()
	d.Dropped = c.unsent
	select {
	case c.diag <- d:
		c.unsent = 0
	default:
		c.unsent++
		c.diagDropped.Add(1)
	}
}

// blockWriter turns device buffers into mono blocks in the ring and tracks
// the gaps the ring makes, the way the ring merges them, so each gap is
// reported once with its exact length.
type blockWriter struct {
	c         *Capture
	buf       []int16 // the device buffer, interleaved
	mono      []int16 // buf itself when mono
	pos       uint64  // device sample counter
	delivered uint64  // samples the ring kept
	gapOn     bool    // the last sample was dropped
	gap       Diagnostic
}

// write moves the device buffer into the ring.
func (w *blockWriter) write() {
	if len(w.mono) != len(w.buf) {
		toMono(w.mono, w.buf, w.c.cfg.Channels, w.c.cfg.Channel)
	}
	n := uint64(len(w.mono))
	k := uint64(w.c.ring.Write(w.mono))
	if k > 0 {
		w.endGap()
	}
	if k < n {
		if !w.gapOn {
			w.gap = Diagnostic{Kind: KindRingOverrun, SamplePos: w.pos + k, StreamPos: w.delivered + k}
			w.gapOn = true
		}
		w.gap.Samples += n - k
	}
	w.delivered += k
	w.pos += n
	w.c.captured.Store(w.pos)
}

// endGap reports a gap that has ended.
func (w *blockWriter) endGap() {
	if w.gapOn {
		w.c.emit(w.gap)
		w.gapOn = false
	}
}
