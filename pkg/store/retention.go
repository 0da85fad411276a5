package store

import (
	"encoding/json"
	"time"

	bolt "go.etcd.io/bbolt"
)

// pruneBudget is the most records one retention pass deletes, so a pass
// after a long outage or a lowered cap stays short; the next flush
// continues where it stopped. Our choice, no source: a few hundred
// leaf pages at most.
const pruneBudget = 2000

// lowWater is the fraction of MaxBytes a size pass prunes down to, so a
// store at its cap does not delete (and rewrite pages) at every flush.
// Common practice for high/low-water marks, no source for the value.
const lowWater = 0.9

// pruneResult reports one retention pass.
type pruneResult struct {
	deleted int  // records deleted
	more    bool // the budget ran out: run again at the next flush
}

// kind describes one prunable bucket: how to read a record's time.
type kind struct {
	bucket []byte
	maxAge time.Duration
	// ms returns the record's time in Unix milliseconds; ok is false if
	// the value cannot be read.
	ms func(k, v []byte) (ms uint64, ok bool)
}

func keyTime(k, _ []byte) (uint64, bool) { return fromU64(k) }

func eventTime(_, v []byte) (uint64, bool) {
	var w struct {
		TimeMs uint64 `json:"time_ms"`
	}
	return w.TimeMs, json.Unmarshal(v, &w) == nil
}

func clipTime(k, v []byte) (uint64, bool) {
	var m clipJSON
	_, err := decodeBlob(bucketClips, k, v, &m)
	return m.StartMs, err == nil
}

// prune runs retention inside tx: by age when ageDue, then by size when
// the live bytes exceed MaxBytes.
func (s *Store) prune(tx *bolt.Tx, now time.Time, ageDue bool) (pruneResult, error) {
	var res pruneResult
	budget := pruneBudget
	var freed int64
	pageSize := s.pageSize
	if ageDue {
		for _, k := range []kind{
			{bucketTrend, s.opt.MaxAge.Trend, keyTime},
			{bucketClips, s.opt.MaxAge.Clips, clipTime},
			{bucketSummaries, s.opt.MaxAge.Summaries, keyTime},
			{bucketEvents, s.opt.MaxAge.Events, eventTime},
		} {
			cut := now.Add(-k.maxAge)
			if k.maxAge < 0 || cut.UnixMilli() <= 0 {
				continue
			}
			n, f, err := pruneOlder(tx.Bucket(k.bucket), k.ms, unixMs(cut), &budget, pageSize)
			res.deleted += n
			freed += f
			if err != nil {
				return res, err
			}
		}
	}
	if s.opt.MaxBytes > 0 {
		if live := s.liveBytes(tx) - freed; live > s.opt.MaxBytes {
			target := live - int64(float64(s.opt.MaxBytes)*lowWater)
			n, err := pruneSize(tx, target, &budget, pageSize)
			res.deleted += n
			if err != nil {
				return res, err
			}
		}
	}
	res.more = budget == 0
	return res, nil
}

// pruneOlder deletes records from the start of b while their time is
// before cut. It stops at the first record that is young enough or whose
// time cannot be read, so for buckets keyed by sequence (events, clips) a
// record stamped late by a clock step holds back the ones after it.
func pruneOlder(b *bolt.Bucket, ms func(k, v []byte) (uint64, bool), cut uint64, budget *int, pageSize int) (n int, freed int64, err error) {
	b.FillPercent = 1
	c := b.Cursor()
	for *budget > 0 {
		k, v := c.First()
		if k == nil {
			break
		}
		if t, ok := ms(k, v); !ok || t >= cut {
			break
		}
		freed += recordCost(k, v, pageSize)
		if err := c.Delete(); err != nil {
			return n, freed, err
		}
		n++
		*budget--
	}
	return n, freed, nil
}

// pruneSize deletes records until about target bytes are freed: the
// oldest of trend points and clips first (whichever is older), then
// summaries, then events. Baselines are never deleted.
//
// The bytes a deletion frees are estimated from above, as the larger of
// the record's own size and its bucket's page bytes per record: deleting
// too little only costs another pass, deleting too much loses records.
// (bbolt v1.4.3 node.split never splits a node of four records or fewer,
// however large, so small per-record estimates can be far below the
// truth: measured 2 KiB of pages per 1.2 KiB event.)
func pruneSize(tx *bolt.Tx, target int64, budget *int, pageSize int) (n int, err error) {
	trend, clips := tx.Bucket(bucketTrend), tx.Bucket(bucketClips)
	later := []*bolt.Bucket{tx.Bucket(bucketSummaries), tx.Bucket(bucketEvents)}
	perRecord := map[*bolt.Bucket]int64{}
	cost := func(b *bolt.Bucket, k, v []byte) int64 {
		avg, ok := perRecord[b]
		if !ok {
			st := b.Stats() // walks the bucket's pages, not its values
			if st.KeyN > 0 {
				avg = int64(st.BranchAlloc+st.LeafAlloc) / int64(st.KeyN)
			}
			perRecord[b] = avg
		}
		return max(avg, recordCost(k, v, pageSize))
	}
	var freed int64
	for freed < target && *budget > 0 {
		tk, tv := trend.Cursor().First()
		ck, cv := clips.Cursor().First()
		var victim *bolt.Bucket
		var k, v []byte
		switch {
		case tk != nil && ck != nil:
			tt, _ := keyTime(tk, tv)
			ct, _ := clipTime(ck, cv) // unreadable: time 0, goes first
			victim, k, v = trend, tk, tv
			if ct < tt {
				victim, k, v = clips, ck, cv
			}
		case tk != nil:
			victim, k, v = trend, tk, tv
		case ck != nil:
			victim, k, v = clips, ck, cv
		default:
			for _, b := range later {
				if k, v = b.Cursor().First(); k != nil {
					victim = b
					break
				}
			}
		}
		if victim == nil {
			break // only baselines left
		}
		victim.FillPercent = 1
		freed += cost(victim, k, v)
		if err := victim.Delete(k); err != nil {
			return n, err
		}
		n++
		*budget--
	}
	return n, nil
}

// recordCost estimates the page bytes a record occupies: its key, value
// and 16-byte leaf element header, or whole pages for a value too large to
// share a page (bbolt stores those on overflow pages of their own).
func recordCost(k, v []byte, pageSize int) int64 {
	n := 16 + len(k) + len(v)
	if n < pageSize {
		return int64(n)
	}
	return int64((n + 16 + pageSize - 1) / pageSize * pageSize)
}
