package embed

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/auscult/auscult/pkg/features"
)

// testSignal is a machine-like test signal: a few tones and noise.
func testSignal(n int, gain float64, seed uint64) []int16 {
	r := rand.New(rand.NewPCG(seed, 1))
	out := make([]int16, n)
	for i := range out {
		t := float64(i) / 16000
		v := 0.2*math.Sin(2*math.Pi*147*t) + 0.1*math.Sin(2*math.Pi*49*t) +
			0.05*math.Sin(2*math.Pi*3100*t) + 0.05*r.NormFloat64()
		out[i] = int16(max(min(v*gain*32767, 32767), -32768))
	}
	return out
}

type collected struct {
	idx        []int64
	start, end []int64
	vecs       [][]float32
	levels     []float64
}

func collect(t *testing.T, e *Embedder, x []int16, blocks func() int) collected {
	t.Helper()
	var c collected
	emit := func(w *Window) {
		c.idx = append(c.idx, w.Index)
		c.start = append(c.start, w.Start)
		c.end = append(c.end, w.End)
		c.vecs = append(c.vecs, append([]float32(nil), w.Vec...))
		c.levels = append(c.levels, w.LevelDBFS)
	}
	for len(x) > 0 {
		n := min(blocks(), len(x))
		e.Push(x[:n], emit)
		x = x[n:]
	}
	e.Flush(emit)
	return c
}

func mustNew(t testing.TB, ec Config) *Embedder {
	e, err := New(features.DefaultConfig(), ec)
	if err != nil {
		t.Fatal(err)
	}
	return e
}

func TestWindowTiming(t *testing.T) {
	e := mustNew(t, DefaultConfig())
	sub := int64(e.SubWindowSamples())
	x := testSignal(int(12*sub)+100, 1, 1)
	c := collect(t, e, x, func() int { return 4096 })
	// 12 whole sub-windows, windows of 5 every 2: starts at 0, 2, 4, 6.
	if len(c.idx) != 4 {
		t.Fatalf("got %d windows, want 4", len(c.idx))
	}
	for i := range c.idx {
		if c.idx[i] != int64(i) || c.start[i] != int64(2*i)*sub || c.end[i] != c.start[i]+5*sub {
			t.Errorf("window %d: index %d span [%d, %d)", i, c.idx[i], c.start[i], c.end[i])
		}
	}
}

func TestBlockSizeIndependence(t *testing.T) {
	x := testSignal(16000*11, 1, 2)
	ref := collect(t, mustNew(t, DefaultConfig()), x, func() int { return len(x) })
	r := rand.New(rand.NewPCG(3, 4))
	got := collect(t, mustNew(t, DefaultConfig()), x, func() int { return 1 + r.IntN(3000) })
	if len(ref.vecs) == 0 || len(got.vecs) != len(ref.vecs) {
		t.Fatalf("window counts %d and %d", len(ref.vecs), len(got.vecs))
	}
	for i := range ref.vecs {
		for d := range ref.vecs[i] {
			if ref.vecs[i][d] != got.vecs[i][d] {
				t.Fatalf("window %d dim %d: %v vs %v", i, d, ref.vecs[i][d], got.vecs[i][d])
			}
		}
	}
}

// A gain change of 6 dB must move the level by 6 dB and the embedding
// input by (almost) nothing: the level normalisation removes it.
func TestGainInvariance(t *testing.T) {
	n := 16000 * 8
	a := collect(t, mustNew(t, DefaultConfig()), testSignal(n, 0.5, 5), func() int { return 4096 })
	b := collect(t, mustNew(t, DefaultConfig()), testSignal(n, 1, 5), func() int { return 4096 })
	if d := b.levels[0] - a.levels[0]; math.Abs(d-6.02) > 0.05 {
		t.Errorf("level moved %.3f dB for a 6.02 dB gain change", d)
	}
	var worst float64
	for d := range a.vecs[0] {
		worst = max(worst, math.Abs(float64(a.vecs[0][d]-b.vecs[0][d])))
	}
	if worst > 0.5 {
		t.Errorf("embedding input moved up to %.3f dB for a 6 dB gain change", worst)
	}
}

// A full-scale sine reads 0 dBFS (AES17 convention).
func TestLevelOfFullScaleSine(t *testing.T) {
	x := make([]int16, 16000*6)
	for i := range x {
		x[i] = int16(32767 * math.Sin(2*math.Pi*1000*float64(i)/16000))
	}
	c := collect(t, mustNew(t, DefaultConfig()), x, func() int { return 1000 })
	if math.Abs(c.levels[0]) > 0.01 {
		t.Errorf("full-scale sine level %.4f dBFS, want 0", c.levels[0])
	}
}

func TestShortStreamGetsOneWindow(t *testing.T) {
	e := mustNew(t, DefaultConfig())
	sub := e.SubWindowSamples()
	// Frames of the last sub-window reach half a frame into the next one.
	c := collect(t, e, testSignal(3*sub+features.DefaultConfig().FrameLen/2, 1, 6), func() int { return 777 })
	if len(c.vecs) != 1 || c.end[0] != int64(3*sub) {
		t.Fatalf("got %d windows (end %v), want one over 3 sub-windows", len(c.vecs), c.end)
	}
	c = collect(t, e, testSignal(sub-1, 1, 6), func() int { return 777 })
	if len(c.vecs) != 0 {
		t.Fatalf("less than a sub-window gave %d windows", len(c.vecs))
	}
}

// One ringing clank inside a window moves the default embedding input by
// less than half the natural difference between two clean windows (the low
// quantile over frames and the trimmed mean over sub-windows both ignore
// it), while a plain mean over frames is pushed beyond that difference.
func TestOneClankBarelyMovesTheWindow(t *testing.T) {
	sub := mustNew(t, DefaultConfig()).SubWindowSamples()
	clean := testSignal(5*sub, 0.5, 7)
	other := testSignal(5*sub, 0.5, 8)
	noisy := append([]int16(nil), clean...)
	for i := 2*sub + 1000; i < 2*sub+13000; i++ { // a ringing clank inside the middle sub-window
		noisy[i] = int16(max(-32768, min(32767, float64(noisy[i])+20000*math.Exp(-float64(i-2*sub-1000)/3000)*math.Sin(float64(i)*0.9))))
	}
	dist := func(x, y []float32) (s float64) {
		for i := range x {
			s += float64(x[i]-y[i]) * float64(x[i]-y[i])
		}
		return math.Sqrt(s)
	}
	plain := DefaultConfig()
	plain.Mean, plain.Low, plain.Fine, plain.Trim = true, false, false, 0
	for _, c := range []struct {
		name    string
		cfg     Config
		maxRel  float64
		atLeast bool
	}{{"default", DefaultConfig(), 0.5, false}, {"plain mean", plain, 1, true}} {
		vec := func(x []int16) []float32 {
			return collect(t, mustNew(t, c.cfg), x, func() int { return 4096 }).vecs[0]
		}
		base := vec(clean)
		rel := dist(base, vec(noisy)) / dist(base, vec(other))
		t.Logf("%s: %.2f", c.name, rel)
		if c.atLeast != (rel > c.maxRel) {
			t.Errorf("%s: clank moved the window %.2f times the natural difference", c.name, rel)
		}
	}
}

func TestPushDoesNotAllocate(t *testing.T) {
	e := mustNew(t, DefaultConfig())
	x := testSignal(4096, 1, 8)
	emit := func(*Window) {}
	e.Push(x, emit)
	if a := testing.AllocsPerRun(200, func() { e.Push(x, emit) }); a != 0 {
		t.Errorf("Push allocates %.1f times per call", a)
	}
}

func TestLayout(t *testing.T) {
	e := mustNew(t, DefaultConfig())
	l := e.Layout()
	if len(l) != e.Dim() {
		t.Fatalf("layout has %d entries for %d dimensions", len(l), e.Dim())
	}
	for i, d := range l {
		if !(d.HiHz > d.LoHz) {
			t.Errorf("dim %d (%s): band %g..%g Hz", i, d.Part, d.LoHz, d.HiHz)
		}
	}
	if l[len(l)-1].Part != "fine" || l[len(l)-1].HiHz > 1300 {
		t.Errorf("last dimension %+v, want the top of the fine view near 1200 Hz", l[len(l)-1])
	}
}

func TestConfigErrors(t *testing.T) {
	for name, mod := range map[string]func(*Config){
		"sub_hops":  func(c *Config) { c.SubHops = 3 },
		"step":      func(c *Config) { c.Step = 9 },
		"trim":      func(c *Config) { c.Trim = 3 },
		"fine band": func(c *Config) { c.FineFMax = 10 },
		"window":    func(c *Config) { c.Window = 0 },
	} {
		t.Run(name, func(t *testing.T) {
			c := DefaultConfig()
			mod(&c)
			if _, err := New(features.DefaultConfig(), c); err == nil {
				t.Fatal("accepted")
			}
		})
	}
}

func BenchmarkEmbedderPush(b *testing.B) {
	e := mustNew(b, DefaultConfig())
	x := testSignal(16000, 1, 9)
	emit := func(*Window) {}
	b.SetBytes(int64(2 * len(x)))
	b.ReportAllocs()
	for b.Loop() {
		e.Push(x, emit)
	}
	b.ReportMetric(float64(b.N)*float64(len(x))/16000/b.Elapsed().Seconds(), "x_realtime")
}

func TestKthSmallest(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	buf := make([]float32, 40)
	for trial := 0; trial < 200; trial++ {
		n := 1 + r.IntN(40)
		stride := 1 + r.IntN(3)
		x := make([]float32, n*stride)
		for i := range x {
			x[i] = float32(r.IntN(20)) // ties included
		}
		col := make([]float32, n)
		for i := range col {
			col[i] = x[i*stride]
		}
		insertionSort(col)
		k := r.IntN(n)
		if got := kthSmallest(x, stride, n, k, buf); got != col[k] {
			t.Fatalf("n %d k %d: got %v, sorted says %v", n, k, got, col[k])
		}
	}
}
