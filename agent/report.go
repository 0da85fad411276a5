package main

import (
	"fmt"
	"io"

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

// topDeviations returns up to n frequency ranges that deviate most, over the
// mean of the file's window deviations.
func topDeviations(r fileResult, layout []embed.Dim, n int) []baseline.Band {
	mean := make([]float32, len(r.devSum))
	for i, v := range r.devSum {
		mean[i] = float32(v / float64(max(r.devCount, 1)))
	}
	return baseline.NewBandFinder(layout).Find(mean, make([]baseline.Band, 0, n))
}

func describeDim(d baseline.Band) string {
	band := fmt.Sprintf("%s to %s", hz(d.LoHz), hz(d.HiHz))
	more, what := "louder", "steady sound"
	if d.Deviation < 0 {
		more = "quieter"
	}
	switch d.Part {
	case "mel_std":
		what, more = "fluctuation", "more"
		if d.Deviation < 0 {
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
			fmt.Fprintf(w, "  %-11s %+6.1f sd  %s\n", label, d.Deviation, describeDim(d))
		}
	}
}
