package gate

import (
	"math/rand/v2"
	"testing"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
)

// benchBlock is one pipeline block (pipeline.BlockSamples) of noise.
func benchBlock() []int16 {
	x := make([]int16, 4096)
	sig := noise(0.05, 1)
	for i := range x {
		x[i] = sig(i)
	}
	return x
}

// benchMachine is a gate on the default embedding layout with 20 line
// bands and 8 templates, about what enrolment learns on the simulator.
func benchMachine(tb testing.TB) (*Machine, *embed.Window) {
	tb.Helper()
	fc, ec := simConfigs()
	e, err := embed.New(fc, ec)
	if err != nil {
		tb.Fatal(err)
	}
	layout := e.Layout()
	var bands []int
	for i, d := range layout {
		if d.Part == "fine" && len(bands) < 20 && i+lineReach < len(layout) && layout[i-lineReach].Part == "fine" && i%3 == 0 {
			bands = append(bands, i)
		}
	}
	r := rand.New(rand.NewPCG(1, 1))
	lines := Lines{Bands: bands, Hz: make([]float64, len(bands)), MatchP10: 0.9}
	for range 8 {
		t := make([]float32, len(bands))
		for i := range t {
			t[i] = 12 * r.Float32()
		}
		lines.Templates = append(lines.Templates, t)
	}
	ref := Reference{Level: baseline.LevelStats{MeanDBFS: -25, StdDB: 2}, Layout: layout, Lines: lines}
	g, err := NewMachine(DefaultMachineConfig(), ref)
	if err != nil {
		tb.Fatal(err)
	}
	w := &embed.Window{Vec: lineVec(layout, r, 1, 10, bands[:6]...), LevelDBFS: -26}
	return g, w
}

func BenchmarkSensorObserve(b *testing.B) {
	s, _ := NewSensor(DefaultSensorConfig())
	x := benchBlock()
	b.SetBytes(int64(2 * len(x)))
	b.ReportAllocs()
	for b.Loop() {
		s.Observe(x)
	}
}

// BenchmarkSensorClose closes one interval of one block.
func BenchmarkSensorClose(b *testing.B) {
	s, _ := NewSensor(DefaultSensorConfig())
	x := benchBlock()
	ev := make([]SensorEvent, 0, NumKinds)
	var pos int64
	b.ReportAllocs()
	for b.Loop() {
		s.Observe(x)
		pos += int64(len(x))
		ev = s.Close(pos, ev[:0])
	}
}

func BenchmarkMachineUpdate(b *testing.B) {
	g, w := benchMachine(b)
	ev := make([]MachineEvent, 0, 1)
	b.ReportAllocs()
	for b.Loop() {
		w.Index++
		ev = g.Update(w, ev[:0])
	}
}

// The hot paths do not allocate (with event slices of enough capacity).
func TestNoAllocation(t *testing.T) {
	s, _ := NewSensor(DefaultSensorConfig())
	x := benchBlock()
	ev := make([]SensorEvent, 0, NumKinds)
	g, w := benchMachine(t)
	mev := make([]MachineEvent, 0, 1)
	var pos int64
	tests := []struct {
		name string
		fn   func()
	}{
		{"Sensor.Observe", func() { s.Observe(x) }},
		{"Sensor.Close", func() { s.Observe(x); pos += 4096; ev = s.Close(pos, ev[:0]) }},
		{"Machine.Update", func() { w.Index++; mev = g.Update(w, mev[:0]) }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if n := testing.AllocsPerRun(100, tc.fn); n != 0 {
				t.Errorf("%.1f allocations per call, want 0", n)
			}
		})
	}
}
