package main

import (
	"context"
	"log/slog"
	"os"
	"reflect"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/coreos/go-systemd/v22/daemon"

	"github.com/auscult/auscult/pkg/capture"
	"github.com/auscult/auscult/pkg/config"
	"github.com/auscult/auscult/pkg/monitor"
)

// minStallLimit is the shortest time the processing loop may go without a
// window before the watchdog stops vouching for it (a window comes about
// every 2 s); the limit is the watchdog timeout itself when that is longer.
const minStallLimit = 10 * time.Second

// startHelpers starts the goroutines that serve a running agent: capture
// diagnostics into the log, the systemd watchdog, and SIGHUP handling. They
// stop when done is closed; wait for them with the returned group.
func startHelpers(ctx context.Context, done <-chan struct{}, mon *monitor.Monitor, src *liveSource,
	hup <-chan os.Signal, cfg config.Config, cfgPath string, log *slog.Logger) *sync.WaitGroup {
	var wg sync.WaitGroup
	var deviceTrouble atomic.Int64 // unix nanos of the last capture failure
	if src.capture != nil {
		wg.Go(func() { captureDiagnostics(src.capture, mon, &deviceTrouble, log) })
	}
	if timeout, err := daemon.SdWatchdogEnabled(false); err == nil && timeout > 0 {
		wg.Go(func() { watchdog(done, timeout/2, max(timeout, minStallLimit), mon, &deviceTrouble, log) })
	}
	wg.Go(func() {
		// The running source may come from --source; a reload compares the
		// file's source with what the file said at the start.
		fileSource := cfg.Source
		if c, err := config.Load(cfgPath); err == nil {
			fileSource = c.Source
		}
		for {
			select {
			case <-done:
				return
			case <-hup:
				cfg = reload(cfg, fileSource, cfgPath, mon, log)
			}
		}
	})
	return &wg
}

// captureDiagnostics logs every capture event as a diagnostic. It ends when
// the capture closes its channel.
func captureDiagnostics(c *capture.Capture, mon *monitor.Monitor, trouble *atomic.Int64, log *slog.Logger) {
	for d := range c.Diagnostics() {
		code := "capture." + strings.ReplaceAll(d.Kind.String(), " ", "_")
		if d.Kind == capture.KindOpenFailed || d.Kind == capture.KindDeviceError {
			trouble.Store(time.Now().UnixNano())
		}
		if d.Kind == capture.KindOpened && d.Attempt == 0 {
			log.Info("capture device opened", "device", d.Device)
			continue
		}
		mon.Diagnostic(d.Time, code, d.String(), map[string]float64{"sample_pos": float64(d.StreamPos),
			"lost_samples": float64(d.Samples), "duration_s": d.Duration.Seconds(), "attempt": float64(d.Attempt)})
	}
}

// watchdog tells systemd the agent is alive only while the processing loop
// makes windows, or while the capture is known to be reopening a lost
// device (then the loop waits for sound, it is not stuck).
func watchdog(done <-chan struct{}, every, stallLimit time.Duration, mon *monitor.Monitor, trouble *atomic.Int64, log *slog.Logger) {
	start := time.Now()
	t := time.NewTicker(every)
	defer t.Stop()
	for {
		select {
		case <-done:
			return
		case now := <-t.C:
			last := mon.LastWindow()
			if last.IsZero() {
				last = start
			}
			waiting := now.Sub(time.Unix(0, trouble.Load())) < stallLimit
			if now.Sub(last) < stallLimit || waiting {
				daemon.SdNotify(false, daemon.SdNotifyWatchdog)
			} else {
				log.Error("processing loop stalled; not feeding the watchdog", "since", now.Sub(last).Round(time.Second))
			}
		}
	}
}

// reload re-reads the configuration on SIGHUP and returns the one now in
// force. A bad file is reported and changes nothing. The alarm's clear
// fraction, off-delay, latching and shelve limit apply at once, keeping the
// alarm state; everything else (site, asset, source, log, baseline,
// debounce, evidence, mqtt, web) waits for a restart, which the log line
// names.
func reload(old config.Config, fileSource config.Source, path string, mon *monitor.Monitor, log *slog.Logger) config.Config {
	cfg, err := config.Load(path)
	if err != nil {
		log.Error("config reload refused; keeping the running configuration", "err", err)
		return old
	}
	sameSource := reflect.DeepEqual(cfg.Source, fileSource)
	cfg.Source = old.Source // the running source may come from --source
	applied := old
	a, b := old.Alarm, cfg.Alarm
	if a != b && a.DebounceK == b.DebounceK && a.DebounceN == b.DebounceN {
		if err := mon.RetuneAlarm(b.ClearFraction, seconds(b.OffDelayS), b.Latch, seconds(b.MaxShelveH*3600)); err != nil {
			log.Error("config reload: alarm settings not applied", "err", err)
		} else {
			applied.Alarm = b
			log.Info("config reload: alarm settings applied", "clear_fraction", b.ClearFraction,
				"off_delay_s", b.OffDelayS, "latch", b.Latch, "max_shelve_h", b.MaxShelveH)
		}
	}
	var later []string
	for _, c := range []struct {
		name string
		same bool
	}{{"site", cfg.Site == old.Site}, {"asset", cfg.Asset == old.Asset}, {"baseline", cfg.Baseline == old.Baseline},
		{"alarm.debounce", applied.Alarm == cfg.Alarm}, {"evidence", cfg.Evidence == old.Evidence}, {"log", cfg.Log == old.Log},
		{"mqtt", reflect.DeepEqual(cfg.MQTT, old.MQTT)}, {"source", sameSource},
		{"web", reflect.DeepEqual(cfg.Web, old.Web)}} {
		if !c.same {
			later = append(later, c.name)
		}
	}
	if len(later) > 0 {
		log.Warn("config reload: these changes take effect at the next restart", "changed", strings.Join(later, ","))
	} else if reflect.DeepEqual(applied, old) {
		log.Info("config reload: no changes")
	}
	return applied
}

// logStats logs the agent's own figures every interval until done.
func logStats(done <-chan struct{}, every time.Duration, mon *monitor.Monitor, log *slog.Logger) {
	t := time.NewTicker(every)
	defer t.Stop()
	for {
		select {
		case <-done:
			return
		case <-t.C:
			logFigures(mon, log, "figures")
		}
	}
}

// logFigures logs windows processed, the decision lag, heap and goroutines:
// what shows a leak or a loop falling behind.
func logFigures(mon *monitor.Monitor, log *slog.Logger, msg string, extra ...any) {
	s := mon.Status()
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	args := append([]any{"windows", s.Windows, "alarm_state", s.Alarm, "machine", s.Machine,
		"lag_mean_ms", s.LagMean.Milliseconds(), "lag_max_ms", s.LagMax.Milliseconds(),
		"heap_bytes", ms.HeapAlloc, "goroutines", runtime.NumGoroutine()}, extra...)
	log.Info(msg, args...)
}
