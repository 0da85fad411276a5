package store

import (
	"errors"
	"path/filepath"
	"sync/atomic"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"
)

func outboxOptions(maxBytes int64) Options {
	o := testOptions()
	o.Outbox = OutboxOptions{Enabled: true, MaxBytes: maxBytes}
	return o
}

func mustOutbox(t testing.TB, s *Store, after uint64, max int) []Message {
	t.Helper()
	m, err := s.Outbox(after, max)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func mustOutboxStats(t testing.TB, s *Store) OutboxStats {
	t.Helper()
	st, err := s.OutboxStats()
	if err != nil {
		t.Fatal(err)
	}
	return st
}

// Events and summaries are queued in the transaction that stores them,
// numbered in one growing sequence, and leave the outbox only when acked.
func TestOutboxQueuesEventsAndSummaries(t *testing.T) {
	var notified atomic.Int64
	opt := outboxOptions(0)
	opt.Outbox.Notify = func() { notified.Add(1) }
	path := filepath.Join(t.TempDir(), "obrinvale.db")
	s, err := Open(path, opt)
	if err != nil {
		t.Fatal(err)
	}
	e := eventAt(t0, 1)
	e.Labels = map[string]string{"state": "UNACK", "baseline": "b-3"}
	e.ClipID = 7
	if _, err := s.AppendEvent(e); err != nil {
		t.Fatal(err)
	}
	sum := summaryAt(t0, 0)
	sum.Warnings, sum.SensorFaults, sum.SensorActive = 2, 1, 1<<3
	if err := s.AddSummary(sum); err != nil {
		t.Fatal(err)
	}
	mustFlush(t, s)
	d := eventAt(t0, 2)
	d.Kind, d.Code = EventDiagnostic, "sensor.clipping.active"
	if _, err := s.AppendEvent(d); err != nil {
		t.Fatal(err)
	}
	if n := notified.Load(); n != 3 {
		t.Errorf("Notify called %d times, want 3", n)
	}
	// Crash-free reopen: the queue is in the file.
	s.Close()
	s = mustOpenAt(t, path, outboxOptions(0))
	got := mustOutbox(t, s, 0, 10)
	if len(got) != 3 {
		t.Fatalf("%d messages queued, want 3", len(got))
	}
	want := []Class{ClassAlarm, ClassSummary, ClassDiagnostic}
	for i, m := range got {
		if m.Seq != uint64(i+1) || m.Class != want[i] {
			t.Errorf("message %d: seq %d class %v, want %d %v", i, m.Seq, m.Class, i+1, want[i])
		}
	}
	if ev := got[0].Event; ev == nil || ev.Labels["state"] != "UNACK" || ev.ClipID != 7 || ev.Seq != 1 || ev.Score != 0.61 {
		t.Errorf("alarm message event = %+v", ev)
	}
	if sm := got[1].Summary; sm == nil || *sm != sum {
		t.Errorf("summary message = %+v, want %+v", sm, sum)
	}
	st := mustOutboxStats(t, s)
	if st.Depth != 3 || st.Bytes <= 0 || !st.Oldest.Equal(e.Time) || st.LastSeq != 3 {
		t.Errorf("stats %+v", st)
	}
	if err := s.Ack([]uint64{1, 2}); err != nil {
		t.Fatal(err)
	}
	if left := mustOutbox(t, s, 0, 10); len(left) != 1 || left[0].Seq != 3 {
		t.Errorf("after ack: %+v", left)
	}
	if r, err := s.ReserveSeq(); err != nil || r != 4 {
		t.Errorf("ReserveSeq = %d, %v; want 4", r, err)
	}
	if _, err := s.AppendEvent(eventAt(t0, 3)); err != nil {
		t.Fatal(err)
	}
	if next := mustOutbox(t, s, 3, 10); len(next) != 1 || next[0].Seq != 5 {
		t.Errorf("the message after a reserved number: %+v", next)
	}
	if err := s.Ack([]uint64{3, 5, 99}); err != nil {
		t.Fatal(err)
	}
	if st := mustOutboxStats(t, s); st.Depth != 0 || st.Bytes != 0 || !st.Oldest.IsZero() {
		t.Errorf("empty outbox stats %+v", st)
	}
}

// A full outbox drops summaries oldest first, before any alarm, counts every
// drop, and reports the drops in the next summary.
func TestOutboxDropsSummariesBeforeAlarms(t *testing.T) {
	s := mustOpen(t, outboxOptions(MinOutboxBytes))
	for i := 0; i < 20; i++ {
		if _, err := s.AppendEvent(eventAt(t0, i)); err != nil {
			t.Fatal(err)
		}
	}
	// Summaries until the bound has dropped some.
	for i := 0; mustOutboxStats(t, s).Drops.Total < 50; i++ {
		if err := s.AddSummary(summaryAt(t0, i)); err != nil {
			t.Fatal(err)
		}
		mustFlush(t, s)
		if i > 5000 {
			t.Fatal("the outbox never filled")
		}
	}
	st := mustOutboxStats(t, s)
	if st.Bytes > MinOutboxBytes {
		t.Errorf("outbox holds %d bytes, bound %d", st.Bytes, MinOutboxBytes)
	}
	if st.Drops.ByClass[ClassAlarm] != 0 || st.Drops.ByClass[ClassSummary] != st.Drops.Total {
		t.Errorf("drops %+v: want summaries only", st.Drops)
	}
	all := mustOutbox(t, s, 0, 1<<20)
	alarms, lastSummary := 0, Message{}
	for i, m := range all {
		if m.Class == ClassAlarm {
			alarms++
		}
		if m.Class == ClassSummary {
			lastSummary = m
		}
		if i > 0 && m.Seq <= all[i-1].Seq {
			t.Fatalf("outbox out of order at %d", i)
		}
	}
	if alarms != 20 {
		t.Errorf("%d alarms kept of 20", alarms)
	}
	// The dropped summaries were the oldest: the kept ones are the newest.
	if first := all[20]; first.Class != ClassSummary || first.Seq != 21+st.Drops.Total {
		t.Errorf("oldest kept summary has seq %d, want %d", first.Seq, 21+st.Drops.Total)
	}
	if lastSummary.Drops.Total == 0 || lastSummary.Drops.SinceSummary > lastSummary.Drops.Total {
		t.Errorf("latest summary reports drops %+v", lastSummary.Drops)
	}
	// Only alarms left over the bound: then the oldest alarms go.
	for i := 0; mustOutboxStats(t, s).Drops.ByClass[ClassAlarm] == 0; i++ {
		if _, err := s.AppendEvent(eventAt(t0, 100+i)); err != nil {
			t.Fatal(err)
		}
		if i > 5000 {
			t.Fatal("alarms never dropped")
		}
	}
	if n := len(mustOutbox(t, s, 0, 1<<20)); n == 0 {
		t.Error("outbox emptied")
	}
}

// Messages older than MaxAge are dropped when the next one is queued.
func TestOutboxDropsAgedMessages(t *testing.T) {
	clk := newClock(t0)
	opt := outboxOptions(0)
	opt.Now, opt.Outbox.MaxAge = clk.Now, time.Hour
	s := mustOpen(t, opt)
	for i := 0; i < 3; i++ {
		s.AppendEvent(eventAt(t0, i))
	}
	clk.Set(t0.Add(2 * time.Hour))
	if _, err := s.AppendEvent(eventAt(t0.Add(2*time.Hour), 0)); err != nil {
		t.Fatal(err)
	}
	st := mustOutboxStats(t, s)
	if st.Depth != 1 || st.Drops.Total != 3 || st.Drops.ByClass[ClassAlarm] != 3 {
		t.Errorf("stats %+v, want 1 queued and 3 aged out", st)
	}
}

// A store without the outbox queues nothing.
func TestOutboxDisabled(t *testing.T) {
	s := mustOpen(t, testOptions())
	s.AppendEvent(eventAt(t0, 0))
	if m := mustOutbox(t, s, 0, 10); len(m) != 0 {
		t.Errorf("%d messages queued with the outbox off", len(m))
	}
}

// A schema 1 file (made by the previous build) is upgraded by a writable
// open and read as it is by a read-only one.
func TestOpenUpgradesSchema1(t *testing.T) {
	path := filepath.Join(t.TempDir(), "old.db")
	s, err := Open(path, testOptions())
	if err != nil {
		t.Fatal(err)
	}
	s.AppendEvent(eventAt(t0, 0))
	s.Close()
	db, err := bolt.Open(path, 0o600, nil)
	if err != nil {
		t.Fatal(err)
	}
	db.Update(func(tx *bolt.Tx) error {
		for _, b := range addedInV2 {
			tx.DeleteBucket(b)
		}
		m := tx.Bucket(bucketMeta)
		m.Delete(metaNextMessage)
		return m.Put(metaSchema, u64(1))
	})
	db.Close()

	ro, err := Open(path, Options{ReadOnly: true})
	if err != nil {
		t.Fatalf("read-only open of a schema 1 file: %v", err)
	}
	if m, err := ro.Outbox(0, 5); err != nil || len(m) != 0 {
		t.Errorf("schema 1 outbox: %v, %v", m, err)
	}
	ro.Close()

	s = mustOpenAt(t, path, outboxOptions(0))
	if _, err := s.AppendEvent(eventAt(t0, 1)); err != nil {
		t.Fatal(err)
	}
	if m := mustOutbox(t, s, 0, 5); len(m) != 1 || m[0].Seq != 1 || m[0].Event.Seq != 2 {
		t.Errorf("after upgrade: %+v", m)
	}
}

// Request ids are remembered across reopen, so a replayed command is
// caught after a restart; old ids are forgotten.
func TestRememberRequest(t *testing.T) {
	path := filepath.Join(t.TempDir(), "obrinvale.db")
	s, _ := Open(path, testOptions())
	if seen, err := s.RememberRequest("req-1", t0, time.Hour); seen || err != nil {
		t.Fatalf("first: %v %v", seen, err)
	}
	s.Close()
	s = mustOpenAt(t, path, testOptions())
	if seen, _ := s.RememberRequest("req-1", t0.Add(time.Minute), time.Hour); !seen {
		t.Error("a replay after reopen was not caught")
	}
	s.RememberRequest("req-2", t0.Add(2*time.Hour), time.Hour)
	if seen, _ := s.RememberRequest("req-1", t0.Add(2*time.Hour), time.Hour); seen {
		t.Error("an id older than keep was still remembered")
	}
	if _, err := s.RememberRequest("", t0, time.Hour); !errors.Is(err, ErrInvalid) {
		t.Errorf("empty id: %v", err)
	}
}

// A clip id reserved for an event is used by the clip stored later; an id
// not reserved is refused.
func TestReservedClipID(t *testing.T) {
	s := mustOpen(t, testOptions())
	id, err := s.ReserveClipID()
	if err != nil || id != 1 {
		t.Fatalf("ReserveClipID = %d, %v", id, err)
	}
	later, _ := s.PutClip(Clip{Start: t0, WAV: makeWAV(16000, 160)})
	if later != 2 {
		t.Errorf("clip after a reservation got id %d, want 2", later)
	}
	if got, err := s.PutClip(Clip{ID: id, Start: t0, WAV: makeWAV(16000, 160)}); err != nil || got != id {
		t.Errorf("reserved put = %d, %v", got, err)
	}
	if _, err := s.PutClip(Clip{ID: id, Start: t0, WAV: makeWAV(16000, 160)}); !errors.Is(err, ErrInvalid) {
		t.Errorf("second put under the same id: %v", err)
	}
	if _, err := s.PutClip(Clip{ID: 40, Start: t0, WAV: makeWAV(16000, 160)}); !errors.Is(err, ErrInvalid) {
		t.Errorf("unreserved id: %v", err)
	}
}
