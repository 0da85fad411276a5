package main

import (
	"fmt"
	"io"
	"math"
	"sort"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
)

// raises tells whether a k-of-n debounce would raise an alarm on the given
// sequence of window scores, and how many windows were over.
func raises(r fileResult, thr float64, k, n int) (raised bool, over int) {
	for i, w := range r.windows {
		if w.score > thr {
			over++
		}
		c := 0
		for j := max(0, i-n+1); j <= i; j++ {
			if r.windows[j].score > thr {
				c++
			}
		}
		if c >= k {
			raised = true
		}
	}
	return raised, over
}

// deviation is one dimension's mean standardised deviation.
type deviation struct {
	dim embed.Dim
	sd  float64
}

// topDeviations returns the n dimensions that deviate most, one per band
// and part.
func topDeviations(r fileResult, layout []embed.Dim, n int) []deviation {
	var all []deviation
	for i, s := range r.devSum {
		all = append(all, deviation{layout[i], s / float64(max(r.devCount, 1))})
	}
	sort.Slice(all, func(i, j int) bool { return math.Abs(all[i].sd) > math.Abs(all[j].sd) })
	return all[:min(n, len(all))]
}

func describeDim(d deviation) string {
	band := fmt.Sprintf("%s-%s", hz(d.dim.LoHz), hz(d.dim.HiHz))
	dir := "louder"
	if d.sd < 0 {
		dir = "quieter"
	}
	switch d.dim.Part {
	case "mel_std":
		if d.sd > 0 {
			dir = "more fluctuation"
		} else {
			dir = "less fluctuation"
		}
		return fmt.Sprintf("%-24s %s", "fluctuation "+band, dir)
	case "fine":
		return fmt.Sprintf("%-24s %s", "low-frequency "+band, dir)
	}
	return fmt.Sprintf("%-24s %s", "spectrum "+band, dir)
}

func hz(f float64) string {
	if f >= 1000 {
		return fmt.Sprintf("%.2f kHz", f/1000)
	}
	return fmt.Sprintf("%.1f Hz", f)
}

// printVerdict writes a technician's reading of one file.
func printVerdict(w io.Writer, b *baseline.Baseline, r fileResult, layout []embed.Dim) {
	c := b.Calib
	raised, over := raises(r, c.Threshold, c.K, c.N)
	var mx, lv float64
	for _, x := range r.windows {
		mx = max(mx, x.score)
		lv += x.levelDBFS
	}
	lv /= float64(len(r.windows))
	verdict := "sounds healthy"
	switch {
	case raised:
		verdict = "ALARM: sounds unlike its healthy baseline"
	case over > 0:
		verdict = "borderline: some windows over, too few to raise an alarm"
	}
	fmt.Fprintf(w, "%s\n", r.path)
	fmt.Fprintf(w, "  verdict     %s\n", verdict)
	fmt.Fprintf(w, "  windows     %d of %d over the threshold %.4f (an alarm needs %d of %d in a row)\n",
		over, len(r.windows), c.Threshold, c.K, c.N)
	fmt.Fprintf(w, "  score       mean %.4f, highest %.4f\n", r.meanScore(), mx)
	fmt.Fprintf(w, "  level       %.1f dBFS (baseline %.1f dBFS)\n", lv, b.Level.MeanDBFS)
	if over > 0 {
		for i, d := range topDeviations(r, layout, 3) {
			label := ""
			if i == 0 {
				label = "deviates"
			}
			fmt.Fprintf(w, "  %-11s %+5.1f sd  %s\n", label, d.sd, describeDim(d))
		}
	}
}
