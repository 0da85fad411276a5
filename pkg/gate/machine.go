package gate

import (
	"fmt"
	"math"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
)

// Reference is what the gate needs from enrolment.
type Reference struct {
	// Level is the healthy window level distribution (baseline.Baseline.Level).
	Level baseline.LevelStats
	// Layout is the embedding layout the windows come with
	// (embed.Embedder.Layout for the baseline's configuration).
	Layout []embed.Dim
	// Lines is the tonal signature a LineLearner learnt from the same
	// enrolment windows; empty for a machine without lines.
	Lines Lines
}

// Machine is the running/stopped gate. It judges every analysis window by
// its level against the enrolled healthy range and by whether the
// machine's enrolled lines are still there, and changes state only after
// several windows agree. It does not allocate after NewMachine and is not
// safe for concurrent use; one Machine serves one stream.
type Machine struct {
	cfg   MachineConfig
	mean  float64 // enrolled mean level, dBFS
	span  float64 // half-width of the healthy level range, dB
	bands []int
	m     matcher
	stopT float64 // absolute match thresholds
	runT  float64
	dim   int
	prom  []float32 // scratch: prominence per line band

	state               State
	stopRun, runRun     int   // windows of evidence since the other kind
	stopOnset, runOnset int64 // Start of the first window of each run
	last                Decision
}

// NewMachine returns a gate in state Unknown.
func NewMachine(cfg MachineConfig, ref Reference) (*Machine, error) {
	if err := cfg.Validate(); err != nil {
		return nil, err
	}
	lv := ref.Level
	if math.IsNaN(lv.MeanDBFS) || math.IsInf(lv.MeanDBFS, 0) || !(lv.StdDB >= 0) || math.IsInf(lv.StdDB, 0) {
		return nil, fmt.Errorf("%w: level mean %g dBFS, standard deviation %g dB", ErrReference, lv.MeanDBFS, lv.StdDB)
	}
	if len(ref.Layout) == 0 {
		return nil, fmt.Errorf("%w: empty layout", ErrReference)
	}
	if err := ref.Lines.check(ref.Layout); err != nil {
		return nil, err
	}
	g := &Machine{cfg: cfg, mean: lv.MeanDBFS, span: max(cfg.LevelSpanDB, cfg.LevelSpanStd*lv.StdDB),
		dim: len(ref.Layout), last: Decision{Window: -1, Match: -1}}
	if !ref.Lines.Empty() {
		g.bands = append([]int(nil), ref.Lines.Bands...)
		t := make([][]float32, len(ref.Lines.Templates))
		for i, row := range ref.Lines.Templates {
			t[i] = append([]float32(nil), row...)
		}
		g.m = newMatcher(t)
		g.stopT = cfg.StopMatch * ref.Lines.MatchP10
		g.runT = cfg.RunMatch * ref.Lines.MatchP10
		g.prom = make([]float32, len(g.bands))
	}
	return g, nil
}

// State returns the current state.
func (g *Machine) State() State { return g.state }

// Last returns the decision on the most recent window (Window -1 before
// the first).
func (g *Machine) Last() Decision { return g.last }

// Update judges one analysis window and appends an event to dst if the
// state changed; it returns dst. Feed it every window in stream order,
// except windows the sensor check marked unusable (call Reset after such a
// gap if it was long). It panics if len(w.Vec) differs from the layout,
// which is a wiring mistake.
func (g *Machine) Update(w *embed.Window, dst []MachineEvent) []MachineEvent {
	if len(w.Vec) != g.dim {
		panic(fmt.Sprintf("gate: Machine.Update: vector of %d values, layout has %d", len(w.Vec), g.dim))
	}
	drop := g.mean - w.LevelDBFS
	match := -1.0
	ev := Unknown
	if g.bands != nil {
		for i, b := range g.bands {
			g.prom[i] = prominence(w.Vec, b)
		}
		match = float64(g.m.best(g.prom))
		louder := drop < -g.span
		switch {
		case match >= g.runT:
			ev = Running
		case !louder && (match < g.stopT || drop > g.span):
			ev = Stopped
		}
	} else {
		switch {
		case drop > g.span:
			ev = Stopped
		case drop <= g.span-g.cfg.LevelHysteresisDB:
			ev = Running
		}
	}
	switch ev {
	case Running:
		if g.runRun == 0 {
			g.runOnset = w.Start
		}
		g.runRun++
		g.stopRun = 0
	case Stopped:
		if g.stopRun == 0 {
			g.stopOnset = w.Start
		}
		g.stopRun++
		g.runRun = 0
	}
	g.last = Decision{Window: w.Index, LevelDBFS: w.LevelDBFS, DropDB: drop, Match: match, Evidence: ev}
	next := g.state
	switch g.state {
	case Unknown:
		if g.runRun >= g.cfg.StartWindows {
			next = Running
		} else if g.stopRun >= g.cfg.StartWindows {
			next = Stopped
		}
	case Running:
		if g.stopRun >= g.cfg.StopWindows {
			next = Stopped
		}
	case Stopped:
		if g.runRun >= g.cfg.RunWindows {
			next = Running
		}
	}
	if next != g.state {
		onset := g.runOnset
		if next == Stopped {
			onset = g.stopOnset
		}
		dst = append(dst, MachineEvent{From: g.state, To: next, SamplePos: w.End, OnsetPos: onset, Window: w.Index,
			LevelDBFS: w.LevelDBFS, DropDB: drop, Match: match})
		g.state = next
	}
	g.last.State = g.state
	return dst
}

// Reset forgets all evidence and returns to Unknown, appending an event to
// dst if the state was not already Unknown; samplePos is the stream
// position of the reset. The agent calls it after a gap in the data or a
// sensor fault, when what it knew about the machine may be stale.
func (g *Machine) Reset(samplePos int64, dst []MachineEvent) []MachineEvent {
	if g.state != Unknown {
		dst = append(dst, MachineEvent{From: g.state, To: Unknown, SamplePos: samplePos, OnsetPos: samplePos, Window: -1})
	}
	g.state, g.stopRun, g.runRun = Unknown, 0, 0
	return dst
}
