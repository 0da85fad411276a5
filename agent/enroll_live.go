package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"syscall"
	"time"

	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/config"
	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/enrol"
	"github.com/auscult/auscult/pkg/features"
	"github.com/auscult/auscult/pkg/gate"
)

// progressEvery is how often, in seconds of sound, live enrolment reports.
const progressEvery = 30

// enrollLive listens to the configured source for d and enrols from it.
// An existing baseline at out is kept beside it under its ID and the
// distance between the two is shown: a new baseline never silently replaces
// the old one.
func enrollLive(s config.Source, d time.Duration, out string, o enrollOptions, stdout, stderr io.Writer) error {
	fc, ec, err := o.configs()
	if err != nil {
		return err
	}
	e, err := enrol.New(o.enrolOptions(fc, ec))
	if err != nil {
		return err
	}
	var old *baseline.Baseline
	if _, err := os.Stat(out); err == nil {
		if old, err = baseline.Load(out); err != nil {
			return fmt.Errorf("%s exists but is not a baseline this version reads (%w); move it away or choose another --out", out, err)
		}
	}
	stopped, err := stopFilter(old, fc, ec)
	if err != nil {
		return err
	}
	e.SetFilter(stopped)
	src, err := openSource(s, fc.Rate, os.Stdin)
	if err != nil {
		return err
	}
	defer src.closeFn(context.Background())
	ctx, stop := signal.NotifyContext(context.Background(), syscall.SIGINT, syscall.SIGTERM)
	defer stop()
	lim := &limited{ctx: ctx, Source: src, left: int64(d.Seconds() * float64(fc.Rate))}
	fmt.Fprintf(stderr, "enrolling from %s for %v (Ctrl-C ends early and enrols what was heard)\n", src.desc, d)
	next := float64(progressEvery)
	err = e.Add("live: "+src.desc, lim, func(p enrol.Progress) error {
		if p.Seconds >= next {
			next += progressEvery
			running := "n/a (first enrolment)"
			if stopped != nil {
				running = fmt.Sprintf("%.0f %%", 100*float64(p.Windows)/float64(max(p.Offered, 1)))
			}
			fmt.Fprintf(stderr, "  %s of %s heard, running %s, clipping %.3f %%, level %.1f dBFS\n",
				clock(p.Seconds), clock(d.Seconds()), running, 100*p.ClipFraction, p.LevelDBFS)
		}
		return nil
	})
	if err != nil && !errors.Is(err, io.EOF) {
		return err
	}
	b, err := e.Finish()
	if err != nil {
		return err
	}
	if old != nil {
		keep := fmt.Sprintf("%s.%s", out, old.ID)
		if err := os.Rename(out, keep); err != nil {
			return fmt.Errorf("keeping the previous baseline: %w", err)
		}
		if err := b.Save(out); err != nil {
			os.Rename(keep, out)
			return err
		}
		printEnrolment(stdout, b, out)
		dist := baselineDistance(old, b)
		fmt.Fprintf(stdout, "  previous    %s (enrolled %s) kept as %s\n", old.ID, old.Created.Format("2006-01-02"), keep)
		if math.IsNaN(dist) {
			fmt.Fprintf(stdout, "  moved       not comparable: the two were enrolled with different settings\n")
		} else {
			fmt.Fprintf(stdout, "  moved       the new healthy sound scores %.4f on the previous baseline (its alarm level %.4f)\n",
				dist, old.Calib.Threshold)
		}
		return nil
	}
	if err := b.Save(out); err != nil {
		return err
	}
	printEnrolment(stdout, b, out)
	return nil
}

// stopFilter returns a window filter that drops windows in which the
// previous baseline's gate hears the machine stopped, so a pump that stops
// during enrolment does not become part of "healthy". Without a comparable
// previous baseline it returns nil (keep all; the quality checks still
// refuse wildly non-stationary sound).
func stopFilter(old *baseline.Baseline, fc features.Config, ec embed.Config) (func(*embed.Window) bool, error) {
	if old == nil || old.Features != fc || old.Embed != ec {
		return nil, nil
	}
	lines, err := enrol.Lines(old)
	if err != nil {
		return nil, err
	}
	emb, err := embed.New(fc, ec)
	if err != nil {
		return nil, err
	}
	g, err := gate.NewMachine(gate.DefaultMachineConfig(), gate.Reference{Level: old.Level, Layout: emb.Layout(), Lines: lines})
	if err != nil {
		return nil, err
	}
	var ev []gate.MachineEvent
	return func(w *embed.Window) bool {
		ev = g.Update(w, ev[:0])
		return g.State() != gate.Stopped
	}, nil
}

// limited ends a source after a number of samples or when ctx is done.
type limited struct {
	audio.Source
	ctx  context.Context
	left int64
}

func (l *limited) Read(p []int16) (int, error) {
	if l.left <= 0 || l.ctx.Err() != nil {
		return 0, io.EOF
	}
	p = p[:min(int64(len(p)), l.left)]
	n, err := l.Source.Read(p)
	l.left -= int64(n)
	return n, err
}

func clock(seconds float64) string {
	s := int(seconds)
	return fmt.Sprintf("%d:%02d", s/60, s%60)
}
