package ring

import (
	"context"
	"errors"
	"io"
	"slices"
	"testing"
)

// TestReadWait checks each way ReadWait can return. The action runs in
// another goroutine, so in most runs the consumer is already waiting when
// it happens; either way the result must be the same.
func TestReadWait(t *testing.T) {
	cases := []struct {
		name    string
		before  []int16 // written before ReadWait starts
		action  func(b *Buffer, cancel context.CancelFunc)
		p       int // len of the read buffer
		want    []int16
		wantErr error
	}{
		{"data already there", []int16{1, 2, 3}, func(*Buffer, context.CancelFunc) {}, 8, []int16{1, 2, 3}, nil},
		{"woken by Write", nil, func(b *Buffer, _ context.CancelFunc) { b.Write([]int16{7, 8}) }, 8, []int16{7, 8}, nil},
		{"short buffer takes a prefix", nil, func(b *Buffer, _ context.CancelFunc) { b.Write([]int16{7, 8, 9}) }, 2, []int16{7, 8}, nil},
		{"woken by Close", nil, func(b *Buffer, _ context.CancelFunc) { b.Close() }, 8, nil, io.EOF},
		{"data before Close comes first", []int16{4}, func(b *Buffer, _ context.CancelFunc) { b.Close() }, 8, []int16{4}, nil},
		{"context cancelled", nil, func(_ *Buffer, cancel context.CancelFunc) { cancel() }, 8, nil, context.Canceled},
		{"empty p returns at once", nil, func(*Buffer, context.CancelFunc) {}, 0, nil, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b := mustNew(t, Config{Samples: 16})
			ctx, cancel := context.WithCancel(context.Background())
			t.Cleanup(cancel)
			b.Write(c.before)
			done := make(chan struct{})
			go func() { defer close(done); c.action(b, cancel) }()
			p := make([]int16, c.p)
			n, err := b.ReadWait(ctx, p)
			<-done
			if !errors.Is(err, c.wantErr) {
				t.Fatalf("error %v, want %v", err, c.wantErr)
			}
			if !slices.Equal(p[:n], c.want) {
				t.Errorf("read %v, want %v", p[:n], c.want)
			}
		})
	}
}

func TestDrainThenEOF(t *testing.T) {
	b := mustNew(t, Config{Samples: 8})
	b.Write([]int16{1, 2, 3, 4, 5})
	b.Close()
	b.Close() // second Close does nothing
	p := make([]int16, 2)
	var got []int16
	for {
		n, err := b.ReadWait(context.Background(), p)
		got = append(got, p[:n]...)
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
	}
	if !slices.Equal(got, []int16{1, 2, 3, 4, 5}) {
		t.Errorf("drained %v", got)
	}
	if n, err := b.Read(p); n != 0 || err != io.EOF {
		t.Errorf("Read after EOF: %d, %v", n, err)
	}
}

func TestWriteAfterClosePanics(t *testing.T) {
	b := mustNew(t, Config{Samples: 8})
	b.Close()
	defer func() {
		if r := recover(); r != "ring: Write after Close" {
			t.Errorf("recovered %v", r)
		}
	}()
	b.Write([]int16{1})
}

// TestNoAllocations checks the hot path: Write (with and without drops),
// Read, ReadWait with data, NextGap and Stats allocate nothing after New.
func TestNoAllocations(t *testing.T) {
	b := mustNew(t, Config{Samples: 1024})
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	in := counter(0, 700)
	out := make([]int16, 700)
	allocs := testing.AllocsPerRun(200, func() {
		b.Write(in)
		b.Write(in) // overruns: 324 kept, 376 dropped
		b.Read(out)
		b.ReadWait(ctx, out)
		b.NextGap()
		b.Stats()
	})
	if allocs != 0 {
		t.Errorf("%v allocations per run, want 0", allocs)
	}
	if b.Stats().Overruns == 0 {
		t.Error("the run never overran, so the drop path was not measured")
	}
}
