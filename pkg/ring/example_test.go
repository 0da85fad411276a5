package ring_test

import (
	"fmt"

	"github.com/auscult/auscult/pkg/ring"
)

// A consumer that fell behind learns where its stream has a hole.
func Example() {
	b, err := ring.New(ring.Config{Samples: 4096})
	if err != nil {
		panic(err)
	}
	block := make([]int16, 1600) // 100 ms at 16 kHz
	for range 4 {
		b.Write(block) // the third block finds room for 896 samples, the fourth none
	}
	out := make([]int16, 4096)
	n, _ := b.Read(out)
	b.Write(block) // room again: the gap ends and is queued
	for g, ok := b.NextGap(); ok; g, ok = b.NextGap() {
		fmt.Printf("read %d samples; gap of %d samples at sample %d (after delivered sample %d)\n", n, g.Samples, g.Pos, g.Delivered)
	}
	s := b.Stats()
	fmt.Printf("written %d, lost %d in %d overrun(s)\n", s.Written, s.Lost, s.Overruns)
	// Output:
	// read 4096 samples; gap of 2304 samples at sample 4096 (after delivered sample 4096)
	// written 5696, lost 2304 in 1 overrun(s)
}
