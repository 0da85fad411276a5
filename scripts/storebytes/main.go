// Command storebytes measures how many bytes the store writes to disk in
// one hour of steady operation: the SD-card wear figure.
//
// It pre-fills a store with -days of history, then plays one hour in
// virtual time exactly as the agent drives the store: an analysis window
// every 2 s (aggregated here, the store sees none), a trend point a
// minute, a flush every -flush (default 10 s, the default FlushInterval), an hourly
// summary, a few events and optionally one evidence clip. The store's
// clock is virtual; its fsyncs are real.
//
// It reports write_bytes from /proc/self/io (bytes this process caused to
// be written to storage, counted as page-cache pages are dirtied; ext4's
// journal writes are not included), the growth of the file, commits, and
// the store's own page estimate.
//
//	go run ./scripts/storebytes -days 30
//	go run ./scripts/storebytes -days 401 -clip
//	go run ./scripts/storebytes -days 30 -flush 5m
package main

import (
	"bufio"
	"encoding/binary"
	"flag"
	"fmt"
	"log"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

func main() {
	days := flag.Int("days", 30, "days of history to pre-fill")
	clip := flag.Bool("clip", false, "store one 10 s 16 kHz evidence clip during the hour")
	flush := flag.Duration("flush", 10*time.Second, "flush interval (virtual time, whole seconds, even)")
	dir := flag.String("dir", "", "folder for the store file (default: a new temporary folder)")
	flag.Parse()
	if *dir == "" {
		d, err := os.MkdirTemp("", "storebytes")
		if err != nil {
			log.Fatal(err)
		}
		defer os.RemoveAll(d)
		*dir = d
	}
	if *flush < 2*time.Second || *flush%(2*time.Second) != 0 {
		log.Fatalf("storebytes: -flush %v must be a multiple of 2 s", *flush)
	}
	if err := run(filepath.Join(*dir, "obrinvale.db"), *days, *clip, int(flush.Seconds())); err != nil {
		log.Fatal(err)
	}
}

// vclock is the store's virtual clock.
type vclock struct{ t time.Time }

func (c *vclock) Now() time.Time { return c.t }

func run(path string, days int, withClip bool, flushS int) error {
	start := time.Date(2026, 5, 11, 0, 0, 0, 0, time.UTC)
	clk := &vclock{t: start.Add(-time.Duration(days) * 24 * time.Hour)}
	s, err := store.Open(path, store.Options{FlushInterval: -1, Now: clk.Now})
	if err != nil {
		return err
	}
	defer s.Close()
	rng := rand.New(rand.NewPCG(1, 2))
	if err := prefill(s, clk, start, days, rng); err != nil {
		return err
	}

	before, err := mustStats(s)
	if err != nil {
		return err
	}
	w0, err := writeBytes()
	if err != nil {
		return err
	}
	wall := time.Now()
	if err := hour(s, clk, start, withClip, flushS, rng); err != nil {
		return err
	}
	w1, err := writeBytes()
	if err != nil {
		return err
	}
	elapsed := time.Since(wall)
	after, err := mustStats(s)
	if err != nil {
		return err
	}
	commits := after.Commits - before.Commits
	fmt.Printf("history: %d days pre-filled; clip in the hour: %v; flush every %d s\n", days, withClip, flushS)
	fmt.Printf("before the hour: file %d B, live %d B, %d trend points, %d events\n",
		before.FileBytes, before.LiveBytes, before.Trend, before.Events)
	fmt.Printf("write_bytes (/proc/self/io, pages dirtied): %d B/hour\n", w1.writeBytes-w0.writeBytes)
	fmt.Printf("wchar (/proc/self/io, bytes passed to pwrite): %d B/hour\n", w1.wchar-w0.wchar)
	fmt.Printf("commits: %d /hour; commits x page size (%d B): %d B/hour\n", commits, after.PageSize, commits*int64(after.PageSize))
	fmt.Printf("store estimate (pages allocated + meta page per commit): %d B/hour\n", after.PageBytesWritten-before.PageBytesWritten)
	fmt.Printf("file growth: %d B; live growth: %d B; pruned: %d records\n",
		after.FileBytes-before.FileBytes, after.LiveBytes-before.LiveBytes, after.Pruned-before.Pruned)
	fmt.Printf("per day at this rate: %.1f MB written, %d commits (%d fdatasync)\n",
		float64(w1.writeBytes-w0.writeBytes)*24/1e6, commits*24, commits*48)
	fmt.Printf("wall time for the simulated hour: %v\n", elapsed.Round(time.Millisecond))
	return nil
}

func mustStats(s *store.Store) (store.Stats, error) { return s.Stats() }

// prefill writes days of minute trend, hourly summaries and a few events a
// day before start, in large batches.
func prefill(s *store.Store, clk *vclock, start time.Time, days int, rng *rand.Rand) error {
	from := start.Add(-time.Duration(days) * 24 * time.Hour)
	for m := 0; m < days*24*60; m++ {
		t := from.Add(time.Duration(m) * time.Minute)
		if err := s.AddTrend(point(t, rng)); err != nil {
			return err
		}
		if m%60 == 59 {
			if err := s.AddSummary(summary(t.Add(-59*time.Minute), rng)); err != nil {
				return err
			}
		}
		if m%(6*60) == 0 {
			if _, err := s.AppendEvent(store.Event{Time: t, Kind: store.EventState, Code: "machine_started", Asset: "P-492B"}); err != nil {
				return err
			}
		}
		if m%5000 == 4999 {
			clk.t = t
			if err := s.Flush(); err != nil {
				return err
			}
		}
	}
	clk.t = start
	return s.Flush()
}

// hour plays one hour from start.
func hour(s *store.Store, clk *vclock, start time.Time, withClip bool, flushS int, rng *rand.Rand) error {
	var lo, hi, sum float64
	n := 0
	events := map[int]store.Event{
		600:  {Kind: store.EventAlarm, Code: "raised", Asset: "P-492B", Score: 0.62, Threshold: 0.48, Message: "score over threshold"},
		900:  {Kind: store.EventAlarm, Code: "acknowledged", Asset: "P-492B"},
		1800: {Kind: store.EventAlarm, Code: "cleared", Asset: "P-492B", Score: 0.33, Threshold: 0.48},
		3000: {Kind: store.EventState, Code: "machine_stopped", Asset: "P-492B"},
	}
	for sec := 0; sec < 3600; sec += 2 {
		now := start.Add(time.Duration(sec) * time.Second)
		clk.t = now
		// One analysis window: the agent keeps the minute's aggregate.
		score := 0.3 + 0.05*rng.NormFloat64()
		if n == 0 || score < lo {
			lo = score
		}
		if n == 0 || score > hi {
			hi = score
		}
		sum += score
		n++
		if e, ok := events[sec]; ok {
			e.Time = now
			seq, err := s.AppendEvent(e)
			if err != nil {
				return err
			}
			if withClip && e.Code == "raised" {
				if _, err := s.PutClip(store.Clip{EventSeq: seq, Start: now.Add(-10 * time.Second), Asset: "P-492B", WAV: wav(16000, 160000, rng)}); err != nil {
					return err
				}
			}
		}
		if sec%60 == 58 {
			p := point(now.Truncate(time.Minute), rng)
			p.Windows, p.ScoreMin, p.ScoreMean, p.ScoreMax = n, lo, sum/float64(n), hi
			if err := s.AddTrend(p); err != nil {
				return err
			}
			n, sum = 0, 0
		}
		if sec%flushS == flushS-2 {
			if err := s.Flush(); err != nil {
				return err
			}
		}
	}
	clk.t = start.Add(time.Hour)
	if err := s.AddSummary(summary(start, rng)); err != nil {
		return err
	}
	return s.Flush()
}

func point(t time.Time, rng *rand.Rand) store.TrendPoint {
	m := 0.3 + 0.02*rng.NormFloat64()
	return store.TrendPoint{Start: t, Windows: 30, ScoreMin: m - 0.1, ScoreMean: m, ScoreMax: m + 0.15,
		RMSMeanDBFS: -31 + rng.NormFloat64(), RMSMaxDBFS: -25 + rng.NormFloat64(), RunningFraction: 1}
}

func summary(t time.Time, rng *rand.Rand) store.Summary {
	m := 0.3 + 0.01*rng.NormFloat64()
	return store.Summary{Start: t, Windows: 1800, RunningFraction: 1, ScoreMin: m - 0.15, ScoreMean: m, ScoreP95: m + 0.1,
		ScoreMax: m + 0.2, RMSMeanDBFS: -31, RMSMaxDBFS: -22, AlarmSeconds: 0}
}

// wav builds a 16-bit mono PCM WAV file of noise.
func wav(rate, frames int, rng *rand.Rand) []byte {
	le := binary.LittleEndian
	b := make([]byte, 44+2*frames)
	copy(b, "RIFF")
	le.PutUint32(b[4:], uint32(36+2*frames))
	copy(b[8:], "WAVEfmt ")
	le.PutUint32(b[16:], 16)
	le.PutUint16(b[20:], 1)
	le.PutUint16(b[22:], 1)
	le.PutUint32(b[24:], uint32(rate))
	le.PutUint32(b[28:], uint32(2*rate))
	le.PutUint16(b[32:], 2)
	le.PutUint16(b[34:], 16)
	copy(b[36:], "data")
	le.PutUint32(b[40:], uint32(2*frames))
	for i := 0; i < frames; i++ {
		le.PutUint16(b[44+2*i:], uint16(int16(math.Round(3000*rng.NormFloat64()))))
	}
	return b
}

// ioCounters holds two counters of /proc/self/io.
type ioCounters struct {
	wchar      int64 // bytes passed to write(2)-family calls
	writeBytes int64 // bytes of page-cache pages dirtied, to go to storage
}

// writeBytes reads /proc/self/io (Linux only).
func writeBytes() (ioCounters, error) {
	var c ioCounters
	f, err := os.Open("/proc/self/io")
	if err != nil {
		return c, fmt.Errorf("storebytes: needs Linux /proc/self/io: %w", err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		k, v, _ := strings.Cut(sc.Text(), ": ")
		n, _ := strconv.ParseInt(v, 10, 64)
		switch k {
		case "wchar":
			c.wchar = n
		case "write_bytes":
			c.writeBytes = n
		}
	}
	if c.wchar == 0 {
		return c, fmt.Errorf("storebytes: no wchar line in /proc/self/io")
	}
	return c, nil
}
