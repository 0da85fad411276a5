package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/pipeline"
)

// Scorers: the embedding distance, and a plain RMS level detector that
// practitioners use as the simplest reference.
const (
	scorerCosine = "cosine"
	scorerLevel  = "level"
)

// levelScore is the level detector's score for one window: how far, in dB,
// its RMS level lies from the enrolled mean level.
func levelScore(b *baseline.Baseline, levelDBFS float64) float64 {
	return math.Abs(levelDBFS - b.Level.MeanDBFS)
}

func windowScore(b *baseline.Baseline, scorer string, w windowResult) float64 {
	if scorer == scorerLevel {
		return levelScore(b, w.levelDBFS)
	}
	return w.score
}

func fileScore(b *baseline.Baseline, scorer string, r fileResult) float64 {
	var s float64
	for _, w := range r.windows {
		s += windowScore(b, scorer, w)
	}
	return s / float64(len(r.windows))
}

func runScore(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("score", stderr)
	blPath := fs.String("baseline", "", "baseline `file` from enroll (required)")
	windows := fs.Bool("windows", false, "print every analysis window instead of one row per file")
	report := fs.Bool("report", false, "print a readable verdict per file instead of CSV")
	scorer := fs.String("scorer", scorerCosine, "cosine (distance from the enrolled healthy sound) or level (RMS level detector)")
	channel := fs.Int("channel", -1, "channel to analyse, from 0; -1 mixes all channels")
	paths, err := parse(fs, args)
	if err != nil {
		return err
	}
	if *blPath == "" {
		return usagef("--baseline is required")
	}
	if *scorer != scorerCosine && *scorer != scorerLevel {
		return usagef("--scorer %q: use %s or %s", *scorer, scorerCosine, scorerLevel)
	}
	if *report && *windows {
		return usagef("--report and --windows exclude each other")
	}
	if *report && *scorer == scorerLevel {
		return usagef("--report judges the embedding distance; it cannot be combined with --scorer level")
	}
	files, err := wavPaths(paths)
	if err != nil {
		return err
	}
	b, err := baseline.Load(*blPath)
	if err != nil {
		return err
	}
	p, err := pipeline.ForBaseline(b)
	if err != nil {
		return err
	}
	opts := analyseOptions{channel: *channel}
	if *report {
		opts.dev, opts.threshold = b.Model.NewScorer(), b.Calib.WarnThreshold
	}
	out := csv.NewWriter(stdout)
	switch {
	case *report:
		fmt.Fprintf(stdout, "baseline %s", b.ID)
		if b.Asset != "" {
			fmt.Fprintf(stdout, " (%s)", b.Asset)
		}
		fmt.Fprintf(stdout, ", enrolled %s\n\n", b.Created.Format("2006-01-02 15:04 UTC"))
	case *windows:
		out.Write([]string{"file", "window", "start_s", "end_s", "score", "level_dbfs", "over"})
	default:
		out.Write([]string{"file", "score"})
	}
	prog := newProgress(stderr, "scoring", len(files))
	failed := 0
	for _, f := range files {
		r, err := analyseFile(p, f, opts)
		if err != nil {
			prog.end()
			fmt.Fprintf(stderr, "auscult score: %v\n", err)
			failed++
			continue
		}
		prog.end() // keep the progress line off the results on a shared terminal
		switch {
		case *report:
			printVerdict(stdout, b, r, p.Embedder().Layout())
			fmt.Fprintln(stdout)
		case *windows:
			for _, w := range r.windows {
				s := windowScore(b, *scorer, w)
				over := "" // the level scorer has no calibrated levels
				switch {
				case *scorer != scorerCosine:
				case s > b.Calib.Threshold:
					over = "alarm"
				case s > b.Calib.WarnThreshold && b.Calib.WarnThreshold > 0:
					over = "warning"
				}
				out.Write([]string{f, strconv.FormatInt(w.index, 10), ff(w.startS, 3), ff(w.endS, 3),
					ff(s, 6), ff(w.levelDBFS, 2), over})
			}
		default:
			out.Write([]string{f, ff(fileScore(b, *scorer, r), 6)})
		}
		out.Flush()
		prog.step(r.seconds)
	}
	prog.end()
	out.Flush()
	if err := out.Error(); err != nil {
		return err
	}
	if failed > 0 {
		return fmt.Errorf("%d of %d files could not be scored", failed, len(files))
	}
	return nil
}

func ff(v float64, prec int) string { return strconv.FormatFloat(v, 'f', prec, 64) }
