package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestEnrollRefuses: healthy data that would make a poor baseline is refused
// with the reason and the file, and no baseline is written.
func TestEnrollRefuses(t *testing.T) {
	const rate = 16000
	square := make([]int16, 70*rate)
	for i := range square {
		// 100 Hz square wave at full scale: every sample clips.
		if i/(rate/200)%2 == 0 {
			square[i] = 32767
		} else {
			square[i] = -32768
		}
	}
	tests := []struct {
		name    string
		file    string
		samples []int16
		want    []string
	}{
		{"one 3-second recording", "short.wav", noise(rate, 3, 7), []string{"too little healthy audio"}},
		{"silent recording", "silent.wav", make([]int16, 70*rate), []string{"silent", "silent.wav", "microphone"}},
		{"clipped recording", "clipped.wav", square, []string{"clipped", "clipped.wav", "full scale"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			writeWAV(t, dir, tc.file, rate, tc.samples)
			out := filepath.Join(t.TempDir(), "b.bl")
			r := cli(t, "enroll", "--out", out, dir)
			wantFail(t, r, 1, append([]string{"enrolment refused"}, tc.want...)...)
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Errorf("a refused enrolment left %s behind (stat: %v)", out, err)
			}
		})
	}
}

// TestCommandLine: usage errors exit 2 with the reason and the usage line;
// help exits 0.
func TestCommandLine(t *testing.T) {
	dir := t.TempDir()
	tests := []struct {
		name string
		args []string
		code int
		want []string
	}{
		{"unknown command", []string{"listen"}, 2, []string{`unknown command "listen"`, "usage: auscult COMMAND"}},
		{"unknown flag", []string{"score", "--loudness", "x.wav"}, 2,
			[]string{"flag provided but not defined: -loudness", "usage: auscult score"}},
		{"enroll without --out", []string{"enroll", dir}, 2, []string{"--out is required", "usage: auscult enroll"}},
		{"simulate without --out", []string{"simulate", "--seed", "3"}, 2, []string{"--out is required"}},
		{"simulate with no faulty recordings", []string{"simulate", "--out", filepath.Join(dir, "s"), "--per-fault", "0"}, 2,
			[]string{"--per-fault >= 1"}},
		{"enroll with nothing to enrol", []string{"enroll", "--out", filepath.Join(dir, "b.bl")}, 2,
			[]string{"no WAV files or folders given"}},
		{"enroll from a missing folder", []string{"enroll", "--out", filepath.Join(dir, "b.bl"), filepath.Join(dir, "nowhere")}, 1,
			[]string{"nowhere", "no such file"}},
		{"no command", nil, 2, nil},
		{"enroll at an impossible rate", []string{"enroll", "--out", filepath.Join(dir, "b.bl"), "--rate", "5000", dir}, 2,
			[]string{"--rate 5000", "8000 to 48000"}},
		{"enroll with a zero floor", []string{"enroll", "--out", filepath.Join(dir, "b.bl"), "--floor", "0", dir}, 2,
			[]string{"--floor 0"}},
		{"warning below the alarm probability", []string{"enroll", "--out", filepath.Join(dir, "b.bl"), "--warn-prob", "0.001", dir}, 2,
			[]string{"--warn-prob 0.001"}},
		{"enroll into a missing folder", []string{"enroll", "--out", filepath.Join(dir, "no", "b.bl"), dir}, 1,
			[]string{"cannot write into", "no such file"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			wantFail(t, cli(t, tc.args...), tc.code, tc.want...)
		})
	}
	t.Run("simulate refuses to mix runs", func(t *testing.T) {
		out := filepath.Join(t.TempDir(), "sim")
		os.MkdirAll(filepath.Join(out, "train"), 0o755)
		writeWAV(t, filepath.Join(out, "train"), "old.wav", 16000, noise(16000, 1, 1))
		wantFail(t, cli(t, "simulate", "--out", out), 1, "already holds 1 recordings", "empty folder")
	})
	t.Run("help", func(t *testing.T) {
		r := mustRun(t, "help")
		for _, c := range []string{"simulate", "enroll", "score", "evaluate"} {
			if !strings.Contains(r.stdout, "  "+c+" ") {
				t.Errorf("help does not list %s:\n%s", c, r.stdout)
			}
		}
	})
	t.Run("command help", func(t *testing.T) {
		r := mustRun(t, "score", "-h")
		if !strings.Contains(r.stderr, "-baseline") {
			t.Errorf("score -h does not list --baseline:\n%s", r.stderr)
		}
	})
}

// checkResampled converts a simulated 16 kHz mono 16-bit recording with SoX
// into 44.1 kHz stereo 24-bit and scores both. SoX's own header reading
// (sox --i) confirms the format. Resampling must not move the AES17 level
// (within 0.1 dB) nor the embedding distance much (within 0.01, a rule of
// thumb, common practice for a resampling round trip, not a standard).
// Without a rate change (16 kHz stereo 24-bit) the score must not move at
// all: widening to 24 bits and mixing two equal channels are exact.
func checkResampled(t *testing.T, s skid, test string) {
	sox, err := exec.LookPath("sox")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("sox is needed on CI (Debian package sox; scripts/test.sh installs it)")
		}
		t.Skip("sox not installed (Debian package sox)")
	}
	src := filepath.Join(test, "test_0001.wav")
	dst := filepath.Join(t.TempDir(), "p-492b-44k1-stereo-24bit.wav")
	if out, err := exec.Command(sox, "-D", src, "-r", "44100", "-c", "2", "-b", "24", dst).CombinedOutput(); err != nil {
		t.Fatalf("sox: %v\n%s", err, out)
	}
	for _, q := range []struct{ opt, want string }{{"-r", "44100"}, {"-c", "2"}, {"-b", "24"}} {
		out, err := exec.Command(sox, "--i", q.opt, dst).Output()
		if err != nil || strings.TrimSpace(string(out)) != q.want {
			t.Fatalf("sox --i %s: %q (%v), want %s", q.opt, out, err, q.want)
		}
	}
	for _, tc := range []struct {
		scorer string
		tol    float64
	}{{"cosine", 0.01}, {"level", 0.1}} {
		t.Run(tc.scorer, func(t *testing.T) {
			orig := fileScores(t, mustRun(t, "score", "--baseline", s.baseline, "--scorer", tc.scorer, src).stdout, 1)
			res := fileScores(t, mustRun(t, "score", "--baseline", s.baseline, "--scorer", tc.scorer, dst).stdout, 1)
			a, b := orig[filepath.Base(src)], res[filepath.Base(dst)]
			if d := a - b; d > tc.tol || d < -tc.tol {
				t.Errorf("score %v at 16 kHz mono 16-bit, %v after SoX to 44.1 kHz stereo 24-bit "+
					"(do the top mel bands reach into a resampler's transition band near 8 kHz?)", a, b)
			}
		})
	}
	t.Run("stereo 24-bit without a rate change", func(t *testing.T) {
		same := filepath.Join(t.TempDir(), "p-492b-16k-stereo-24bit.wav")
		if out, err := exec.Command(sox, "-D", src, "-c", "2", "-b", "24", same).CombinedOutput(); err != nil {
			t.Fatalf("sox: %v\n%s", err, out)
		}
		a := fileScores(t, mustRun(t, "score", "--baseline", s.baseline, src).stdout, 1)[filepath.Base(src)]
		b := fileScores(t, mustRun(t, "score", "--baseline", s.baseline, same).stdout, 1)[filepath.Base(same)]
		if a != b {
			t.Errorf("score %v as mono 16-bit, %v as stereo 24-bit at the same rate", a, b)
		}
	})
	t.Run("one channel", func(t *testing.T) {
		mustRun(t, "score", "--baseline", s.baseline, "--channel", "1", dst)
		wantFail(t, cli(t, "score", "--baseline", s.baseline, "--channel", "2", dst), 1, "channel")
	})
}
