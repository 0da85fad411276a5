package store

import (
	"bytes"
	"os"
	"path/filepath"
	"sync"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"
)

// TestBackupWhileWriting takes backups while another goroutine appends
// events and flushes trend points. Each copy must pass bbolt's own
// consistency check (Tx.Check) and hold a consistent set: events 1..N
// with no gap, the counter at N+1, trend points a whole prefix.
func TestBackupWhileWriting(t *testing.T) {
	dir := t.TempDir()
	s := mustOpen(t, testOptions())
	stop := make(chan struct{})
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		for i := 0; ; i++ {
			select {
			case <-stop:
				return
			default:
			}
			if _, err := s.AppendEvent(eventAt(t0, i)); err != nil {
				t.Error(err)
				return
			}
			if err := s.AddTrend(trendAt(t0, i)); err != nil {
				t.Error(err)
				return
			}
			if i%5 == 4 {
				if err := s.Flush(); err != nil {
					t.Error(err)
					return
				}
			}
		}
	}()
	for b := 0; b < 5; b++ {
		// Let the writer get ahead, so each copy is taken mid-stream.
		for mustStats(t, s).NextEventSeq < uint64(40*(b+1)) {
			time.Sleep(time.Millisecond)
		}
		var buf bytes.Buffer
		n, err := s.Backup(&buf)
		if err != nil || n != int64(buf.Len()) {
			t.Fatalf("backup %d: %d bytes reported, %d written, %v", b, n, buf.Len(), err)
		}
		path := filepath.Join(dir, "backup.db")
		if err := os.WriteFile(path, buf.Bytes(), 0o600); err != nil {
			t.Fatal(err)
		}
		checkBackup(t, path)
	}
	close(stop)
	wg.Wait()
}

func checkBackup(t *testing.T, path string) {
	t.Helper()
	db, err := bolt.Open(path, 0o600, &bolt.Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	err = db.View(func(tx *bolt.Tx) error {
		for err := range tx.Check() {
			t.Errorf("bbolt check of backup: %v", err)
		}
		return nil
	})
	db.Close()
	if err != nil {
		t.Fatal(err)
	}
	c, err := Open(path, Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer c.Close()
	st := mustStats(t, c)
	evs, err := c.Events(EventQuery{Limit: 1 << 30})
	if err != nil {
		t.Fatal(err)
	}
	for i, e := range evs {
		if e.Seq != uint64(i+1) {
			t.Fatalf("backup: event %d has seq %d", i+1, e.Seq)
		}
	}
	if st.NextEventSeq != uint64(len(evs)+1) {
		t.Errorf("backup: %d events but the counter says next is %d", len(evs), st.NextEventSeq)
	}
	pts, _ := c.Trend(Range{Limit: 1 << 30})
	for i, p := range pts {
		if p != trendAt(t0, i) {
			t.Fatalf("backup: trend point %d is not the %d-th fed", i, i)
		}
	}
	t.Logf("backup of %d bytes: %d events, %d trend points", st.FileBytes, len(evs), len(pts))
}
