package pipeline

import (
	"errors"
	"fmt"
	"io"

	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/features"
)

// BlockSamples is how many samples Run reads from a source at a time.
const BlockSamples = 4096

// Pipeline owns an Embedder and, when scoring, a baseline Scorer. It is not
// safe for concurrent use; make one per stream.
type Pipeline struct {
	emb    *embed.Embedder
	scorer *baseline.Scorer
	buf    []int16
	read   int64 // samples read in the current or last run
	stop   error
	fn     func(w *embed.Window, score float64) error
	onWin  func(w *embed.Window)
}

// New returns a pipeline with the given configuration that does not score
// (every score is 0); enrolment uses it.
func New(fc features.Config, ec embed.Config) (*Pipeline, error) {
	emb, err := embed.New(fc, ec)
	if err != nil {
		return nil, err
	}
	p := &Pipeline{emb: emb, buf: make([]int16, BlockSamples)}
	p.onWin = p.window
	return p, nil
}

// ForBaseline returns a pipeline configured as b was enrolled, scoring every
// window against it.
func ForBaseline(b *baseline.Baseline) (*Pipeline, error) {
	p, err := New(b.Features, b.Embed)
	if err != nil {
		return nil, err
	}
	if p.emb.Dim() != b.Model.Dim() {
		return nil, fmt.Errorf("%w: baseline %s has %d dimensions, its configuration gives %d",
			baseline.ErrMismatch, b.ID, b.Model.Dim(), p.emb.Dim())
	}
	p.scorer = b.Model.NewScorer()
	return p, nil
}

// SamplesRead is how many samples the current or last Run read.
func (p *Pipeline) SamplesRead() int64 { return p.read }

// Embedder exposes the pipeline's embedder (for its layout and timing).
func (p *Pipeline) Embedder() *embed.Embedder { return p.emb }

// Run reads src to its end and calls fn for every analysis window with its
// distance (0 when the pipeline does not score). The source's rate must be
// the configured analysis rate. fn must not keep w. An error from fn stops
// the run and is returned; io.EOF from the source ends it cleanly, after
// the embedder is flushed.
func (p *Pipeline) Run(src audio.Source, fn func(w *embed.Window, score float64) error) error {
	if r := p.emb.FeatureConfig().Rate; src.Rate() != r {
		return fmt.Errorf("pipeline: source rate %d Hz, analysis rate %d Hz; resample first", src.Rate(), r)
	}
	p.fn, p.stop, p.read = fn, nil, 0
	defer func() { p.fn = nil }()
	for {
		n, err := src.Read(p.buf)
		p.read += int64(n)
		if n > 0 {
			p.emb.Push(p.buf[:n], p.onWin)
			if p.stop != nil {
				p.emb.Reset()
				return p.stop
			}
		}
		if errors.Is(err, io.EOF) {
			p.emb.Flush(p.onWin)
			return p.stop
		}
		if err != nil {
			p.emb.Reset()
			return err
		}
	}
}

func (p *Pipeline) window(w *embed.Window) {
	if p.stop != nil {
		return
	}
	var s float64
	if p.scorer != nil {
		s = p.scorer.Distance(w.Vec)
	}
	p.stop = p.fn(w, s)
}
