package store

import (
	"fmt"
	"time"

	bolt "go.etcd.io/bbolt"
)

// MaxRequestIDs bounds the remembered command request ids; past it the
// oldest are forgotten first.
const MaxRequestIDs = 4096

// MaxRequestIDLen is the longest request id remembered, in bytes.
const MaxRequestIDLen = 64

// RememberRequest records a command's request id at time now and reports
// whether it was already recorded: a replay. Ids older than keep are
// forgotten in the same transaction, as are the oldest beyond
// MaxRequestIDs. The commands bucket is keyed by the id's bytes, the one
// bucket not keyed by a number; its values are the times in ms.
func (s *Store) RememberRequest(id string, now time.Time, keep time.Duration) (seen bool, err error) {
	if err := checkText("command", "request id", id, MaxRequestIDLen); err != nil {
		return false, err
	}
	if id == "" {
		return false, fmt.Errorf("%w: command: empty request id", ErrInvalid)
	}
	if err := checkTime("command", "time", now); err != nil {
		return false, err
	}
	if err := s.begin(true); err != nil {
		return false, err
	}
	defer s.life.RUnlock()
	err = s.update(func(tx *bolt.Tx) error {
		b := tx.Bucket(bucketCommands)
		if b.Get([]byte(id)) != nil {
			seen = true
			return nil
		}
		if err := b.Put([]byte(id), u64(unixMs(now))); err != nil {
			return err
		}
		return forgetRequests(b, now.Add(-keep))
	})
	if err != nil {
		return false, fmt.Errorf("store: remember request %q in %s: %w", id, s.path, err)
	}
	return seen, nil
}

// forgetRequests deletes ids recorded before limit, then the oldest while
// more than MaxRequestIDs remain.
func forgetRequests(b *bolt.Bucket, limit time.Time) error {
	type entry struct {
		k  []byte
		ms uint64
	}
	var all []entry
	var old [][]byte
	c := b.Cursor()
	for k, v := c.First(); k != nil; k, v = c.Next() {
		ms, _ := fromU64(v)
		if fromMs(ms).Before(limit) {
			old = append(old, append([]byte(nil), k...))
			continue
		}
		all = append(all, entry{append([]byte(nil), k...), ms})
	}
	for len(all) > MaxRequestIDs {
		oldest := 0
		for i := range all {
			if all[i].ms < all[oldest].ms {
				oldest = i
			}
		}
		old = append(old, all[oldest].k)
		all = append(all[:oldest], all[oldest+1:]...)
	}
	for _, k := range old {
		if err := b.Delete(k); err != nil {
			return err
		}
	}
	return nil
}
