package store

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"
)

func TestReopenKeepsEverything(t *testing.T) {
	path := filepath.Join(t.TempDir(), "obrinvale.db")
	s, err := Open(path, testOptions())
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 3; i++ {
		if _, err := s.AppendEvent(eventAt(t0, i)); err != nil {
			t.Fatal(err)
		}
		if err := s.AddTrend(trendAt(t0, i)); err != nil {
			t.Fatal(err)
		}
	}
	if err := s.AddSummary(summaryAt(t0, 0)); err != nil {
		t.Fatal(err)
	}
	wav := makeWAV(16000, 1600)
	if _, err := s.PutClip(Clip{EventSeq: 2, Start: t0, WAV: wav}); err != nil {
		t.Fatal(err)
	}
	if _, err := s.AddBaseline(Baseline{Created: t0, File: []byte("model")}); err != nil {
		t.Fatal(err)
	}
	// Close must flush the buffered trend points and summary.
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}

	s = mustOpenAt(t, path, testOptions())
	st := mustStats(t, s)
	want := [5]int{3, 3, 1, 1, 1}
	if got := [5]int{st.Events, st.Trend, st.Summaries, st.Clips, st.Baselines}; got != want {
		t.Errorf("counts after reopen (events, trend, summaries, clips, baselines) = %v, want %v", got, want)
	}
	if c, err := s.Clip(1); err != nil || !bytes.Equal(c.WAV, wav) {
		t.Errorf("clip after reopen: %v, WAV equal %v", err, bytes.Equal(c.WAV, wav))
	}
	seq, err := s.AppendEvent(eventAt(t0, 9))
	if err != nil || seq != 4 {
		t.Errorf("first event after reopen got seq %d (%v), want 4", seq, err)
	}
}

func TestOpenRefuses(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, data []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, data, 0o600); err != nil {
			t.Fatal(err)
		}
		return p
	}
	foreign := filepath.Join(dir, "foreign.db")
	db, err := bolt.Open(foreign, 0o600, nil)
	if err != nil {
		t.Fatal(err)
	}
	if err := db.Update(func(tx *bolt.Tx) error {
		b, err := tx.CreateBucket([]byte("recipes"))
		if err != nil {
			return err
		}
		return b.Put([]byte("bread"), []byte("flour, water, salt"))
	}); err != nil {
		t.Fatal(err)
	}
	db.Close()
	foreignBytes, _ := os.ReadFile(foreign)

	newer := filepath.Join(dir, "newer.db")
	s := mustOpenAt(t, newer, testOptions())
	s.Close()
	db, err = bolt.Open(newer, 0o600, nil)
	if err != nil {
		t.Fatal(err)
	}
	if err := db.Update(func(tx *bolt.Tx) error { return tx.Bucket(bucketMeta).Put(metaSchema, u64(SchemaVersion+1)) }); err != nil {
		t.Fatal(err)
	}
	db.Close()

	cases := []struct {
		name string
		path string
		opt  Options
		want error
		says string
	}{
		{"short text file", write("notes.db", bytes.Repeat([]byte("pump P-492B ok\n"), 400)), testOptions(), ErrNotStore, "not a bbolt file"},
		{"long text file", write("log.db", bytes.Repeat([]byte("pump P-492B ok\n"), 8000)), testOptions(), ErrNotStore, "not a bbolt file"},
		{"another program's bbolt file", foreign, testOptions(), ErrNotStore, `"recipes"`},
		{"another program's bbolt file read-only", foreign, Options{ReadOnly: true}, ErrNotStore, `no "meta" bucket`},
		{"bbolt file without buckets read-only", write("blank.db", nil), Options{ReadOnly: true}, ErrNotStore, "not a bbolt file"},
		{"newer schema", newer, testOptions(), ErrSchema, fmt.Sprintf("schema %d", SchemaVersion+1)},
		{"cap below minimum", filepath.Join(dir, "a.db"), Options{MaxBytes: 1000}, ErrOptions, "MaxBytes 1000"},
		{"negative prune interval", filepath.Join(dir, "b.db"), Options{PruneInterval: -time.Second}, ErrOptions, "PruneInterval"},
		{"read-only missing file", filepath.Join(dir, "missing.db"), Options{ReadOnly: true}, os.ErrNotExist, "missing.db"},
		{"missing directory", filepath.Join(dir, "no", "such.db"), testOptions(), os.ErrNotExist, "such.db"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, err := Open(c.path, c.opt)
			if err == nil {
				s.Close()
				t.Fatal("Open succeeded")
			}
			if !errors.Is(err, c.want) || !strings.Contains(err.Error(), c.says) {
				t.Errorf("error %q, want %v mentioning %q", err, c.want, c.says)
			}
		})
	}
	if got, _ := os.ReadFile(foreign); !bytes.Equal(got, foreignBytes) {
		t.Error("refusing another program's file changed it")
	}
	if _, err := os.Stat(filepath.Join(dir, "missing.db")); !errors.Is(err, os.ErrNotExist) {
		t.Error("read-only open created the missing file")
	}
}

func TestAdoptsEmptyFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "empty.db")
	if err := os.WriteFile(path, nil, 0o600); err != nil {
		t.Fatal(err)
	}
	s := mustOpenAt(t, path, testOptions())
	if seq, err := s.AppendEvent(eventAt(t0, 0)); err != nil || seq != 1 {
		t.Fatalf("append to adopted empty file: seq %d, %v", seq, err)
	}
}

func TestClosedAndReadOnly(t *testing.T) {
	path := filepath.Join(t.TempDir(), "obrinvale.db")
	s, err := Open(path, testOptions())
	if err != nil {
		t.Fatal(err)
	}
	if _, err := s.AppendEvent(eventAt(t0, 0)); err != nil {
		t.Fatal(err)
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
	if err := s.Close(); err != nil {
		t.Errorf("second Close: %v, want nil", err)
	}
	ro := mustOpenAt(t, path, Options{ReadOnly: true})
	wav := makeWAV(8000, 800)
	calls := []struct {
		name string
		call func(s *Store) error
	}{
		{"AppendEvent", func(s *Store) error { _, err := s.AppendEvent(eventAt(t0, 1)); return err }},
		{"AddTrend", func(s *Store) error { return s.AddTrend(trendAt(t0, 0)) }},
		{"AddSummary", func(s *Store) error { return s.AddSummary(summaryAt(t0, 0)) }},
		{"PutClip", func(s *Store) error { _, err := s.PutClip(Clip{Start: t0, WAV: wav}); return err }},
		{"AddBaseline", func(s *Store) error { _, err := s.AddBaseline(Baseline{Created: t0}); return err }},
	}
	for _, c := range calls {
		t.Run(c.name, func(t *testing.T) {
			if err := c.call(s); !errors.Is(err, ErrClosed) {
				t.Errorf("after Close: %v, want ErrClosed", err)
			}
			if err := c.call(ro); !errors.Is(err, ErrReadOnly) {
				t.Errorf("read-only: %v, want ErrReadOnly", err)
			}
		})
	}
	if _, err := s.Events(EventQuery{}); !errors.Is(err, ErrClosed) {
		t.Errorf("Events after Close: %v, want ErrClosed", err)
	}
	if evs, err := ro.Events(EventQuery{}); err != nil || len(evs) != 1 {
		t.Errorf("read-only Events: %d events, %v", len(evs), err)
	}
}

// TestFlushLoop checks the owned flusher writes buffered points without a
// call to Flush and stops on Close.
func TestFlushLoop(t *testing.T) {
	opt := testOptions()
	opt.FlushInterval = 5 * time.Millisecond
	s := mustOpen(t, opt)
	if err := s.AddTrend(trendAt(t0, 0)); err != nil {
		t.Fatal(err)
	}
	for i := 0; ; i++ {
		if mustStats(t, s).Trend == 1 {
			break
		}
		if i == 2000 {
			t.Fatal("flusher did not write the trend point within 10 s")
		}
		time.Sleep(5 * time.Millisecond)
	}
}
