package capture

import "testing"

// BenchmarkPipeline measures one 100 ms block (1600 frames at 16 kHz,
// stereo, mixed) from a free-running fake device through the capture
// goroutine and the ring to the consumer. allocs/op counts allocations in
// the whole process, so 0 means neither goroutine allocates per block.
func BenchmarkPipeline(b *testing.B) {
	cfg, err := Config{Rate: 16000, Channels: 2, Channel: -1}.withDefaults()
	if err != nil {
		b.Fatal(err)
	}
	clk := newFakeClock()
	dev := newFakeDevice(clk, cfg.Rate, cfg.Channels)
	c, err := start(cfg, dev, clk)
	if err != nil {
		b.Fatal(err)
	}
	p := make([]int16, cfg.FramesPerRead)
	b.ReportAllocs()
	b.SetBytes(int64(2 * len(p)))
	for b.Loop() {
		for n := 0; n < len(p); {
			k, err := c.Read(p[n:])
			if err != nil {
				b.Fatal(err)
			}
			n += k
		}
	}
	b.StopTimer()
	c.stopOnce.Do(func() { close(c.stop) })
	close(dev.release)
	close(dev.unhold)
	<-c.done
}
