package store

import (
	"fmt"
	"os"

	bolt "go.etcd.io/bbolt"
)

// Stats describes the file and what this Store has done since Open.
type Stats struct {
	// Path is the file name.
	Path string
	// FileBytes is the size of the file on disk. It never shrinks: bbolt
	// reuses freed pages instead of returning them, and grows the file in
	// steps ahead of need.
	FileBytes int64
	// DataBytes is the high-water mark of pages bbolt has used (page count
	// times page size), at most FileBytes.
	DataBytes int64
	// LiveBytes is DataBytes minus free and pending pages: the pages that
	// hold records, tree structure and the freelist. This is what MaxBytes
	// bounds, after each flush.
	LiveBytes int64
	// MaxBytes is the cap in force; negative if none.
	MaxBytes int64
	// PageSize is bbolt's page size in bytes.
	PageSize int
	// Events, Trend, Summaries, Clips and Baselines count the stored
	// records of each kind.
	Events, Trend, Summaries, Clips, Baselines int
	// NextEventSeq is the sequence number the next event will get.
	NextEventSeq uint64
	// Pending counts trend points and summaries buffered for the next
	// flush.
	Pending int
	// Commits counts write transactions committed since Open; each costs
	// two fdatasync calls.
	Commits int64
	// PageBytesWritten estimates the bytes bbolt has written since Open:
	// the pages each commit allocated (records, tree, freelist) plus one
	// meta page per commit. It leaves out file growth and fsync metadata.
	PageBytesWritten int64
	// Pruned counts records retention deleted since Open.
	Pruned int64
	// Shifted counts trend points and summaries stored one or more
	// milliseconds late because their key was taken; Dropped those not
	// stored at all because no key within a second was free.
	Shifted, Dropped int64
	// LastFlushError is the error of the last flush, nil if it worked.
	LastFlushError error
}

// Stats reports the file's sizes and record counts and this Store's
// counters. Counting walks each bucket's pages (not the values), so it
// costs a little I/O on a large file; meant for status pages, not loops.
func (s *Store) Stats() (Stats, error) {
	if err := s.begin(false); err != nil {
		return Stats{}, err
	}
	defer s.life.RUnlock()
	st := Stats{
		Path: s.path, MaxBytes: s.opt.MaxBytes, PageSize: s.pageSize,
		Commits: s.commits.Load(), Pruned: s.pruned.Load(), Shifted: s.shifted.Load(), Dropped: s.dropped.Load(),
	}
	dbs := s.db.Stats()
	st.PageBytesWritten = dbs.TxStats.GetPageAlloc() + st.Commits*int64(st.PageSize)
	s.mu.Lock()
	st.Pending, st.LastFlushError = len(s.pendingTrend)+len(s.pendingSum), s.lastFlushErr
	s.mu.Unlock()
	if fi, err := os.Stat(s.path); err == nil {
		st.FileBytes = fi.Size()
	}
	err := s.db.View(func(tx *bolt.Tx) error {
		st.DataBytes, st.LiveBytes = tx.Size(), s.liveBytes(tx)
		for _, c := range []struct {
			name []byte
			n    *int
		}{{bucketEvents, &st.Events}, {bucketTrend, &st.Trend}, {bucketSummaries, &st.Summaries},
			{bucketClips, &st.Clips}, {bucketBaselines, &st.Baselines}} {
			*c.n = tx.Bucket(c.name).Stats().KeyN
		}
		n, ok := fromU64(tx.Bucket(bucketMeta).Get(metaNextEvent))
		if !ok {
			return fmt.Errorf("%w: meta key %q", ErrCorrupt, metaNextEvent)
		}
		st.NextEventSeq = n
		return nil
	})
	return st, err
}
