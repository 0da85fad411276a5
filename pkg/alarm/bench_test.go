package alarm_test

import (
	"math/rand/v2"
	"runtime"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
)

// benchWindows returns windows whose scores wander across both levels, so
// the benchmark passes through raises, severity changes and clears.
func benchWindows(n int) []alarm.Window {
	rng := rand.New(rand.NewPCG(492, 2))
	ws := make([]alarm.Window, n)
	level := 0.3
	for i := range ws {
		if i%200 == 0 {
			level = []float64{0.3, 0.43, 0.6}[rng.IntN(3)]
		}
		ws[i] = alarm.Window{Score: level + 0.04*rng.NormFloat64(), Running: i%97 != 0, SampleIndex: int64(i) * hop, NBands: 3}
	}
	return ws
}

func BenchmarkObserve(b *testing.B) {
	tr, err := alarm.NewTracker(testConfig(true))
	if err != nil {
		b.Fatal(err)
	}
	ws := benchWindows(4096)
	dst := make([]alarm.Event, 0, 4)
	events, i := 0, 0
	b.ReportAllocs()
	for b.Loop() {
		dst = tr.Observe(dst[:0], t0.Add(time.Duration(i)*step), ws[i%len(ws)])
		events += len(dst)
		i++
	}
	b.ReportMetric(float64(events)/float64(i), "events/op")
}

// The per-window path and successful operator actions must not allocate.
// Mallocs are counted over the whole run (testing.AllocsPerRun would round
// an occasional allocation down to zero).
func TestNoAllocation(t *testing.T) {
	tr, err := alarm.NewTracker(testConfig(true))
	if err != nil {
		t.Fatal(err)
	}
	ws := benchWindows(4096)
	dst := make([]alarm.Event, 0, 4)
	var seen [8]bool // by Kind
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(1))
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	for i, w := range ws {
		now := t0.Add(time.Duration(i) * step)
		dst = tr.Observe(dst[:0], now, w)
		for _, e := range dst {
			seen[e.Kind] = true
		}
		var err error
		switch {
		case tr.State() == alarm.StateUnacked && i%50 == 0:
			dst, err = tr.Acknowledge(dst[:0], now, "m.ilves")
		case i%1000 == 500:
			dst, err = tr.Shelve(dst[:0], now, time.Minute, "seal flush", "m.ilves")
		case i%1000 == 510:
			dst, err = tr.Unshelve(dst[:0], now, "m.ilves")
		}
		if err != nil {
			t.Fatalf("window %d: %v", i, err)
		}
		for _, e := range dst {
			seen[e.Kind] = true
		}
	}
	runtime.ReadMemStats(&after)
	if n := after.Mallocs - before.Mallocs; n != 0 {
		t.Errorf("%d allocations over %d windows, want 0", n, len(ws))
	}
	for k := alarm.Raised; k <= alarm.SeverityChanged; k++ {
		if !seen[k] {
			t.Errorf("no %s event: the run did not exercise every path", k)
		}
	}
}
