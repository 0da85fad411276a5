package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"

	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/sim"
)

func runSimulate(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("simulate", stderr)
	out := fs.String("out", "", "write the data set into this `folder` (required)")
	seed := fs.Int64("seed", 1, "seed: each seed is a different pump with its own recordings")
	def := sim.DefaultOptions(1)
	train := fs.Int("train", def.TrainClips, "healthy recordings for enrolment")
	normal := fs.Int("test-normal", def.TestNormal, "healthy recordings in the test set")
	perFault := fs.Int("per-fault", def.TestPerFaultSeverity, "test recordings per fault and severity")
	seconds := fs.Float64("seconds", def.ClipSeconds, "length of each recording in seconds")
	rate := fs.Int("rate", def.Rate, "sample rate of the files in Hz")
	script := fs.String("script", "", "instead of files, stream raw s16le PCM to stdout following this `script`, "+
		"e.g. healthy@2h,bearing_outer/moderate@10m,stopped@5m (for `auscult run --source stdin`)")
	snr := fs.Float64("snr", 6, "signal-to-noise ratio of a streamed script in dB (one of +10, +6, +3, 0, -3, -6)")
	take := fs.Int("take", 0, "with --script: which recording of the same pump (another take has other background, nuisances and wander)")
	if _, err := parse(fs, args); err != nil {
		return err
	}
	if *script != "" {
		if *out != "" {
			return usagef("--script streams to stdout; leave out --out")
		}
		phases, err := parseScript(*script)
		if err != nil {
			return err
		}
		if !snrAllowed(*snr) {
			return usagef("--snr %g: want one of +10, +6, +3, 0, -3, -6", *snr)
		}
		fmt.Fprintf(stderr, "streaming pump %s at %g dB SNR, %d Hz s16le mono: %s\n",
			sim.NewMachine(*seed).Asset, *snr, *rate, describeScript(phases))
		if *take < 0 {
			return usagef("--take %d: want 0 or more", *take)
		}
		return streamSim(stdout, *seed, *take, *snr, *rate, phases)
	}
	if *out == "" {
		return usagef("--out is required (or --script to stream)")
	}
	// sim.Plan reads zero as "use the default", so --per-fault 0 would
	// quietly write 5 recordings per fault and severity: refuse it.
	if *train < 2 || *normal < 1 || *perFault < 1 || *seconds < 1 || *rate < 8000 || *rate > 48000 {
		return usagef("need --train >= 2, --test-normal >= 1, --per-fault >= 1, --seconds >= 1, --rate 8000..48000")
	}
	for _, d := range []string{"train", "test"} {
		if old, _ := filepath.Glob(filepath.Join(*out, d, "*.wav")); len(old) > 0 {
			return fmt.Errorf("%s already holds %d recordings; simulate into an empty folder so runs never mix",
				filepath.Join(*out, d), len(old))
		}
	}
	opt := sim.DefaultOptions(*seed)
	opt.TrainClips, opt.TestNormal, opt.TestPerFaultSeverity = *train, *normal, *perFault
	opt.ClipSeconds, opt.Rate = *seconds, *rate
	m, clips := sim.Plan(opt)
	for _, d := range []string{"train", "test"} {
		if err := os.MkdirAll(filepath.Join(*out, d), 0o755); err != nil {
			return err
		}
	}
	labels, err := os.Create(filepath.Join(*out, "test", "labels.csv"))
	if err != nil {
		return err
	}
	defer labels.Close()
	fmt.Fprintln(labels, sim.LabelsCSVHeader())
	buf := make([]int16, int(float64(opt.Rate)*opt.ClipSeconds))
	prog := newProgress(stderr, "simulating", len(clips))
	nTrain, nTest := 0, 0
	for _, c := range clips {
		sim.Render(m, c, opt.Rate, opt.ClipSeconds, buf)
		if err := audio.WriteWAV(filepath.Join(*out, c.Split, c.Name), opt.Rate, buf); err != nil {
			return err
		}
		if c.Split == "test" {
			fmt.Fprintln(labels, c.CSVRow())
			nTest++
		} else {
			nTrain++
		}
		prog.step(opt.ClipSeconds)
	}
	prog.end()
	if err := labels.Close(); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "%s, pump %s: %d healthy recordings in %s, %d test recordings with labels.csv in %s\n",
		m.Site, m.Asset, nTrain, filepath.Join(*out, "train"), nTest, filepath.Join(*out, "test"))
	return nil
}
