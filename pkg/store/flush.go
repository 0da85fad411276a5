package store

import (
	"fmt"
	"time"

	bolt "go.etcd.io/bbolt"
)

// flushLoop flushes every interval until s.stop is closed. Errors are kept
// for Stats and the next Flush; the records stay buffered and are retried.
func (s *Store) flushLoop(interval time.Duration) {
	defer close(s.done)
	t := time.NewTicker(interval)
	defer t.Stop()
	for {
		select {
		case <-s.stop:
			return
		case <-t.C:
			if s.begin(true) == nil {
				_ = s.flush()
				s.life.RUnlock()
			}
		}
	}
}

// Flush writes the buffered trend points and summaries in one transaction
// and runs retention if it is due: by age every PruneInterval, by size
// whenever the live bytes exceed MaxBytes. It writes nothing if there is
// nothing to do. On a read-only store it does nothing.
func (s *Store) Flush() error {
	if err := s.begin(false); err != nil {
		return err
	}
	defer s.life.RUnlock()
	if s.opt.ReadOnly {
		return nil
	}
	return s.flush()
}

// flush does the work of Flush; the caller holds s.life.
func (s *Store) flush() error {
	s.flushMu.Lock()
	defer s.flushMu.Unlock()
	s.mu.Lock()
	trend, sums := s.pendingTrend, s.pendingSum
	s.mu.Unlock()

	now := s.opt.Now()
	ageDue := s.morePrune || s.lastPrune.IsZero() || now.Sub(s.lastPrune) >= s.opt.PruneInterval || now.Before(s.lastPrune)
	if len(trend) == 0 && len(sums) == 0 && !ageDue && !s.overCap() {
		return nil
	}
	res, err := s.writeBatch(trend, sums, now, ageDue)
	s.mu.Lock()
	defer s.mu.Unlock()
	s.lastFlushErr = err
	if err != nil {
		return fmt.Errorf("store: flush %d trend points and %d summaries to %s: %w", len(trend), len(sums), s.path, err)
	}
	// Records added while the transaction ran stay buffered.
	s.pendingTrend = append([]TrendPoint(nil), s.pendingTrend[len(trend):]...)
	s.pendingSum = append([]Summary(nil), s.pendingSum[len(sums):]...)
	if ageDue {
		s.lastPrune = now
	}
	s.morePrune = res.more
	s.pruned.Add(int64(res.deleted))
	return nil
}

// writeBatch writes trend and sums and prunes in one write transaction,
// rolled back instead of committed if it changed nothing.
func (s *Store) writeBatch(trend []TrendPoint, sums []Summary, now time.Time, ageDue bool) (pruneResult, error) {
	tx, err := s.db.Begin(true)
	if err != nil {
		return pruneResult{}, err
	}
	defer tx.Rollback() // no-op after Commit
	changed := false
	put := func(bucket []byte, ms uint64, v []byte) error {
		b := tx.Bucket(bucket)
		b.FillPercent = 1 // keys mostly grow: fill pages completely
		shifted, stored, err := putTime(b, ms, v)
		if shifted {
			s.shifted.Add(1)
		}
		if !stored && err == nil {
			s.dropped.Add(1)
		}
		changed = changed || stored
		return err
	}
	for i := range trend {
		if err := put(bucketTrend, trend[i].key(), trend[i].encode()); err != nil {
			return pruneResult{}, err
		}
	}
	for i := range sums {
		if err := put(bucketSummaries, unixMs(sums[i].Start), sums[i].encode()); err != nil {
			return pruneResult{}, err
		}
		if s.opt.Outbox.Enabled {
			if err := s.enqueueSummary(tx, &sums[i]); err != nil {
				return pruneResult{}, err
			}
			changed = true
		}
	}
	res, err := s.prune(tx, now, ageDue)
	if err != nil {
		return pruneResult{}, err
	}
	if !changed && res.deleted == 0 {
		return res, nil // deferred Rollback: an empty commit would still write pages
	}
	if err := tx.Commit(); err != nil {
		return pruneResult{}, err
	}
	s.commits.Add(1)
	if len(sums) > 0 {
		s.notifyQueued()
	}
	return res, nil
}

// overCap reports whether the live bytes exceed MaxBytes.
func (s *Store) overCap() bool {
	if s.opt.MaxBytes <= 0 {
		return false
	}
	over := false
	_ = s.db.View(func(tx *bolt.Tx) error {
		over = s.liveBytes(tx) > s.opt.MaxBytes
		return nil
	})
	return over
}

// liveBytes is the data size seen by tx minus the free and pending pages
// after the last commit: the bytes of pages that hold data, bucket
// structure and the freelist.
func (s *Store) liveBytes(tx *bolt.Tx) int64 {
	return tx.Size() - int64(s.db.Stats().FreeAlloc)
}
