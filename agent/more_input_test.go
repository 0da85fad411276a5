package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// checkSelectionErrors: evaluate and score options that cannot work are
// refused with the reason, never a crash.
func checkSelectionErrors(t *testing.T, s skid, test string) {
	labels := filepath.Join(test, "labels.csv")
	ev := func(extra ...string) result {
		return cli(t, append([]string{"evaluate", "--baseline", s.baseline, "--labels", labels}, append(extra, test)...)...)
	}
	wantFail(t, ev("--where", "fault=leak"), 1, `--where "fault=leak"`, "all", "anomalies (label 1)")
	wantFail(t, ev("--where", "label=0"), 1, "normal (label 0)")
	wantFail(t, ev("--where", "pressure>3"), 2, "with a column of the labels file")
	wantFail(t, ev("--where", "snr_db>=abc"), 2, `"abc" is not a number`)
	wantFail(t, ev("--mean-over", "colour"), 2, `no column "colour"`)

	data, err := os.ReadFile(labels)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(data)), "\n")
	dup := filepath.Join(t.TempDir(), "dup.csv")
	os.WriteFile(dup, []byte(strings.Join(append(lines, lines[1]), "\n")+"\n"), 0o644)
	wantFail(t, cli(t, "evaluate", "--baseline", s.baseline, "--labels", dup, test), 1, "listed again (first on line 2)")

	wantFail(t, cli(t, "score", "--baseline", s.baseline, "--report", "--scorer", "level", test), 2,
		"cannot be combined with --scorer level")

	// A recording made at 8 kHz lacks the band the 16 kHz analysis compares.
	low := writeWAV(t, t.TempDir(), "phone.wav", 8000, noise(8000, 8, 5))
	wantFail(t, cli(t, "score", "--baseline", s.baseline, low), 1, "phone.wav", "recorded at 8000 Hz", "--rate 8000")
}
