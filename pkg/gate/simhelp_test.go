package gate

import (
	"io"
	"math"
	"testing"

	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/features"
	"github.com/auscult/auscult/pkg/pipeline"
	"github.com/auscult/auscult/pkg/sim"
)

const (
	simRate = 16000
	// simChunk is the length of one sim.Stream chunk in samples (10 s at
	// 16 kHz, see sim.Stream): SetStopped and SetCondition take effect at
	// the next multiple of it.
	simChunk = 10 * simRate
)

// chunkPlan says what the machine does during one 10 s chunk.
type chunkPlan struct {
	stopped  bool
	setpoint float64 // Hz
	gainDB   float64 // applied to the stream's samples, as a gain drift would
	fault    string  // sim fault name, "" for healthy
	severity string
}

// scripted is an audio.Source reading a sim.Stream for a fixed number of
// chunks, switching the stream's conditions exactly at chunk boundaries.
type scripted struct {
	s    *sim.Stream
	plan func(chunk int) chunkPlan
	n    int64 // chunks to read
	at   int64
}

var _ audio.Source = (*scripted)(nil)

func (r *scripted) Rate() int { return r.s.Rate() }

func (r *scripted) Read(p []int16) (int, error) {
	end := r.n * simChunk
	if r.at >= end {
		return 0, io.EOF
	}
	p = p[:min(int64(len(p)), end-r.at)]
	// The stream renders chunk k when the read reaches k*simChunk.
	if k := (r.at + simChunk - 1) / simChunk; k*simChunk < r.at+int64(len(p)) {
		c := r.plan(int(k))
		r.s.SetStopped(c.stopped)
		r.s.SetCondition(c.setpoint, c.fault, c.severity)
	}
	n, _ := r.s.Read(p)
	for i := range p[:n] {
		g := r.plan(int((r.at + int64(i)) / simChunk)).gainDB
		if g != 0 {
			v := math.Round(float64(p[i]) * math.Pow(10, g/20))
			p[i] = int16(max(-32768, min(32767, v)))
		}
	}
	r.at += int64(n)
	return n, nil
}

// simConfigs are the analysis settings the agent's enrol command uses at
// 16 kHz (agent/enroll.go: 1024-sample frames, mel bands up to the
// resampler's passband, parts low and fine).
func simConfigs() (features.Config, embed.Config) {
	fc := features.DefaultConfig()
	fc.FMax = audio.ResamplePassband * float64(fc.Rate) / 2
	return fc, embed.DefaultConfig()
}

// enrolSim enrols machine m at the given SNR from seconds of healthy
// stream cycling through all set-points in 30 s blocks, the way the agent
// enrols (dense windows, 60 s calibration blocks), and returns the
// baseline and the gate's reference.
func enrolSim(t testing.TB, m sim.Machine, snr float64, seconds int) (*baseline.Baseline, Reference) {
	t.Helper()
	fc, ec := simConfigs()
	dense := ec
	dense.Step = 1
	p, err := pipeline.New(fc, dense)
	if err != nil {
		t.Fatal(err)
	}
	ll, err := NewLineLearner(p.Embedder().Layout(), DefaultLearnConfig())
	if err != nil {
		t.Fatal(err)
	}
	sp := m.Setpoints
	src := &scripted{s: sim.NewStream(m, sim.Clip{SNRdB: snr, SetpointHz: sp[0], Seed: 11}, simRate),
		n: int64(seconds / 10), plan: func(k int) chunkPlan { return chunkPlan{setpoint: sp[(k/3)%len(sp)]} }}
	var vecs [][]float32
	var groups []int
	var levels []float64
	err = p.Run(src, func(w *embed.Window, _ float64) error {
		vecs = append(vecs, append([]float32(nil), w.Vec...))
		groups = append(groups, int(w.Start/(60*simRate)))
		levels = append(levels, w.LevelDBFS)
		ll.Add(w.Vec)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	mo := baseline.DefaultModelOptions()
	mo.Redundancy = float64(ec.Window) / float64(dense.Step)
	step := float64(ec.Step*ec.SubHops*fc.Hop) / float64(fc.Rate)
	co := baseline.CalibrationOptions{FalseAlarmProb: 0.002, WarnProb: 0.02, K: 3, N: 5, StepSeconds: step, Folds: 5}
	model, cal, err := baseline.Enroll(vecs, groups, mo, co)
	if err != nil {
		t.Fatal(err)
	}
	lines, err := ll.Lines()
	if err != nil {
		t.Fatal(err)
	}
	b := &baseline.Baseline{Features: fc, Embed: ec, Options: mo, Calib: cal, Level: baseline.Levels(levels), Model: model}
	ep, err := pipeline.New(fc, ec)
	if err != nil {
		t.Fatal(err)
	}
	return b, Reference{Level: b.Level, Layout: ep.Embedder().Layout(), Lines: lines}
}

// gated is one scored window with the gate's view of it.
type gated struct {
	start, end int64
	score      float64
	d          Decision
}

// runGate streams the plan through the scoring pipeline and the gate.
func runGate(t testing.TB, m sim.Machine, b *baseline.Baseline, ref Reference, snr float64, chunks int,
	plan func(int) chunkPlan) ([]gated, []MachineEvent) {
	t.Helper()
	p, err := pipeline.ForBaseline(b)
	if err != nil {
		t.Fatal(err)
	}
	g, err := NewMachine(DefaultMachineConfig(), ref)
	if err != nil {
		t.Fatal(err)
	}
	src := &scripted{s: sim.NewStream(m, sim.Clip{SNRdB: snr, SetpointHz: plan(0).setpoint, Seed: 99}, simRate),
		n: int64(chunks), plan: plan}
	var out []gated
	var events []MachineEvent
	err = p.Run(src, func(w *embed.Window, score float64) error {
		events = g.Update(w, events)
		out = append(out, gated{start: w.Start, end: w.End, score: score, d: g.Last()})
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return out, events
}
