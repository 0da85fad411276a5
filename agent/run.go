package main

import (
	"context"
	"fmt"
	"io"
	"log/slog"
	"math"
	"os"
	"os/signal"
	"sync/atomic"
	"syscall"
	"time"

	"github.com/coreos/go-systemd/v22/daemon"

	"github.com/auscult/auscult/pkg/alarm"
	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/config"
	"github.com/auscult/auscult/pkg/enrol"
	"github.com/auscult/auscult/pkg/monitor"
	"github.com/auscult/auscult/pkg/publish"
	"github.com/auscult/auscult/pkg/store"
)

// shutdownGrace bounds how long stopping may take after SIGTERM.
const shutdownGrace = 5 * time.Second

func runRun(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("run", stderr)
	cfgPath := fs.String("config", "", "the agent's configuration file (required)")
	srcSpec := fs.String("source", "", "override the configured source: device[:NAME], wav:PATH or stdin")
	speed := fs.Float64("speed", -1, "replay speed of a wav source: 1 real time, 0 as fast as possible (default: the config's)")
	clock := fs.String("clock", "", "time stamps: wall (the computer's clock) or samples (counted from the start, for replays); default: wall for a device or stdin, samples for wav")
	clockStart := fs.String("clock-start", "", "with --clock samples: when the sound began, an RFC 3339 time or how long ago (e.g. 3h); default now")
	statsEvery := fs.Duration("stats-every", time.Hour, "how often to log the agent's own figures (windows, lag, heap, goroutines)")
	if rest, err := parse(fs, args); err != nil {
		return err
	} else if len(rest) > 0 {
		return usagef("unexpected argument %q", rest[0])
	}
	if *cfgPath == "" {
		return usagef("--config FILE is required")
	}
	if *clock != "" && *clock != "wall" && *clock != "samples" {
		return usagef("--clock %q: want wall or samples", *clock)
	}
	start := time.Now().UTC()
	if *clockStart != "" {
		if *clock != "samples" {
			return usagef("--clock-start goes with --clock samples")
		}
		if d, err := time.ParseDuration(*clockStart); err == nil && d >= 0 {
			start = start.Add(-d)
		} else if t, err := time.Parse(time.RFC3339Nano, *clockStart); err == nil {
			start = t.UTC()
		} else {
			return usagef("--clock-start %q: want an RFC 3339 time or a duration such as 3h", *clockStart)
		}
	}
	if *statsEvery <= 0 {
		return usagef("--stats-every %v: want a positive duration such as 10m", *statsEvery)
	}
	cfg, err := loadRunConfig(*cfgPath, *srcSpec, *speed)
	if err != nil {
		return err
	}
	log := slog.New(slog.NewTextHandler(stderr, nil)).With("asset", cfg.Asset)
	return serve(cfg, *cfgPath, os.Stdin, log, serveOptions{clock: *clock, start: start, statsEvery: *statsEvery})
}

// loadRunConfig reads the config and applies the command-line overrides.
func loadRunConfig(path, srcSpec string, speed float64) (config.Config, error) {
	cfg, err := config.Load(path)
	if err != nil {
		return cfg, err
	}
	if srcSpec != "" {
		if cfg.Source, err = parseSourceFlag(srcSpec, cfg.Source); err != nil {
			return cfg, err
		}
	}
	if speed >= 0 {
		cfg.Source.Speed = speed
	}
	if cfg.Baseline == "" {
		return cfg, fmt.Errorf("%s: baseline: is required to listen (enrol one with `auscult enroll`)", path)
	}
	return cfg, nil
}

// serveOptions are the command line's settings beyond the config file.
type serveOptions struct {
	clock      string    // "", "wall" or "samples"
	start      time.Time // what the first sample is stamped with under a sample clock
	statsEvery time.Duration
}

// serve runs the agent until its source ends or it is told to stop.
func serve(cfg config.Config, cfgPath string, stdin io.Reader, log *slog.Logger, so serveOptions) error {
	if so.start.IsZero() {
		so.start = time.Now().UTC()
	}
	b, err := baseline.Load(cfg.Baseline)
	if err != nil {
		return err
	}
	lines, err := enrol.Lines(b)
	if err != nil {
		return err
	}
	var pubRef atomic.Pointer[publish.Publisher]
	st, err := openLog(cfg.Log, false, outboxOptions(cfg.MQTT, func() {
		if p := pubRef.Load(); p != nil {
			p.Notify()
		}
	}))
	if err != nil {
		return err
	}
	defer func() {
		if err := st.Close(); err != nil {
			log.Error("closing the log", "err", err)
		}
	}()
	if err := recordBaseline(st, b, cfg.Baseline, log); err != nil {
		return err
	}
	src, err := openSource(cfg.Source, b.Features.Rate, stdin)
	if err != nil {
		return err
	}
	switch so.clock {
	case "wall":
		src.clock = wallClock
	case "samples":
		src.clock = sampleClock
	}
	ac := alarm.DefaultConfig()
	ac.K, ac.N = cfg.Alarm.DebounceK, cfg.Alarm.DebounceN
	ac.ClearFraction, ac.Latch = cfg.Alarm.ClearFraction, cfg.Alarm.Latch
	ac.OffDelay = seconds(cfg.Alarm.OffDelayS)
	ac.MaxShelve = seconds(cfg.Alarm.MaxShelveH * 3600)
	mon, err := monitor.New(monitor.Config{Baseline: b, Asset: cfg.Asset, Alarm: ac, Lines: lines,
		EvidenceBefore: seconds(cfg.Evidence.BeforeS), EvidenceAfter: seconds(cfg.Evidence.AfterS),
		SummaryPeriod: time.Duration(cfg.Log.SummaryMin) * time.Minute,
		Clock:         src.clock(so.start, b.Features.Rate), Logger: log}, st)
	if err != nil {
		src.closeFn(context.Background())
		return err
	}
	lk, err := startLink(cfg, cfgPath, b, st, mon, &pubRef, log)
	if err != nil {
		src.closeFn(context.Background())
		return err
	}
	pages, err := startWeb(cfg, st, liveView(cfg, b, mon, src, lk, time.Now().UTC()), log)
	if err != nil {
		lk.stop(log)
		src.closeFn(context.Background())
		return err
	}

	ctx, stop := signal.NotifyContext(context.Background(), syscall.SIGTERM, syscall.SIGINT)
	defer stop()
	if src.interrupt != nil {
		defer context.AfterFunc(ctx, src.interrupt)()
	}
	hup := make(chan os.Signal, 1)
	signal.Notify(hup, syscall.SIGHUP)
	defer signal.Stop(hup)
	done := make(chan struct{})
	helpers := startHelpers(ctx, done, mon, src, hup, cfg, cfgPath, log)
	helpers.Go(func() { logStats(done, so.statsEvery, mon, log) })

	log.Info("listening", "source", src.desc, "baseline", b.ID, "threshold", b.Calib.Threshold,
		"log", cfg.Log.Path, "version", version)
	daemon.SdNotify(false, daemon.SdNotifyReady)
	runErr := mon.Run(ctx, src)
	daemon.SdNotify(false, daemon.SdNotifyStopping)
	log.Info("analysis ended", "windows", mon.Status().Windows, "reason", stopReason(ctx, runErr))
	closeCtx, cancel := context.WithTimeout(context.Background(), shutdownGrace)
	defer cancel()
	if err := src.closeFn(closeCtx); err != nil {
		log.Error("closing the source", "err", err)
	}
	close(done)
	helpers.Wait()
	pages.stop(log)
	lk.stop(log)
	logFigures(mon, log, "stopped", "reason", stopReason(ctx, runErr))
	return runErr
}

func stopReason(ctx context.Context, err error) string {
	switch {
	case err != nil:
		return "error"
	case ctx.Err() != nil:
		return "signal"
	}
	return "end of source"
}

func seconds(s float64) time.Duration { return time.Duration(s * float64(time.Second)) }

// openLog opens the local log with the configured limits.
func openLog(l config.Log, readOnly bool, outbox store.OutboxOptions) (*store.Store, error) {
	day := 24 * time.Hour
	return store.Open(l.Path, store.Options{Timeout: 2 * time.Second, ReadOnly: readOnly, Outbox: outbox,
		MaxBytes: int64(l.MaxMB * (1 << 20)), FlushInterval: seconds(l.FlushS),
		MaxAge: store.Ages{Events: time.Duration(l.EventDays) * day, Trend: time.Duration(l.TrendDays) * day,
			Summaries: time.Duration(l.TrendDays) * day, Clips: time.Duration(l.ClipDays) * day}})
}

// recordBaseline adds b to the log's baseline history unless it is already
// the newest entry, with its distance from the one before.
func recordBaseline(st *store.Store, b *baseline.Baseline, path string, log *slog.Logger) error {
	prev, err := st.Baseline(0)
	if err == nil && prev.FileID == b.ID {
		return nil
	}
	entry := store.Baseline{Created: b.Created, FileID: b.ID, Asset: b.Asset, Threshold: b.Calib.Threshold}
	if err == nil {
		entry.Previous = prev.ID
		entry.Distance = math.NaN()
		if old, lerr := baseline.Unmarshal(prev.File, "previous baseline"); lerr == nil {
			entry.Distance = baselineDistance(old, b)
		}
	}
	if entry.File, err = os.ReadFile(path); err != nil {
		return err
	}
	if _, err := st.AddBaseline(entry); err != nil {
		return err
	}
	if entry.Previous == 0 {
		log.Info("baseline recorded in the log: the first for this log", "baseline", b.ID)
	} else {
		log.Info("baseline recorded in the log", "baseline", b.ID, "previous", prev.FileID, "distance_from_previous", entry.Distance)
	}
	return nil
}

// baselineDistance is how far the healthy sound moved between two
// enrolments: the old model's distance of the new healthy mean. NaN when
// they were enrolled with different settings.
func baselineDistance(old, cur *baseline.Baseline) float64 {
	if old.Features != cur.Features || old.Embed != cur.Embed || old.Model.Dim() != cur.Model.Dim() {
		return math.NaN()
	}
	return old.Model.NewScorer().Distance(cur.Model.Mean)
}
