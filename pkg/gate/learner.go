package gate

import (
	"fmt"
	"math"
	"slices"

	"github.com/auscult/auscult/pkg/embed"
)

// LearnConfig tunes how a LineLearner finds the machine's lines. The
// defaults are chosen, common practice with no source, and were checked on
// the project's simulator only.
type LearnConfig struct {
	// LineDB is the prominence, in dB, at which a band counts as holding a
	// line in one window (default 6).
	LineDB float64 `json:"line_db"`
	// MinPresence is the share of enrolment windows in which a band must
	// hold a line to become a line band (default 0.2, so a line seen at one
	// of up to five speed set-points still counts).
	MinPresence float64 `json:"min_presence"`
	// MinLines is the fewest line bands worth using (default 2); with fewer,
	// Lines returns the empty signature and the gate judges by level alone.
	MinLines int `json:"min_lines"`
	// MaxTemplates is the most templates (clusters of enrolment windows)
	// kept (default 8).
	MaxTemplates int `json:"max_templates"`
	// MinWindows is the fewest enrolment windows Lines accepts (default 20).
	MinWindows int `json:"min_windows"`
}

// DefaultLearnConfig returns the settings enrolment uses by default.
func DefaultLearnConfig() LearnConfig {
	return LearnConfig{LineDB: 6, MinPresence: 0.2, MinLines: 2, MaxTemplates: 8, MinWindows: 20}
}

// LineLearner collects the prominences of every fine-view band over the
// enrolment windows and turns them into Lines. Enrolment feeds it the same
// healthy windows it gives the baseline model. It keeps one row per window
// (a few hundred bytes), so it is meant for enrolment, not the live path.
type LineLearner struct {
	cfg    LearnConfig
	layout []embed.Dim
	cand   []int     // candidate band indices into Vec
	rows   []float32 // len(cand) prominences per window
	n      int
}

// NewLineLearner returns a learner for windows with the given embedding
// layout (embed.Embedder.Layout). A layout without a fine view is allowed;
// it yields empty Lines.
func NewLineLearner(layout []embed.Dim, cfg LearnConfig) (*LineLearner, error) {
	switch {
	case !(cfg.LineDB > 0) || math.IsInf(cfg.LineDB, 0):
		return nil, fmt.Errorf("%w: line_db %g, want a positive number of dB", ErrConfig, cfg.LineDB)
	case !(cfg.MinPresence > 0 && cfg.MinPresence <= 1):
		return nil, fmt.Errorf("%w: min_presence %g, want (0, 1]", ErrConfig, cfg.MinPresence)
	case cfg.MinLines < 1:
		return nil, fmt.Errorf("%w: min_lines %d, want at least 1", ErrConfig, cfg.MinLines)
	case cfg.MaxTemplates < 1:
		return nil, fmt.Errorf("%w: max_templates %d, want at least 1", ErrConfig, cfg.MaxTemplates)
	case cfg.MinWindows < 2:
		return nil, fmt.Errorf("%w: min_windows %d, want at least 2", ErrConfig, cfg.MinWindows)
	}
	l := &LineLearner{cfg: cfg, layout: slices.Clone(layout)}
	for i := lineReach; i+lineReach < len(layout); i++ {
		ok := true
		for d := -lineReach; d <= lineReach; d++ {
			ok = ok && layout[i+d].Part == "fine"
		}
		if ok {
			l.cand = append(l.cand, i)
		}
	}
	return l, nil
}

// Add records one healthy enrolment window's Vec (len of the layout). It
// panics on a Vec of another length, which is a wiring mistake.
func (l *LineLearner) Add(vec []float32) {
	if len(vec) != len(l.layout) {
		panic(fmt.Sprintf("gate: LineLearner.Add: vector of %d values, layout has %d", len(vec), len(l.layout)))
	}
	for _, b := range l.cand {
		l.rows = append(l.rows, prominence(vec, b))
	}
	l.n++
}

// Windows is how many windows have been added.
func (l *LineLearner) Windows() int { return l.n }

// Lines returns the learnt signature: empty (and no error) when the machine
// showed fewer than MinLines lines, ErrTooFewWindows before MinWindows
// windows. The result is a deterministic function of the added windows.
func (l *LineLearner) Lines() (Lines, error) {
	if l.n < l.cfg.MinWindows {
		return Lines{}, fmt.Errorf("%w: %d windows, need at least %d", ErrTooFewWindows, l.n, l.cfg.MinWindows)
	}
	nc := len(l.cand)
	var keep []int // positions in cand
	for j := range nc {
		c := 0
		for i := range l.n {
			if float64(l.rows[i*nc+j]) >= l.cfg.LineDB {
				c++
			}
		}
		if float64(c) >= l.cfg.MinPresence*float64(l.n) {
			keep = append(keep, j)
		}
	}
	if len(keep) < l.cfg.MinLines {
		return Lines{}, nil
	}
	x := make([][]float32, l.n)
	for i := range x {
		x[i] = make([]float32, len(keep))
		for k, j := range keep {
			x[i][k] = l.rows[i*nc+j]
		}
	}
	out := Lines{Templates: kmeans(x, min(l.cfg.MaxTemplates, max(1, l.n/10)))}
	for _, j := range keep {
		b := l.cand[j]
		out.Bands = append(out.Bands, b)
		out.Hz = append(out.Hz, math.Sqrt(l.layout[b].LoHz*l.layout[b].HiHz))
	}
	m := newMatcher(out.Templates)
	scores := make([]float64, l.n)
	for i, v := range x {
		scores[i] = float64(m.best(v))
	}
	slices.Sort(scores)
	out.MatchP10 = scores[l.n/10]
	if !(out.MatchP10 > 0) {
		return Lines{}, nil
	}
	return out, nil
}
