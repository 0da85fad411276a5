package main

import (
	"fmt"

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
	seconds float64 // audio analysed (end of the last window)
	windows []windowResult
	vecs    [][]float32 // copies of the window vectors, when asked for
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
func analyseFile(p *pipeline.Pipeline, path string, channel int, keepVecs bool) (fileResult, error) {
	emb := p.Embedder()
	rate := emb.FeatureConfig().Rate
	src, closeFn, err := openAt(path, rate, channel)
	if err != nil {
		return fileResult{}, err
	}
	defer closeFn()
	res := fileResult{path: path}
	err = p.Run(src, func(w *embed.Window, score float64) error {
		res.windows = append(res.windows, windowResult{index: w.Index,
			startS: float64(w.Start) / float64(rate), endS: float64(w.End) / float64(rate),
			score: score, levelDBFS: w.LevelDBFS, clipFraction: w.ClipFraction})
		if keepVecs {
			res.vecs = append(res.vecs, append([]float32(nil), w.Vec...))
		}
		res.seconds = float64(w.End) / float64(rate)
		return nil
	})
	if err != nil {
		return res, err
	}
	if len(res.windows) == 0 {
		return res, fmt.Errorf("%s: too short to analyse: at least %.2f s of audio are needed",
			path, float64(emb.SubWindowSamples())/float64(rate))
	}
	return res, nil
}
