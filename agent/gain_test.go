package main

import (
	"io"
	"math"
	"path/filepath"
	"testing"

	"github.com/auscult/auscult/pkg/audio"
)

// scaledCopy writes src with its samples multiplied by 10^(db/20), clipped.
func scaledCopy(t *testing.T, src, dst string, db float64) {
	t.Helper()
	r, err := audio.OpenWAV(src, -1)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	var all []int16
	buf := make([]int16, 4096)
	for {
		n, err := r.Read(buf)
		all = append(all, buf[:n]...)
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
	}
	g := math.Pow(10, db/20)
	for i, v := range all {
		all[i] = int16(max(-32768, min(32767, math.Round(float64(v)*g))))
	}
	if err := audio.WriteWAV(dst, r.Rate(), all); err != nil {
		t.Fatal(err)
	}
}

// checkGainDrift: a microphone gain change of +-3 dB, the drift a field
// microphone sees over months (common practice, no source), must barely
// move the score of a healthy recording: far less than the gap between a
// typical healthy score and the threshold.
func checkGainDrift(t *testing.T, s skid, test string, lab map[string]int, threshold float64) {
	cosine := fileScores(t, mustRun(t, "score", "--baseline", s.baseline, test).stdout, len(lab))
	dir := t.TempDir()
	var worst, gap float64
	n := 0
	for f, l := range lab {
		if l != 0 {
			continue
		}
		for _, db := range []float64{-3, 3} {
			out := filepath.Join(dir, "g.wav")
			scaledCopy(t, filepath.Join(test, f), out, db)
			got := fileScores(t, mustRun(t, "score", "--baseline", s.baseline, out).stdout, 1)
			worst = max(worst, math.Abs(got["g.wav"]-cosine[f]))
		}
		gap += threshold - cosine[f]
		n++
	}
	gap /= float64(n)
	t.Logf("largest score change for +-3 dB gain: %.4f; mean healthy gap to the threshold: %.4f", worst, gap)
	if worst > gap/10 {
		t.Errorf("a 3 dB gain change moved a healthy score by %.4f, more than a tenth of the %.4f gap to the threshold", worst, gap)
	}
}
