package features

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// collect runs a Framer over signal split into blocks of the given sizes
// (cycled) and returns copies of the frames.
func collect(frameLen, hop int, signal []int16, sizes func() int) [][]int16 {
	f := NewFramer(frameLen, hop)
	var frames [][]int16
	emit := func(fr []int16) { frames = append(frames, slices.Clone(fr)) }
	for i := 0; i < len(signal); {
		n := min(sizes(), len(signal)-i)
		f.Push(signal[i:i+n], emit)
		i += n
	}
	return frames
}

// TestFramerBlockIndependent checks that random block sizes give the
// frames signal[k*hop : k*hop+frameLen] for every complete k, by
// definition of framing.
func TestFramerBlockIndependent(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	signal := make([]int16, 20000)
	for i := range signal {
		signal[i] = int16(rng.IntN(65536) - 32768)
	}
	for _, tc := range []struct {
		name          string
		frameLen, hop int
		maxBlock      int
	}{
		{"1024/512 small blocks", 1024, 512, 300},
		{"1024/512 large blocks", 1024, 512, 5000},
		{"1024/512 single samples", 1024, 512, 1},
		{"1024/256", 1024, 256, 2000},
		{"256/256 no overlap", 256, 256, 700},
		{"64/100 gaps", 64, 100, 150},
		{"1000/333 odd", 1000, 333, 1500},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var want [][]int16
			for s := 0; s+tc.frameLen <= len(signal); s += tc.hop {
				want = append(want, signal[s:s+tc.frameLen])
			}
			for trial := 0; trial < 5; trial++ {
				got := collect(tc.frameLen, tc.hop, signal, func() int { return 1 + rng.IntN(tc.maxBlock) })
				if len(got) != len(want) {
					t.Fatalf("trial %d: %d frames, want %d", trial, len(got), len(want))
				}
				for k := range want {
					if !slices.Equal(got[k], want[k]) {
						t.Fatalf("trial %d: frame %d differs", trial, k)
					}
				}
			}
		})
	}
}

// TestFramerReset checks that Reset starts a new stream.
func TestFramerReset(t *testing.T) {
	f := NewFramer(4, 2)
	n := 0
	f.Push([]int16{1, 2, 3}, func([]int16) { n++ })
	f.Reset()
	var got []int16
	f.Push([]int16{9, 8, 7, 6}, func(fr []int16) { got = slices.Clone(fr) })
	if n != 0 || !slices.Equal(got, []int16{9, 8, 7, 6}) {
		t.Errorf("after Reset got %v (earlier frames %d)", got, n)
	}
}

// TestFramerNoAlloc checks that Push does not allocate.
func TestFramerNoAlloc(t *testing.T) {
	f := NewFramer(1024, 512)
	block := make([]int16, 700)
	sum := 0
	emit := func(fr []int16) { sum += int(fr[0]) }
	if a := testing.AllocsPerRun(200, func() { f.Push(block, emit) }); a != 0 {
		t.Errorf("%v allocations per Push, want 0", a)
	}
}

// TestNewFramerPanics checks the argument contract.
func TestNewFramerPanics(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Error("no panic for hop 0")
		}
	}()
	NewFramer(16, 0)
}
