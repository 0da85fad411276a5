package enrol

import (
	"encoding/json"
	"errors"
	"fmt"
	"time"

	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/features"
	"github.com/auscult/auscult/pkg/gate"
	"github.com/auscult/auscult/pkg/pipeline"
)

// BlockSeconds splits long healthy recordings into calibration groups: no
// fold holds windows from both sides of a block boundary.
const BlockSeconds = 60

// Options shape an enrolment. Start from DefaultOptions.
type Options struct {
	Features    features.Config
	Embed       embed.Config
	Model       baseline.ModelOptions
	Calibration baseline.CalibrationOptions
	Quality     baseline.QualityLimits
	Lines       gate.LearnConfig
	// Asset names the machine in the baseline (optional).
	Asset string
}

// DefaultOptions returns the defaults of the enroll command.
func DefaultOptions() Options {
	fc := features.DefaultConfig()
	fc.FMax = audio.ResamplePassband * float64(fc.Rate) / 2
	return Options{Features: fc, Embed: embed.DefaultConfig(), Model: baseline.DefaultModelOptions(),
		Calibration: baseline.CalibrationOptions{FalseAlarmProb: 0.002, WarnProb: 0.02, K: 3, N: 5, Folds: 5},
		Quality:     baseline.DefaultQualityLimits(), Lines: gate.DefaultLearnConfig()}
}

// Enroller gathers healthy windows, one recording at a time.
type Enroller struct {
	o      Options
	p      *pipeline.Pipeline
	lines  *gate.LineLearner
	vecs   [][]float32
	groups []int
	levels []float64
	recs   []baseline.Recording
	keep   func(w *embed.Window) bool
	seen   int // windows offered, kept or not
}

// SetFilter makes Add keep only the windows keep accepts (for example only
// those in which the machine runs); nil keeps all.
func (e *Enroller) SetFilter(keep func(w *embed.Window) bool) { e.keep = keep }

// New checks o and returns an enroller.
func New(o Options) (*Enroller, error) {
	dense := o.Embed // a window at every sub-window: more healthy examples
	dense.Step = 1
	p, err := pipeline.New(o.Features, dense)
	if err != nil {
		return nil, err
	}
	ll, err := gate.NewLineLearner(p.Embedder().Layout(), o.Lines)
	if err != nil {
		return nil, err
	}
	return &Enroller{o: o, p: p, lines: ll}, nil
}

// Progress is what an enroller has gathered so far.
type Progress struct {
	Seconds      float64 // healthy sound analysed
	Windows      int     // windows kept
	Offered      int     // windows offered, kept or not (see SetFilter)
	ClipFraction float64 // share of clipped samples in the current recording
	LevelDBFS    float64 // level of the last window
}

// Add analyses one healthy recording from src (at the analysis rate) to its
// end. onWindow, if not nil, is called after every window with the progress
// so far; an error from it stops the recording (what was gathered is kept).
func (e *Enroller) Add(name string, src audio.Source, onWindow func(Progress) error) error {
	rec := baseline.Recording{Name: name}
	group := len(e.recs) * 1_000_000
	rate := float64(e.o.Features.Rate)
	var clip float64
	var n int
	before := e.Seconds()
	err := e.p.Run(src, func(w *embed.Window, _ float64) error {
		e.seen++
		if e.keep != nil && !e.keep(w) {
			if onWindow == nil {
				return nil
			}
			return onWindow(Progress{Seconds: before + float64(w.End)/rate, Windows: len(e.vecs), Offered: e.seen,
				ClipFraction: clip / float64(max(n, 1)), LevelDBFS: w.LevelDBFS})
		}
		e.vecs = append(e.vecs, append([]float32(nil), w.Vec...))
		e.groups = append(e.groups, group+int(float64(w.Start)/rate/BlockSeconds))
		e.levels = append(e.levels, w.LevelDBFS)
		e.lines.Add(w.Vec)
		rec.LevelsDBFS = append(rec.LevelsDBFS, w.LevelDBFS)
		clip += w.ClipFraction
		n++
		if onWindow == nil {
			return nil
		}
		return onWindow(Progress{Seconds: before + float64(w.End)/rate, Windows: len(e.vecs), Offered: e.seen,
			ClipFraction: clip / float64(n), LevelDBFS: w.LevelDBFS})
	})
	rec.Seconds = float64(e.p.SamplesRead()) / rate
	if n > 0 {
		rec.ClipFraction = clip / float64(n)
	}
	if n > 0 || err == nil {
		e.recs = append(e.recs, rec)
	}
	return err
}

// Seconds is how much healthy sound has been analysed, in seconds.
func (e *Enroller) Seconds() float64 {
	var s float64
	for _, r := range e.recs {
		s += r.Seconds
	}
	return s
}

// ErrRefused wraps every reason enrolment refuses the data.
var ErrRefused = errors.New("enrolment refused")

// Finish checks the data, fits and calibrates the model and learns the
// machine's lines. Errors wrap ErrRefused and the baseline package's reason.
func (e *Enroller) Finish() (*baseline.Baseline, error) {
	if err := baseline.CheckQuality(e.recs, e.o.Quality); err != nil {
		return nil, fmt.Errorf("%w:\n%w", ErrRefused, err)
	}
	ec, fc := e.o.Embed, e.o.Features
	mo := e.o.Model
	mo.Redundancy = float64(ec.Window) // dense windows: Window of them overlap
	co := e.o.Calibration
	co.StepSeconds = float64(ec.Step*ec.SubHops*fc.Hop) / float64(fc.Rate)
	model, cal, err := baseline.Enroll(e.vecs, e.groups, mo, co)
	if err != nil {
		return nil, fmt.Errorf("%w:\n%w", ErrRefused, err)
	}
	b := &baseline.Baseline{Created: time.Now().UTC(), Asset: e.o.Asset, Features: fc, Embed: ec,
		Options: mo, Calib: cal, Level: baseline.Levels(e.levels), Model: model,
		Enrolled: baseline.Enrolment{Recordings: len(e.recs), Windows: len(e.vecs), Seconds: e.Seconds()}}
	if lines, err := e.lines.Lines(); err == nil && !lines.Empty() {
		if b.Lines, err = json.Marshal(lines); err != nil {
			return nil, err
		}
	}
	return b, nil
}

// Lines decodes the machine's tonal signature stored in b; it is empty for a
// baseline without one (the gate then judges by level alone).
func Lines(b *baseline.Baseline) (gate.Lines, error) {
	var l gate.Lines
	if len(b.Lines) == 0 {
		return l, nil
	}
	if err := json.Unmarshal(b.Lines, &l); err != nil {
		return l, fmt.Errorf("%w: baseline %s: machine lines: %v", baseline.ErrCorrupt, b.ID, err)
	}
	return l, nil
}
