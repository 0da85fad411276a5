package ring

import (
	"context"
	"fmt"
	"io"
	"runtime"
	"testing"
)

// BenchmarkWriteRead measures one Write and one Read of a block from the
// same goroutine: the cost of the hand-over itself.
func BenchmarkWriteRead(b *testing.B) {
	for _, block := range []int{160, 1024} {
		b.Run(fmt.Sprintf("block=%d", block), func(b *testing.B) {
			r := mustNew(b, Config{Samples: 1 << 15})
			in := counter(0, block)
			out := make([]int16, block)
			b.ReportAllocs()
			b.SetBytes(int64(2 * block))
			for b.Loop() {
				r.Write(in)
				r.Read(out)
			}
		})
	}
}

// BenchmarkSPSC measures throughput with a producer goroutine writing
// 1024-sample blocks (only when they fit) and the benchmark goroutine
// reading with ReadWait.
func BenchmarkSPSC(b *testing.B) {
	const block = 1024
	r := mustNew(b, Config{Samples: 1 << 15})
	in := counter(0, block)
	out := make([]int16, block)
	blocks := b.N
	go func() {
		defer r.Close()
		for i := 0; i < blocks; {
			if r.Free() < block {
				runtime.Gosched()
				continue
			}
			r.Write(in)
			i++
		}
	}()
	b.ReportAllocs()
	b.SetBytes(2 * block)
	b.ResetTimer()
	for {
		if _, err := r.ReadWait(context.Background(), out); err == io.EOF {
			break
		}
	}
}
