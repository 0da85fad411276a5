package capture

import (
	"context"
	"errors"
	"io"
	"slices"
	"strings"
	"testing"
	"time"
)

var errUnplugged = errors.New("fake: device unplugged")

// testConfig is a small configuration for the fake device: 1 kHz, reads
// of 100 frames (100 ms), a ring of 4 s.
func testConfig(mod func(*Config)) Config {
	c := Config{Rate: 1000, FramesPerRead: 100, RingSeconds: 4}
	if mod != nil {
		mod(&c)
	}
	cfg, err := c.withDefaults()
	if err != nil {
		panic(err)
	}
	return cfg
}

// want is an expected diagnostic: the fields compared are Kind, SamplePos,
// StreamPos, Samples, Duration, Attempt and Dropped, and whether Err is
// set.
type want struct {
	Kind                         Kind
	SamplePos, StreamPos, Sample uint64
	Duration                     time.Duration
	Attempt                      int
	Err                          bool
	Dropped                      uint64
}

func (w want) matches(d Diagnostic) bool {
	return w.Kind == d.Kind && w.SamplePos == d.SamplePos && w.StreamPos == d.StreamPos &&
		w.Sample == d.Samples && w.Duration == d.Duration && w.Attempt == d.Attempt &&
		w.Err == (d.Err != nil) && w.Dropped == d.Dropped
}

// readCounter reads n samples from c and checks that sample i is the
// counter value of frame first+i, channel ch (see fakeDevice).
func readCounter(t *testing.T, c *Capture, n int, first uint64, channels, ch int) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 20*time.Second) // a hang guard, not a speed check
	defer cancel()
	p := make([]int16, 37)
	bad := 0
	for i := 0; i < n; {
		k, err := c.ReadContext(ctx, p[:min(len(p), n-i)])
		if err != nil {
			t.Fatalf("after %d of %d samples: %v", i, n, err)
		}
		for _, v := range p[:k] {
			f := first + uint64(i)
			if want := int16(uint16(f*uint64(channels) + uint64(ch))); v != want && bad < 5 {
				bad++
				t.Errorf("sample %d is %d, want %d", i, v, want)
			}
			i++
		}
	}
}

// finish asks c to stop, releases paused and held reads (so the capture
// goroutine does exactly one more read), closes c, checks that Read then drains to
// io.EOF, and returns all diagnostics.
func finish(t *testing.T, c *Capture, dev *fakeDevice) []Diagnostic {
	t.Helper()
	c.stopOnce.Do(func() { close(c.stop) })
	for _, ch := range []chan struct{}{dev.release, dev.unhold} {
		select {
		case <-ch:
		default:
			close(ch)
		}
	}
	ctx, cancel := context.WithTimeout(context.Background(), 20*time.Second)
	defer cancel()
	if err := c.Close(ctx); err != nil {
		t.Fatal(err)
	}
	if err := c.Close(ctx); err != nil {
		t.Errorf("second Close: %v", err)
	}
	p := make([]int16, 4096)
	for {
		_, err := c.Read(p)
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("drain after Close: %v", err)
		}
	}
	var diags []Diagnostic
	for d := range c.Diagnostics() {
		diags = append(diags, d)
	}
	dev.check(t)
	return diags
}

// checkDiags compares diagnostics with the expectations, in order.
func checkDiags(t *testing.T, got []Diagnostic, wants []want) {
	t.Helper()
	ok := len(got) == len(wants)
	for i := 0; ok && i < len(got); i++ {
		ok = wants[i].matches(got[i])
	}
	if !ok {
		var b strings.Builder
		for _, d := range got {
			b.WriteString("\n  " + d.String())
		}
		t.Errorf("diagnostics:%s\nwant %+v", b.String(), wants)
	}
}

func TestLoop(t *testing.T) {
	const F = 100 // frames per read in testConfig
	cases := []struct {
		name      string
		cfg       Config
		opens     []error
		script    func(stream, read int) step
		read      int             // samples the consumer checks
		diags     []want          // expected diagnostics
		waits     []time.Duration // expected back-off waits
		stats     func(Stats) bool
		statsText string
	}{
		{
			name: "mono, every sample in order",
			cfg:  testConfig(nil), read: 20 * F,
			diags: []want{{Kind: KindOpened}},
			stats: func(s Stats) bool {
				return s.Opens == 1 && s.DeviceErrors == 0 && s.InputOverflows == 0 && s.RingLost == 0
			},
			statsText: "one open, no faults",
		},
		{
			name: "stereo, right channel",
			cfg:  testConfig(func(c *Config) { c.Channels, c.Channel = 2, 1 }), read: 20 * F,
			diags: []want{{Kind: KindOpened}},
		},
		{
			name: "input overflow is counted, not fatal",
			cfg:  testConfig(nil), read: 10 * F,
			script: func(s, r int) step {
				if r == 3 {
					return step{err: ErrInputOverflow}
				}
				return step{}
			},
			// the gap lies before the buffer of read 3, whose samples are kept
			diags:     []want{{Kind: KindOpened}, {Kind: KindInputOverflow, SamplePos: 3 * F, StreamPos: 3 * F, Err: true}},
			stats:     func(s Stats) bool { return s.InputOverflows == 1 && s.Opens == 1 && s.DeviceErrors == 0 },
			statsText: "one overflow, still one open",
		},
		{
			name: "device lost, reopened with back-off",
			cfg:  testConfig(nil), read: 10 * F,
			opens: []error{nil, errNotThere, errNotThere, errNotThere},
			script: func(s, r int) step {
				if s == 0 && r == 5 {
					return step{err: errUnplugged}
				}
				return step{}
			},
			diags: []want{
				{Kind: KindOpened},
				{Kind: KindDeviceError, SamplePos: 5 * F, StreamPos: 5 * F, Duration: time.Second, Err: true},
				{Kind: KindOpenFailed, SamplePos: 5 * F, StreamPos: 5 * F, Duration: 2 * time.Second, Attempt: 1, Err: true},
				{Kind: KindOpenFailed, SamplePos: 5 * F, StreamPos: 5 * F, Duration: 4 * time.Second, Attempt: 2, Err: true},
				{Kind: KindOpenFailed, SamplePos: 5 * F, StreamPos: 5 * F, Duration: 8 * time.Second, Attempt: 3, Err: true},
				// down from the failed read to the reopen: 1+2+4+8 s, about 15000 samples at 1 kHz
				{Kind: KindOpened, SamplePos: 5 * F, StreamPos: 5 * F, Duration: 15 * time.Second, Sample: 15000, Attempt: 3},
			},
			waits:     []time.Duration{time.Second, 2 * time.Second, 4 * time.Second, 8 * time.Second},
			stats:     func(s Stats) bool { return s.DeviceErrors == 1 && s.OpenFailures == 3 && s.Opens == 2 },
			statsText: "1 device error, 3 failed opens, 2 opens",
		},
		{
			name: "back-off caps at ReopenMax",
			cfg:  testConfig(func(c *Config) { c.WaitForDevice = true; c.ReopenMax = 5 * time.Second }), read: F,
			opens: []error{errNotThere, errNotThere, errNotThere, errNotThere, errNotThere},
			diags: []want{
				{Kind: KindOpenFailed, Duration: 1 * time.Second, Attempt: 1, Err: true},
				{Kind: KindOpenFailed, Duration: 2 * time.Second, Attempt: 2, Err: true},
				{Kind: KindOpenFailed, Duration: 4 * time.Second, Attempt: 3, Err: true},
				{Kind: KindOpenFailed, Duration: 5 * time.Second, Attempt: 4, Err: true},
				{Kind: KindOpenFailed, Duration: 5 * time.Second, Attempt: 5, Err: true},
				{Kind: KindOpened, Duration: 17 * time.Second, Sample: 17000, Attempt: 5},
			},
			waits: []time.Duration{1 * time.Second, 2 * time.Second, 4 * time.Second, 5 * time.Second, 5 * time.Second},
		},
		{
			name: "back-off resets after a stream ran for ReopenMax",
			cfg:  testConfig(func(c *Config) { c.ReopenMax = 2 * time.Second }), read: 40 * F,
			script: func(s, r int) step {
				switch {
				case s == 0 && r == 30, // after 3 s of good reads
					s == 1 && r == 0, // fails at once: no reset
					s == 2 && r == 0:
					return step{err: errUnplugged}
				}
				return step{}
			},
			diags: []want{
				{Kind: KindOpened},
				{Kind: KindDeviceError, SamplePos: 30 * F, StreamPos: 30 * F, Duration: time.Second, Err: true},
				{Kind: KindOpened, SamplePos: 30 * F, StreamPos: 30 * F, Duration: time.Second, Sample: 1000},
				{Kind: KindDeviceError, SamplePos: 30 * F, StreamPos: 30 * F, Duration: 2 * time.Second, Err: true},
				{Kind: KindOpened, SamplePos: 30 * F, StreamPos: 30 * F, Duration: 2 * time.Second, Sample: 2000},
				{Kind: KindDeviceError, SamplePos: 30 * F, StreamPos: 30 * F, Duration: 2 * time.Second, Err: true},
				{Kind: KindOpened, SamplePos: 30 * F, StreamPos: 30 * F, Duration: 2 * time.Second, Sample: 2000},
			},
			waits: []time.Duration{time.Second, 2 * time.Second, 2 * time.Second},
		},
		{
			name: "slow read reported",
			cfg:  testConfig(nil), read: 5 * F,
			script: func(s, r int) step {
				if r == 2 {
					return step{took: 5 * time.Second}
				}
				return step{}
			},
			diags:     []want{{Kind: KindOpened}, {Kind: KindSlowRead, SamplePos: 3 * F, StreamPos: 2 * F, Duration: 5 * time.Second}},
			stats:     func(s Stats) bool { return s.SlowReads == 1 && s.LongestRead == 5*time.Second },
			statsText: "one slow read of 5 s",
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			noLeak(t)
			clk := newFakeClock()
			dev := newFakeDevice(clk, c.cfg.Rate, c.cfg.Channels)
			dev.opens, dev.script = c.opens, c.script
			dev.hold = c.read / F
			cp, err := start(c.cfg, dev, clk)
			if err != nil {
				t.Fatal(err)
			}
			ch := max(c.cfg.Channel, 0)
			readCounter(t, cp, c.read, 0, c.cfg.Channels, ch)
			diags := finish(t, cp, dev)
			st := cp.Stats()
			checkDiags(t, diags, c.diags)
			if w := clk.recorded(); !slices.Equal(w, c.waits) {
				t.Errorf("back-off waits %v, want %v", w, c.waits)
			}
			if c.stats != nil && !c.stats(st) {
				t.Errorf("stats %+v, want %s", st, c.statsText)
			}
			// The fake delivers c.read samples, then one more read after
			// Close: all of them reach the consumer, none is lost.
			if n := uint64(c.read + F); st.Captured != n || st.Delivered != n || st.Buffered != 0 || st.RingLost != 0 {
				t.Errorf("stats %+v, want %d samples captured and delivered", st, n)
			}
		})
	}
}
