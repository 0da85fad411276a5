package ring

import (
	"io"
	"slices"
	"testing"
)

// op is one step of a scripted single-goroutine run: write w samples (the
// next values of the producer counter) or read up to r samples.
type op struct {
	w, r int
	kept int // for writes: samples Write must keep
}

// TestOverrunAccounting drives both ends from one goroutine so that every
// drop is predictable, and checks the samples read, the gaps and the
// counters exactly.
func TestOverrunAccounting(t *testing.T) {
	cases := []struct {
		name  string
		cap   int
		gaps  int
		ops   []op
		want  []uint64 // producer positions of the samples read, in order
		gapsW []Gap
		stats Stats
	}{
		{
			name:  "fits exactly, wraps around",
			cap:   8,
			ops:   []op{{w: 6, kept: 6}, {r: 4}, {w: 6, kept: 6}, {r: 100}},
			want:  seq(0, 12),
			stats: Stats{Written: 12, Read: 12},
		},
		{
			name: "one overrun inside a block",
			cap:  8,
			ops:  []op{{w: 5, kept: 5}, {w: 5, kept: 3}, {r: 100}, {w: 2, kept: 2}, {r: 100}},
			want: append(seq(0, 8), seq(10, 2)...),
			// lost samples 8 and 9; the gap ends at the next kept write
			gapsW: []Gap{{Pos: 8, Delivered: 8, Samples: 2}},
			stats: Stats{Written: 10, Read: 10, Lost: 2, Overruns: 1},
		},
		{
			name: "drops over several writes merge into one gap",
			cap:  8,
			ops: []op{
				{w: 8, kept: 8}, {w: 3, kept: 0}, {w: 4, kept: 0}, {r: 3},
				{w: 5, kept: 3}, // 15,16,17 kept; 18,19 dropped: a second gap
				{r: 100}, {w: 1, kept: 1}, {r: 100},
			},
			want:  append(append(seq(0, 8), seq(15, 3)...), 20),
			gapsW: []Gap{{Pos: 8, Delivered: 8, Samples: 7}, {Pos: 18, Delivered: 11, Samples: 2}},
			stats: Stats{Written: 12, Read: 12, Lost: 9, Overruns: 2},
		},
		{
			name:  "block larger than the buffer",
			cap:   4,
			ops:   []op{{w: 10, kept: 4}, {r: 100}, {w: 2, kept: 2}, {r: 100}},
			want:  append(seq(0, 4), 10, 11),
			gapsW: []Gap{{Pos: 4, Delivered: 4, Samples: 6}},
			stats: Stats{Written: 6, Read: 6, Lost: 6, Overruns: 1},
		},
		{
			name:  "gap still open at Close is queued by Close",
			cap:   4,
			ops:   []op{{w: 4, kept: 4}, {w: 3, kept: 0}, {r: 100}},
			want:  seq(0, 4),
			gapsW: []Gap{{Pos: 4, Delivered: 4, Samples: 3}},
			stats: Stats{Written: 4, Read: 4, Lost: 3, Overruns: 1},
		},
		{
			name: "full gap queue counts lost gaps",
			cap:  2,
			gaps: 2,
			ops: []op{
				{w: 3, kept: 2}, {r: 1}, {w: 2, kept: 1}, {r: 1}, {w: 2, kept: 1}, {r: 1}, {w: 2, kept: 1}, {r: 100},
			},
			// gaps at positions 2, 4, 6 and 8, one sample each; the
			// queue holds two and is not
			// read until the end, so the gap ended by the last write
			// and the one ended by Close are lost
			want:  []uint64{0, 1, 3, 5, 7},
			gapsW: []Gap{{Pos: 2, Delivered: 2, Samples: 1}, {Pos: 4, Delivered: 3, Samples: 1}},
			stats: Stats{Written: 5, Read: 5, Lost: 4, Overruns: 4, GapsLost: 2},
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b := mustNew(t, Config{Samples: c.cap, Gaps: c.gaps})
			var pos uint64
			var got []int16
			buf := make([]int16, 100)
			for i, o := range c.ops {
				if o.w > 0 {
					if k := b.Write(counter(pos, o.w)); k != o.kept {
						t.Fatalf("op %d: Write(%d) kept %d, want %d", i, o.w, k, o.kept)
					}
					pos += uint64(o.w)
					continue
				}
				n, err := b.Read(buf[:o.r])
				if err != nil {
					t.Fatalf("op %d: Read: %v", i, err)
				}
				got = append(got, buf[:n]...)
			}
			b.Close()
			if n, err := b.Read(buf); n != 0 || err != io.EOF {
				t.Fatalf("Read after Close and drain: %d, %v; want 0, EOF", n, err)
			}
			want := make([]int16, len(c.want))
			for i, p := range c.want {
				want[i] = int16(p)
			}
			if !slices.Equal(got, want) {
				t.Errorf("read %v, want %v", got, want)
			}
			var gaps []Gap
			for g, ok := b.NextGap(); ok; g, ok = b.NextGap() {
				gaps = append(gaps, g)
			}
			if !slices.Equal(gaps, c.gapsW) {
				t.Errorf("gaps %+v, want %+v", gaps, c.gapsW)
			}
			if s := b.Stats(); s != c.stats {
				t.Errorf("stats %+v, want %+v", s, c.stats)
			}
			if s := b.Stats(); s.Written+s.Lost != pos {
				t.Errorf("Written+Lost = %d, producer position %d", s.Written+s.Lost, pos)
			}
		})
	}
}

// seq returns n consecutive positions from start.
func seq(start uint64, n int) []uint64 {
	s := make([]uint64, n)
	for i := range s {
		s[i] = start + uint64(i)
	}
	return s
}
