package store

import (
	"time"

	bolt "go.etcd.io/bbolt"
)

// Range selects records by time: [From, To), at millisecond resolution.
// Zero From or To means unbounded.
type Range struct {
	From, To time.Time
	// Limit is the most records returned; zero or negative means
	// DefaultLimit. A full page means more may follow: call again with
	// From just after the last record's time.
	Limit int
}

func (r Range) limit() int {
	if r.Limit <= 0 {
		return DefaultLimit
	}
	return r.Limit
}

// scanTime reads a bucket keyed by Unix milliseconds over r.
func scanTime[T any](s *Store, bucket []byte, r Range, decode func(k, v []byte) (T, error)) ([]T, error) {
	if err := s.begin(false); err != nil {
		return nil, err
	}
	defer s.life.RUnlock()
	lo, hi := msRange(r.From, r.To)
	limit := r.limit()
	var out []T
	err := s.db.View(func(tx *bolt.Tx) error {
		c := tx.Bucket(bucket).Cursor()
		for k, v := c.Seek(u64(lo)); k != nil && len(out) < limit; k, v = c.Next() {
			if ms, _ := fromU64(k); ms >= hi {
				break
			}
			x, err := decode(k, v)
			if err != nil {
				return err
			}
			out = append(out, x)
		}
		return nil
	})
	return out, err
}

// putTime stores v under the millisecond key ms, or under the next free
// millisecond if ms is taken (at most 1000 tries). It reports whether the
// key moved, and stored is false when no key was free.
func putTime(b *bolt.Bucket, ms uint64, v []byte) (shifted, stored bool, err error) {
	for i := uint64(0); i < 1000; i++ {
		k := u64(ms + i)
		if b.Get(k) != nil {
			continue
		}
		return i > 0, true, b.Put(k, v)
	}
	return false, false, nil
}
