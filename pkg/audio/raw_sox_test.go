package audio

import (
	"os"
	"path/filepath"
	"testing"
)

// TestRawAgainstSox reads raw PCM written by SoX 14.4.2 (Debian package
// sox): a stereo stream synthesised by sox with a different tone in each
// channel, the way a recorder pipe would deliver it. Each picked channel
// must equal sox's own extraction of that channel (remix N) exactly; the
// mix must follow the rule in decode.go exactly and be within 1 LSB of
// sox's own down-mix (-c 1, which averages in floating point). Without sox
// the test is skipped, unless CI=true.
func TestRawAgainstSox(t *testing.T) {
	sox := soxPath(t)
	dir := t.TempDir()
	stereo := filepath.Join(dir, "stereo.raw")
	raw := []string{"-t", "raw", "-r", "16000", "-e", "signed", "-b", "16", "-L"}
	runSox(t, sox, append(append([]string{"-D", "-n", "-c", "2"}, raw...), stereo, "synth", "0.5", "sine", "440", "sine", "1234", "vol", "0.9")...)
	extract := func(name string, effect ...string) []int16 {
		t.Helper()
		out := filepath.Join(dir, name)
		args := append(append(append([]string{"-D", "-c", "2"}, raw...), stereo), raw...)
		runSox(t, sox, append(append(args, out), effect...)...)
		return readRawFile(t, out, 1, 0)
	}
	cases := []struct {
		name    string
		channel int
		want    []int16
	}{
		{"left", 0, extract("left.raw", "remix", "1")},
		{"right", 1, extract("right.raw", "remix", "2")},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := readRawFile(t, stereo, 2, c.channel)
			if len(got) != 8000 {
				t.Fatalf("%d samples, want 8000", len(got))
			}
			if !equalInt16(got, c.want) {
				t.Errorf("channel %d differs from sox's remix", c.channel)
			}
		})
	}
	t.Run("mix", func(t *testing.T) {
		l, r := cases[0].want, cases[1].want
		if equalInt16(l, r) {
			t.Fatal("sox wrote the same tone to both channels; the test would not tell them apart")
		}
		soxMix := filepath.Join(dir, "mix.raw")
		runSox(t, sox, append(append(append(append([]string{"-D", "-c", "2"}, raw...), stereo), raw...), "-c", "1", soxMix)...)
		sm := readRawFile(t, soxMix, 1, 0)
		got := readRawFile(t, stereo, 2, -1)
		if len(got) != len(l) || len(sm) != len(l) {
			t.Fatalf("%d mixed samples, sox %d, want %d", len(got), len(sm), len(l))
		}
		bad := 0
		for i := range got {
			want := floorDiv(int(l[i])+int(r[i])+1, 2)
			if int(got[i]) != want || abs(int(got[i])-int(sm[i])) > 1 {
				if bad++; bad < 5 {
					t.Errorf("frame %d: mix %d, rule %d, sox %d", i, got[i], want, sm[i])
				}
			}
		}
	})
}

// readRawFile reads a raw s16le file through RawSource.
func readRawFile(t *testing.T, path string, channels, channel int) []int16 {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s, err := NewRawSource(f, 16000, channels, channel)
	if err != nil {
		t.Fatal(err)
	}
	return readAll(t, s, 1000)
}
