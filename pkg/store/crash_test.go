package store

import (
	"hash/crc32"
	"math/rand/v2"
	"path/filepath"
	"strconv"
	"testing"
	"time"
)

// kills is the number of SIGKILLs per crash test.
const kills = 25

// TestCrashKeepsReportedEvents kills a child that appends events at random
// moments. SIGKILL tests that a killed process leaves a file that opens
// with every acknowledged event whole; power loss additionally relies on
// bbolt's fdatasync, which this test cannot cut.
func TestCrashKeepsReportedEvents(t *testing.T) {
	path := filepath.Join(t.TempDir(), "obrinvale.db")
	rng := rand.New(rand.NewPCG(20260511, 7))
	unreported, before := 0, 0 // kills that landed after a commit, before its report
	for k := 0; k < kills; k++ {
		c := startChild(t, "events", path, uint64(k))
		time.Sleep(time.Duration(rng.IntN(40_000)) * time.Microsecond)
		c.kill()
		var reported []uint64
		for _, l := range c.rest() {
			seq, err := strconv.ParseUint(l, 10, 64)
			if err != nil {
				t.Fatalf("kill %d: child printed %q", k, l)
			}
			reported = append(reported, seq)
		}

		s, err := Open(path, Options{FlushInterval: -1, Timeout: 5 * time.Second})
		if err != nil {
			t.Fatalf("kill %d: reopen: %v", k, err)
		}
		evs, err := s.Events(EventQuery{Limit: 1 << 30})
		if err != nil {
			t.Fatalf("kill %d: read: %v", k, err)
		}
		for i, e := range evs {
			if e.Seq != uint64(i+1) {
				t.Fatalf("kill %d: event %d has seq %d: a gap", k, i+1, e.Seq)
			}
			if crc := crc32.ChecksumIEEE([]byte(e.Message)); float64(crc) != e.Values["crc32"] || float64(len(e.Message)) != e.Values["len_bytes"] {
				t.Fatalf("kill %d: event %d is torn", k, e.Seq)
			}
		}
		if n := len(reported); n > 0 && reported[n-1] > uint64(len(evs)) {
			t.Fatalf("kill %d: child reported seq %d stored, file holds %d events", k, reported[n-1], len(evs))
		}
		seq, err := s.AppendEvent(crashEvent(rng))
		if err != nil || seq != uint64(len(evs)+1) {
			t.Fatalf("kill %d: next seq %d (%v), want %d", k, seq, err, len(evs)+1)
		}
		if err := s.Close(); err != nil {
			t.Fatal(err)
		}
		if n := len(reported); len(evs) > before+n {
			unreported++
		}
		before = len(evs) + 1
		t.Logf("kill %d: %d reported by the child, %d stored", k, len(reported), len(evs))
	}
	t.Logf("%d of %d kills landed between a commit and its report", unreported, kills)
}

// TestCrashDuringTrendFlush kills a child that flushes batches of trend
// points. Each batch is one transaction, so what is stored must be a
// whole prefix of the points fed, each point intact.
func TestCrashDuringTrendFlush(t *testing.T) {
	path := filepath.Join(t.TempDir(), "obrinvale.db")
	rng := rand.New(rand.NewPCG(20260511, 8))
	for k := 0; k < kills; k++ {
		c := startChild(t, "trend", path, uint64(k))
		time.Sleep(time.Duration(rng.IntN(40_000)) * time.Microsecond)
		c.kill()
		reported := 0
		for _, l := range c.rest() {
			n, err := strconv.Atoi(l)
			if err != nil {
				t.Fatalf("kill %d: child printed %q", k, l)
			}
			reported = n
		}
		s, err := Open(path, Options{FlushInterval: -1, Timeout: 5 * time.Second, ReadOnly: true})
		if err != nil {
			t.Fatalf("kill %d: reopen: %v", k, err)
		}
		pts, err := s.Trend(Range{Limit: 1 << 30})
		if err != nil {
			t.Fatalf("kill %d: read: %v", k, err)
		}
		for i, p := range pts {
			if p != trendAt(t0, i) {
				t.Fatalf("kill %d: point %d is %+v, want %+v", k, i, p, trendAt(t0, i))
			}
		}
		if len(pts) < reported {
			t.Fatalf("kill %d: child reported %d points flushed, file holds %d", k, reported, len(pts))
		}
		s.Close()
		t.Logf("kill %d: %d points reported flushed, %d stored", k, reported, len(pts))
	}
}
