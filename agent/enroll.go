package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/config"
	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/enrol"
	"github.com/auscult/auscult/pkg/features"
)

// enrollOptions are the settings shared by enroll and the ablation tooling.
type enrollOptions struct {
	asset    string
	rate     int
	channel  int
	faProb   float64
	warnProb float64
	k, n     int
	floor    float64
	centres  int
	parts    string
	trim     int
	window   int
}

func (o *enrollOptions) configs() (features.Config, embed.Config, error) {
	fc := features.DefaultConfig()
	if o.rate < 8000 || o.rate > 48000 {
		return fc, embed.Config{}, usagef("--rate %d: the analysis rate must be 8000 to 48000 Hz", o.rate)
	}
	fc.Rate = o.rate
	// Frames of about 64 ms at any rate: 1024 samples at 16 kHz.
	fc.FrameLen = 1024
	for fc.FrameLen*16000 < 1024*o.rate*3/4 {
		fc.FrameLen *= 2
	}
	for fc.FrameLen*16000 > 1024*o.rate*3/2 {
		fc.FrameLen /= 2
	}
	fc.Hop = fc.FrameLen / 2
	// Stay inside the resampler's passband, so a recording scores the same
	// whatever rate it was made at (and clear of any converter's roll-off).
	fc.FMax = audio.ResamplePassband * float64(o.rate) / 2
	ec := embed.DefaultConfig()
	ec.Trim = o.trim
	if o.window != 0 {
		ec.Window = o.window
	}
	ec.Mean, ec.Std, ec.Low, ec.Fine = false, false, false, false
	for _, p := range strings.Split(o.parts, ",") {
		switch strings.TrimSpace(p) {
		case "mean":
			ec.Mean = true
		case "low":
			ec.Low = true
		case "std":
			ec.Std = true
		case "fine":
			ec.Fine = true
		default:
			return fc, ec, usagef("--parts: unknown part %q (use low, fine, mean, std)", p)
		}
	}
	if err := fc.Validate(); err != nil {
		return fc, ec, usagef("--rate: %v", err)
	}
	if err := ec.Validate(fc.Hop); err != nil {
		return fc, ec, usagef("%v", err)
	}
	return fc, ec, nil
}

func (o *enrollOptions) enrolOptions(fc features.Config, ec embed.Config) enrol.Options {
	eo := enrol.DefaultOptions()
	eo.Features, eo.Embed, eo.Asset = fc, ec, o.asset
	eo.Model.Floor = o.floor
	eo.Model.Centroids = o.centres
	eo.Calibration.FalseAlarmProb, eo.Calibration.WarnProb = o.faProb, o.warnProb
	eo.Calibration.K, eo.Calibration.N = o.k, o.n
	return eo
}

func runEnroll(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("enroll", stderr)
	out := fs.String("out", "", "write the baseline to this `file` (required)")
	var o enrollOptions
	fs.StringVar(&o.asset, "asset", "", "asset tag stored in the baseline, e.g. P-101A")
	fs.IntVar(&o.rate, "rate", 16000, "analysis sample rate in Hz; recordings are resampled to it")
	fs.IntVar(&o.channel, "channel", -1, "channel to analyse, from 0; -1 mixes all channels")
	fs.Float64Var(&o.faProb, "false-alarm-prob", 0.002, "per-window false-alarm probability the alarm threshold is set for")
	fs.Float64Var(&o.warnProb, "warn-prob", 0.02, "per-window probability the lower warning threshold is set for")
	debounce := fs.String("debounce", "3/5", "raise after K of N windows over threshold, as K/N")
	fs.Float64Var(&o.floor, "floor", baseline.DefaultModelOptions().Floor, "scale of the eigenvalue floor (1 = the sampling-noise edge)")
	fs.IntVar(&o.centres, "centres", baseline.DefaultCentroids, "most healthy operating points to try (k-means centres, the count chosen on held-out recordings); 1 keeps one mean")
	fs.StringVar(&o.parts, "parts", "low,fine", "embedding parts: low (quiet floor per mel band), fine (low-frequency lines), mean, std")
	fs.IntVar(&o.trim, "trim", embed.DefaultConfig().Trim, "sub-window values trimmed at each end per dimension")
	fs.IntVar(&o.window, "window", embed.DefaultConfig().Window, "sub-windows (1.024 s each) per analysis window; longer needs more enrolment and delays alarms")
	live := fs.Bool("live", false, "enrol from the configured source (the microphone) instead of files")
	cfgPath := fs.String("config", "", "with --live: the agent's configuration file (source, asset, baseline path)")
	srcSpec := fs.String("source", "", "with --live: override the configured source: device[:NAME], wav:PATH or stdin")
	duration := fs.Duration("duration", 30*time.Minute, "with --live: how long to listen (Ctrl-C ends early)")
	paths, err := parse(fs, args)
	if err != nil {
		return err
	}
	var cfg config.Config
	if *live {
		if len(paths) > 0 {
			return usagef("--live listens to the configured source; leave out the files (%s)", paths[0])
		}
		if *cfgPath == "" {
			return usagef("--live needs --config FILE")
		}
		if *duration < time.Minute || *duration > 24*time.Hour {
			return usagef("--duration %v: want between 1m and 24h (30m is the usual)", *duration)
		}
		if cfg, err = config.Load(*cfgPath); err != nil {
			return err
		}
		if *srcSpec != "" {
			if cfg.Source, err = parseSourceFlag(*srcSpec, cfg.Source); err != nil {
				return err
			}
		}
		if *out == "" {
			*out = cfg.Baseline
		}
		if o.asset == "" {
			o.asset = cfg.Asset
		}
		o.channel = 0 // the source picks its channel
	}
	if *out == "" {
		return usagef("--out is required")
	}
	if _, err := fmt.Sscanf(*debounce, "%d/%d", &o.k, &o.n); err != nil || o.k < 1 || o.n < o.k {
		return usagef("--debounce %q: want K/N with 1 <= K <= N, e.g. 3/5", *debounce)
	}
	switch {
	case !(o.faProb > 0 && o.faProb < 0.5):
		return usagef("--false-alarm-prob %g: want a probability between 0 and 0.5, e.g. 0.002", o.faProb)
	case !(o.warnProb > o.faProb && o.warnProb < 0.5):
		return usagef("--warn-prob %g: want a probability above --false-alarm-prob (%g) and below 0.5", o.warnProb, o.faProb)
	case !(o.floor > 0):
		return usagef("--floor %g: want a positive scale, 1 is the default", o.floor)
	case o.centres < 1 || o.centres > 16:
		return usagef("--centres %d: want 1 to 16 (1 keeps one mean, %d is the default)", o.centres, baseline.DefaultCentroids)
	case o.window < 2:
		return usagef("--window %d: want 2 or more sub-windows, 5 is the default", o.window)
	case o.trim < 0:
		return usagef("--trim %d: want 0 or more", o.trim)
	}
	if _, _, err := o.configs(); err != nil {
		return err
	}
	if err := writable(*out); err != nil {
		return err
	}
	if *live {
		return enrollLive(cfg.Source, *duration, *out, o, stdout, stderr)
	}
	files, err := wavPaths(paths)
	if err != nil {
		return err
	}
	old, err := previousBaseline(*out)
	if err != nil {
		return err
	}
	b, err := enroll(files, o, stderr)
	if err != nil {
		return err
	}
	return saveKeeping(b, old, *out, stdout)
}

// enroll builds a baseline from healthy files.
func enroll(files []string, o enrollOptions, stderr io.Writer) (*baseline.Baseline, error) {
	fc, ec, err := o.configs()
	if err != nil {
		return nil, err
	}
	e, err := enrol.New(o.enrolOptions(fc, ec))
	if err != nil {
		return nil, err
	}
	prog := newProgress(stderr, "enrolling", len(files))
	defer prog.end()
	for _, f := range files {
		src, closeFn, err := openAt(f, fc.Rate, o.channel)
		if err != nil {
			return nil, err
		}
		before := e.Seconds()
		err = e.Add(f, src, nil)
		closeFn()
		if err != nil {
			return nil, fmt.Errorf("%s: %w", f, err)
		}
		prog.step(e.Seconds() - before)
	}
	return e.Finish()
}

func printEnrolment(w io.Writer, b *baseline.Baseline, path string) {
	c, e := b.Calib, b.Enrolled
	fmt.Fprintf(w, "baseline %s written to %s\n", b.ID, path)
	if b.Asset != "" {
		fmt.Fprintf(w, "  asset       %s\n", b.Asset)
	}
	fmt.Fprintf(w, "  enrolled    %d recordings, %.1f min of healthy sound, %d windows\n", e.Recordings,
		e.Seconds/60, e.Windows)
	fmt.Fprintf(w, "  model       %d dimensions, %d whitened components (eigenvalue floor x%.3g)\n", e.Dim, e.Components, b.Options.Floor)
	fmt.Fprintf(w, "  centres     %d healthy operating point(s), the best of 1 to %d on held-out recordings\n", max(e.OperatingPoints, 1), max(b.Options.Centroids, 1))
	fmt.Fprintf(w, "  held out    %d windows in %d folds: median distance %.3f, 99th percentile %.3f\n",
		c.HeldOutWindows, c.Folds, c.HeldOutMedian, c.HeldOutP99)
	fmt.Fprintf(w, "  gamma fit   shape %.3g, scale %.3g, location %.3g (Kolmogorov-Smirnov %.3f)\n", c.Shape, c.Scale, c.Loc, c.KS)
	fmt.Fprintf(w, "  alarm at    %.4f, set for %.2g %% of healthy windows (%.2f %% of held-out windows are above it)\n",
		c.Threshold, 100*c.FalseAlarmProb, 100*c.HeldOutOver)
	fmt.Fprintf(w, "  warning at  %.4f, set for %.2g %% of healthy windows (%.2f %% of held-out windows are above it)\n",
		c.WarnThreshold, 100*c.WarnProb, 100*c.HeldOutOverWarn)
	fmt.Fprintf(w, "  expected    %.3g false alarms per day raising on %d of %d windows, one window every %.2f s,\n"+
		"              if windows were independent (overlap makes them less so)\n",
		c.FalseAlarmsPerDay, c.K, c.N, c.StepSeconds)
	fmt.Fprintf(w, "  level       %.1f dBFS mean, %.1f dB standard deviation\n", b.Level.MeanDBFS, b.Level.StdDB)
}

// writable checks, before any analysis, that a file can be created beside
// path, so a long enrolment does not fail at its last step.
func writable(path string) error {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, ".auscult-check-*")
	if err != nil {
		return fmt.Errorf("--out %s: cannot write into %s: %w", path, dir, errors.Unwrap(err))
	}
	f.Close()
	return os.Remove(f.Name())
}
