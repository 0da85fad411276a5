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

// deviation is a band range whose standardised deviation stands out.
type deviation struct {
	dim embed.Dim // Part, and LoHz..HiHz over the whole merged range
	sd  float64   // the largest mean deviation in the range, signed
}

// topDeviations returns up to n frequency ranges that deviate most: the
// strongest dimensions, with neighbouring bands of the same part that
// deviate the same way merged into one range.
func topDeviations(r fileResult, layout []embed.Dim, n int) []deviation {
	idx := make([]int, len(r.devSum))
	for i := range idx {
		idx[i] = i
	}
	mean := func(i int) float64 { return r.devSum[i] / float64(max(r.devCount, 1)) }
	sort.Slice(idx, func(a, b int) bool { return math.Abs(mean(idx[a])) > math.Abs(mean(idx[b])) })
	strong := map[int]bool{}
	for _, i := range idx[:min(4*n, len(idx))] {
		strong[i] = true
	}
	used := map[int]bool{}
	var out []deviation
	for _, i := range idx {
		if len(out) == n || !strong[i] {
			break
		}
		if used[i] {
			continue
		}
		d := deviation{dim: layout[i], sd: mean(i)}
		used[i] = true
		same := func(j int) bool {
			return j >= 0 && j < len(layout) && strong[j] && !used[j] && layout[j].Part == d.dim.Part &&
				(mean(j) > 0) == (d.sd > 0)
		}
		for j := i - 1; same(j); j-- {
			used[j] = true
			d.dim.LoHz = layout[j].LoHz
		}
		for j := i + 1; same(j); j++ {
			used[j] = true
			d.dim.HiHz = layout[j].HiHz
		}
		out = append(out, d)
	}
	return out
}

func describeDim(d deviation) string {
	band := fmt.Sprintf("%s to %s", hz(d.dim.LoHz), hz(d.dim.HiHz))
	more, what := "louder", "steady sound"
	if d.sd < 0 {
		more = "quieter"
	}
	switch d.dim.Part {
	case "mel_std":
		what, more = "fluctuation", "more"
		if d.sd < 0 {
			more = "less"
		}
	case "fine":
		what = "low-frequency lines"
	case "mel_mean":
		what = "average sound"
	}
	return fmt.Sprintf("%s, %s, %s", what, band, more)
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
	if c.WarnThreshold <= 0 { // a baseline from before the warning level
		c.WarnThreshold = c.Threshold
	}
	warned, overWarn := raises(r, c.WarnThreshold, c.K, c.N)
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
	case warned:
		verdict = "WARNING: sounds unusual; listen again or check soon"
	case overWarn > 0:
		verdict = "borderline: some windows unusual, too few for a warning"
	}
	fmt.Fprintf(w, "%s\n", r.path)
	fmt.Fprintf(w, "  verdict     %s\n", verdict)
	fmt.Fprintf(w, "  windows     %d of %d over the alarm level %.4f, %d over the warning level %.4f\n"+
		"              (either needs %d of the last %d windows)\n",
		over, len(r.windows), c.Threshold, overWarn, c.WarnThreshold, c.K, c.N)
	fmt.Fprintf(w, "  score       mean %.4f, highest %.4f\n", r.meanScore(), mx)
	fmt.Fprintf(w, "  level       %.1f dBFS (baseline %.1f dBFS)\n", lv, b.Level.MeanDBFS)
	full := float64(b.Embed.Window*b.Embed.SubHops*b.Features.Hop) / float64(b.Features.Rate)
	if n := len(r.windows); n == 1 && r.windows[0].endS-r.windows[0].startS < full-1e-9 {
		fmt.Fprintf(w, "  note        short recording: one window of %.1f s, shorter than the %.1f s the levels are set for;\n"+
			"              judge it with care\n", r.windows[0].endS-r.windows[0].startS, full)
	}
	if overWarn > 0 {
		for i, d := range topDeviations(r, layout, 3) {
			label := ""
			if i == 0 {
				label = "deviates"
			}
			fmt.Fprintf(w, "  %-11s %+6.1f sd  %s\n", label, d.sd, describeDim(d))
		}
	}
}
