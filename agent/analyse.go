package main

import (
	"fmt"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/pipeline"
)

// windowResult is one scored analysis window of a file.
type windowResult struct {
	index        int64
	startS, endS float64
	score        float64
	levelDBFS    float64
	clipFraction float64
}

// fileResult is everything one pass over a file produced.
type fileResult struct {
	path    string
	seconds float64 // audio read, at the analysis rate
	windows []windowResult
	vecs    [][]float32 // copies of the window vectors, when asked for
	// devSum adds up the standardised deviations of the windows over the
	// threshold (of all windows while none is over), when asked for.
	devSum   []float64
	devCount int
	devOver  bool
}

// analyseOptions says what analyseFile keeps beyond the window scores.
type analyseOptions struct {
	channel   int
	keepVecs  bool
	dev       *baseline.Scorer // non-nil: accumulate deviations
	threshold float64
}

// meanScore is the file's score: the mean of its window scores.
func (r fileResult) meanScore() float64 {
	var s float64
	for _, w := range r.windows {
		s += w.score
	}
	return s / float64(len(r.windows))
}

// analyseFile runs one WAV file through p.
func analyseFile(p *pipeline.Pipeline, path string, o analyseOptions) (fileResult, error) {
	emb := p.Embedder()
	rate := emb.FeatureConfig().Rate
	src, closeFn, err := openAt(path, rate, o.channel)
	if err != nil {
		return fileResult{}, err
	}
	defer closeFn()
	res := fileResult{path: path}
	var dev []float32
	if o.dev != nil {
		dev = make([]float32, emb.Dim())
		res.devSum = make([]float64, emb.Dim())
	}
	err = p.Run(src, func(w *embed.Window, score float64) error {
		res.windows = append(res.windows, windowResult{index: w.Index,
			startS: float64(w.Start) / float64(rate), endS: float64(w.End) / float64(rate),
			score: score, levelDBFS: w.LevelDBFS, clipFraction: w.ClipFraction})
		if o.keepVecs {
			res.vecs = append(res.vecs, append([]float32(nil), w.Vec...))
		}
		if dev != nil {
			over := score > o.threshold
			if over && !res.devOver {
				clear(res.devSum)
				res.devCount = 0
				res.devOver = true
			}
			if over || !res.devOver {
				res.devCount++
				o.dev.Deviations(w.Vec, dev)
				for i, v := range dev {
					res.devSum[i] += float64(v)
				}
			}
		}
		return nil
	})
	res.seconds = float64(p.SamplesRead()) / float64(rate)
	if err != nil {
		return res, err
	}
	if len(res.windows) == 0 {
		return res, fmt.Errorf("%s: too short to analyse: at least %.2f s of audio are needed",
			path, float64(emb.SubWindowSamples())/float64(rate))
	}
	return res, nil
}
