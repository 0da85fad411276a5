package pipeline

import (
	"math"
	"math/rand/v2"
	"path/filepath"
	"testing"

	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/features"
)

// machine writes a machine-like test recording: tones and noise.
func machine(t testing.TB, path string, seconds float64, seed uint64) {
	t.Helper()
	r := rand.New(rand.NewPCG(seed, 1))
	x := make([]int16, int(seconds*16000))
	a, f := 0.1*(0.7+0.6*r.Float64()), 147*(0.97+0.06*r.Float64())
	for i := range x {
		tt := float64(i) / 16000
		wob := 1 + 0.3*math.Sin(2*math.Pi*0.13*tt+float64(seed))
		v := a*math.Sin(2*math.Pi*f*tt) + 0.05*wob*math.Sin(2*math.Pi*49*tt) + 0.03*wob*r.NormFloat64()
		x[i] = int16(v * 32767)
	}
	if err := audio.WriteWAV(path, 16000, x); err != nil {
		t.Fatal(err)
	}
}

func enrolled(t testing.TB, dir string) *baseline.Baseline {
	t.Helper()
	dense := embed.DefaultConfig()
	dense.Step = 1 // as enrolment does: a window at every sub-window
	p, err := New(features.DefaultConfig(), dense)
	if err != nil {
		t.Fatal(err)
	}
	var vecs [][]float32
	var groups []int
	for g := 0; g < 6; g++ {
		path := filepath.Join(dir, "h.wav")
		machine(t, path, 30, uint64(g))
		r, err := audio.OpenWAV(path, -1)
		if err != nil {
			t.Fatal(err)
		}
		err = p.Run(r, func(w *embed.Window, _ float64) error {
			vecs = append(vecs, append([]float32(nil), w.Vec...))
			groups = append(groups, g)
			return nil
		})
		r.Close()
		if err != nil {
			t.Fatal(err)
		}
	}
	co := baseline.CalibrationOptions{FalseAlarmProb: 0.01, K: 3, N: 5, StepSeconds: 2, Folds: 3}
	mo := baseline.DefaultModelOptions()
	mo.Redundancy = float64(dense.Window)
	m, c, err := baseline.Enroll(vecs, groups, mo, co)
	if err != nil {
		t.Fatal(err)
	}
	return &baseline.Baseline{Features: features.DefaultConfig(), Embed: embed.DefaultConfig(), Model: m, Calib: c}
}

// The pipeline's windows are the embedder's windows, scored by the model.
func TestRunScoresEveryWindow(t *testing.T) {
	dir := t.TempDir()
	b := enrolled(t, dir)
	p, err := ForBaseline(b)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "t.wav")
	machine(t, path, 20, 99)
	r, _ := audio.OpenWAV(path, -1)
	defer r.Close()
	s := b.Model.NewScorer()
	n := 0
	err = p.Run(r, func(w *embed.Window, score float64) error {
		n++
		if d := s.Distance(w.Vec); d != score || !(score >= 0 && score < 1) {
			t.Errorf("window %d: score %v, model says %v", w.Index, score, d)
		}
		return nil
	})
	// 20 s hold 19 whole sub-windows: windows start at 0, 2, ..., 14.
	if err != nil || n != 8 || p.SamplesRead() != 320000 {
		t.Fatalf("err %v, %d windows, %d samples", err, n, p.SamplesRead())
	}
}

func TestRunRefusesWrongRate(t *testing.T) {
	p, _ := New(features.DefaultConfig(), embed.DefaultConfig())
	if err := p.Run(audio.NewSliceSource(8000, make([]int16, 100)), nil); err == nil {
		t.Fatal("accepted an 8 kHz source for a 16 kHz pipeline")
	}
}

// BenchmarkFilePipeline times decode, features, embedding and scoring of a
// 60 s WAV file and reports the realtime factor.
func BenchmarkFilePipeline(b *testing.B) {
	dir := b.TempDir()
	bl := enrolled(b, dir)
	path := filepath.Join(dir, "bench.wav")
	machine(b, path, 60, 7)
	p, _ := ForBaseline(bl)
	emit := func(*embed.Window, float64) error { return nil }
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		r, err := audio.OpenWAV(path, -1)
		if err != nil {
			b.Fatal(err)
		}
		if err := p.Run(r, emit); err != nil {
			b.Fatal(err)
		}
		r.Close()
	}
	b.ReportMetric(60*float64(b.N)/b.Elapsed().Seconds(), "x_realtime")
}
