package main

import (
	"context"
	"crypto/tls"
	"errors"
	"fmt"
	"io"
	"math"
	"net"
	"os"
	"os/signal"
	"path/filepath"
	"syscall"
	"time"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/config"
	"github.com/auscult/auscult/pkg/gate"
	"github.com/auscult/auscult/pkg/site"
)

// checkSeconds is how much sound check listens to.
const checkSeconds = 5

func runCheck(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("check", stderr)
	cfgPath := fs.String("config", "", "the agent's configuration file (required)")
	srcSpec := fs.String("source", "", "override the configured source: device[:NAME], wav:PATH or stdin")
	if rest, err := parse(fs, args); err != nil {
		return err
	} else if len(rest) > 0 {
		return usagef("unexpected argument %q", rest[0])
	}
	if *cfgPath == "" {
		return usagef("--config FILE is required")
	}
	cfg, err := loadRunConfig(*cfgPath, *srcSpec, 0)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "config      %s: valid (asset %s)\n", *cfgPath, cfg.Asset)
	var failed []string
	b, err := baseline.Load(cfg.Baseline)
	if err != nil {
		fmt.Fprintf(stdout, "baseline    FAIL %v\n", err)
		failed = append(failed, "baseline")
	} else {
		fmt.Fprintf(stdout, "baseline    %s, enrolled %s, %.0f min of healthy sound, alarm at %.4f\n",
			b.ID, b.Created.Format("2006-01-02"), b.Enrolled.Seconds/60, b.Calib.Threshold)
	}
	if err := logWritable(cfg.Log.Path); err != nil {
		fmt.Fprintf(stdout, "log         FAIL %v\n", err)
		failed = append(failed, "log")
	} else {
		fmt.Fprintf(stdout, "log         %s: writable\n", cfg.Log.Path)
	}
	rate := 16000
	if b != nil {
		rate = b.Features.Rate
	}
	if line, err := checkSound(rate, cfg.Source, b); err != nil {
		fmt.Fprintf(stdout, "microphone  FAIL %v\n", err)
		failed = append(failed, "microphone")
	} else {
		fmt.Fprintf(stdout, "microphone  %s\n", line)
	}
	if len(cfg.MQTT.Brokers()) == 0 {
		fmt.Fprintln(stdout, "broker      none configured (mqtt.url): alarms stay in the local log")
	} else if lines, err := checkBroker(cfg); err != nil {
		fmt.Fprintf(stdout, "broker      FAIL %v\n", err)
		failed = append(failed, "broker")
	} else {
		bad := false
		for _, l := range lines {
			fmt.Fprintf(stdout, "broker      %s\n", l.text)
			bad = bad || !l.ok
		}
		if bad {
			failed = append(failed, "broker")
		}
	}
	if line, err := checkWeb(cfg.Web); err != nil {
		fmt.Fprintf(stdout, "web         FAIL %v\n", err)
		failed = append(failed, "web")
	} else {
		fmt.Fprintf(stdout, "web         %s\n", line)
	}
	if len(failed) > 0 {
		return fmt.Errorf("%d check(s) failed: %v", len(failed), failed)
	}
	fmt.Fprintln(stdout, "all checks passed")
	return nil
}

// checkWeb checks the site-visit pages can start: the token is readable
// and long enough, the TLS files load, the address is free.
func checkWeb(w config.Web) (string, error) {
	if w.Listen == "" {
		return "off (web.listen): no site-visit pages", nil
	}
	token, err := readSecret(w.TokenFile, w.TokenEnv, "web.token")
	if err != nil {
		return "", err
	}
	if len(token) < site.MinTokenLen {
		return "", fmt.Errorf("the web token is %d characters, at least %d (make one with: head -c 24 /dev/urandom | base64)", len(token), site.MinTokenLen)
	}
	scheme := "http"
	if w.TLSCertFile != "" {
		if _, err := tls.LoadX509KeyPair(w.TLSCertFile, w.TLSKeyFile); err != nil {
			return "", fmt.Errorf("web.tls_cert_file / tls_key_file: %w", err)
		}
		scheme = "https"
	}
	ln, err := net.Listen("tcp", w.Listen)
	if err != nil {
		return "", fmt.Errorf("web.listen %s: %w (is the agent already running?)", w.Listen, err)
	}
	ln.Close()
	return fmt.Sprintf("%s://%s/ can be served; token of %d characters", scheme, w.Listen, len(token)), nil
}

// logWritable checks the log's folder takes files, without touching a
// log a running agent may hold.
func logWritable(path string) error {
	f, err := os.CreateTemp(filepath.Dir(path), ".auscult-check-*")
	if err != nil {
		return err
	}
	name := f.Name()
	f.Close()
	return os.Remove(name)
}

// checkSound listens for a few seconds and judges the level and the
// sensor's health.
func checkSound(rate int, s config.Source, b *baseline.Baseline) (string, error) {
	s.Speed = 0
	src, err := openSource(s, rate, os.Stdin)
	if err != nil {
		return "", err
	}
	defer src.closeFn(context.Background())
	sensor, err := gate.NewSensor(gate.DefaultSensorConfig())
	if err != nil {
		return "", err
	}
	// A microphone that cannot be opened, or is busy, delivers nothing: the
	// deadline (and Ctrl-C) interrupts the waiting read instead of hanging.
	wait := checkSeconds*time.Second + 5*time.Second
	deadline := time.Now().Add(wait)
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	if src.interrupt != nil {
		defer context.AfterFunc(ctx, src.interrupt)()
		defer time.AfterFunc(wait, src.interrupt).Stop()
	}
	buf := make([]int16, rate/10)
	var n int
	var sum float64
	var peak int
	for n < checkSeconds*rate && time.Now().Before(deadline) && ctx.Err() == nil {
		k, err := src.Read(buf)
		for _, v := range buf[:k] {
			sum += float64(v) * float64(v)
			peak = max(peak, abs16(v))
		}
		sensor.Observe(buf[:k])
		n += k
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return "", err
		}
	}
	if ctx.Err() != nil {
		return "", fmt.Errorf("%s: interrupted after %.1f s", src.desc, float64(n)/float64(rate))
	}
	if n == 0 {
		if why := deviceTrouble(src); why != "" {
			return "", fmt.Errorf("%s delivered no sound in %v: %s", src.desc, wait, why)
		}
		return "", fmt.Errorf("%s delivered no sound in %v", src.desc, wait)
	}
	sensor.Close(int64(n), nil)
	r := sensor.Last()
	// RMS re a full-scale sine (AES17): a full-scale sine has RMS 32767/sqrt(2).
	level := 10*math.Log10(sum/float64(n)+1e-12) - 10*math.Log10(32767.0*32767.0/2)
	levels := fmt.Sprintf("level %.1f dBFS, peak %.1f dBFS", level, 20*math.Log10(float64(peak)/32768))
	if peak == 0 {
		levels = "no level (every sample 0: digital silence)"
	}
	line := fmt.Sprintf("%s: %.1f s, %s, clipped %.3f %%", src.desc, float64(n)/float64(rate), levels, 100*r.ClipFraction)
	if b != nil {
		line += fmt.Sprintf(" (healthy at enrolment: %.1f dBFS)", b.Level.MeanDBFS)
	}
	for k := gate.Kind(0); k < gate.NumKinds; k++ {
		if r.Faulty[k] {
			return line, fmt.Errorf("%s; sensor problem: %s", line, k)
		}
	}
	return line, nil
}

// deviceTrouble stops a device source and returns what its last failed
// open or device error said, or "" (other sources, or no trouble reported).
func deviceTrouble(src *liveSource) string {
	if src.capture == nil {
		return ""
	}
	ctx, cancel := context.WithTimeout(context.Background(), time.Second)
	defer cancel()
	src.capture.Close(ctx)
	var why string
	for {
		select {
		case d, ok := <-src.capture.Diagnostics():
			if !ok {
				return why
			}
			if d.Err != nil {
				why = d.Err.Error()
			}
		default:
			return why
		}
	}
}

func abs16(v int16) int {
	if v < 0 {
		return -int(v)
	}
	return int(v)
}
