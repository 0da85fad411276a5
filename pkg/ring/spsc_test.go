package ring

import (
	"context"
	"io"
	"runtime"
	"testing"
)

// TestConcurrentCounter runs a producer and a consumer goroutine (meant to
// be run with -race) and checks that every sample arrives in order: the
// producer writes its running position as the sample value, and the
// consumer, stepping over each gap the buffer reports, must see exactly
// that position for every sample it reads.
func TestConcurrentCounter(t *testing.T) {
	cases := []struct {
		name     string
		cap      int
		total    int
		lossless bool // producer writes only what fits (uses Free)
	}{
		{"lossless, small buffer wraps often", 64, 200_000, true},
		{"lossless, roomy buffer", 1 << 14, 200_000, true},
		{"lossy, consumer falls behind", 64, 200_000, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b := mustNew(t, Config{Samples: c.cap})
			src := counter(0, c.total)
			go func() { // producer; ends the stream with Close
				defer b.Close()
				for i, step := 0, 0; i < len(src); step++ {
					n := min(1+step%37, len(src)-i)
					if c.lossless && b.Free() < n {
						runtime.Gosched()
						continue
					}
					b.Write(src[i : i+n])
					i += n
				}
			}()

			var (
				readPos, prodPos uint64
				pending          []Gap // popped but not yet reached
				buf              = make([]int16, 50)
				bad              int
			)
			for step := 0; ; step++ {
				n, err := b.ReadWait(context.Background(), buf[:1+step%50])
				if err == io.EOF {
					break
				}
				if err != nil {
					t.Fatal(err)
				}
				for g, ok := b.NextGap(); ok; g, ok = b.NextGap() {
					pending = append(pending, g)
				}
				for _, v := range buf[:n] {
					for len(pending) > 0 && pending[0].Delivered == readPos {
						if pending[0].Pos != prodPos {
							t.Fatalf("gap at delivered %d says producer position %d, consumer computed %d", readPos, pending[0].Pos, prodPos)
						}
						prodPos += pending[0].Samples
						pending = pending[1:]
					}
					if v != int16(uint16(prodPos)) && bad < 5 {
						bad++
						t.Errorf("sample %d (producer position %d) is %d", readPos, prodPos, v)
					}
					readPos++
					prodPos++
				}
				if !c.lossless && step%3 == 0 {
					runtime.Gosched() // let the producer overrun
				}
			}
			for g, ok := b.NextGap(); ok; g, ok = b.NextGap() {
				pending = append(pending, g)
			}
			for _, g := range pending { // gaps after the last sample
				if g.Delivered != readPos || g.Pos != prodPos {
					t.Errorf("trailing gap %+v at read position %d, producer position %d", g, readPos, prodPos)
				}
				prodPos += g.Samples
			}
			if prodPos != uint64(c.total) {
				t.Errorf("samples read plus gaps = %d, producer wrote %d", prodPos, c.total)
			}
			s := b.Stats()
			if s.Read != readPos || s.Written != readPos || s.Written+s.Lost != uint64(c.total) || s.GapsLost != 0 {
				t.Errorf("stats %+v after reading %d of %d", s, readPos, c.total)
			}
			if c.lossless && s.Lost != 0 {
				t.Errorf("lossless producer lost %d samples", s.Lost)
			}
			t.Logf("read %d, lost %d in %d gaps", s.Read, s.Lost, s.Overruns)
		})
	}
}
