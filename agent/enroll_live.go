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
	old, err := previousBaseline(out)
	if err != nil {
		return err
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
	if src.interrupt != nil { // Ctrl-C ends a read waiting for a microphone that cannot be opened
		defer context.AfterFunc(ctx, src.interrupt)()
	}
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
		if e.Seconds() == 0 {
			if why := deviceTrouble(src); why != "" {
				return fmt.Errorf("%w\n%s delivered no sound: %s", err, src.desc, why)
			}
		}
		return err
	}
	return saveKeeping(b, old, out, stdout)
}

// previousBaseline loads the baseline already at out, if there is one. A
// file there that is not a readable baseline is an error: it is never
// overwritten.
func previousBaseline(out string) (*baseline.Baseline, error) {
	if _, err := os.Stat(out); err != nil {
		return nil, nil
	}
	old, err := baseline.Load(out)
	if err != nil {
		return nil, fmt.Errorf("%s exists but is not a baseline this version reads (%w); move it away or choose another --out", out, err)
	}
	return old, nil
}

// saveKeeping writes b to out and prints its summary. A previous baseline
// old at out is kept beside it as out.<id>, and how far the new healthy
// sound lies from it is shown: a new baseline never silently replaces the
// old one.
func saveKeeping(b, old *baseline.Baseline, out string, stdout io.Writer) error {
	if old == nil {
		if err := b.Save(out); err != nil {
			return err
		}
		printEnrolment(stdout, b, out)
		return nil
	}
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
