package store

import (
	"bytes"
	"slices"
	"time"

	bolt "go.etcd.io/bbolt"
)

// DefaultLimit is the number of records a read returns when its Limit is
// zero or negative.
const DefaultLimit = 10000

// EventQuery selects events. The zero value selects the oldest
// DefaultLimit events.
type EventQuery struct {
	// AfterSeq and BeforeSeq bound the sequence numbers, both exclusive;
	// zero means unbounded. They are the paging cursors: pass the last
	// Seq of a page as AfterSeq (or as BeforeSeq with Newest).
	AfterSeq, BeforeSeq uint64
	// From and To bound Event.Time to [From, To); zero means unbounded.
	// Events are ordered by Seq, not time (a clock step can stamp a later
	// event earlier), so the time bounds filter a scan.
	From, To time.Time
	// Kinds keeps only events of these kinds; empty keeps all.
	Kinds []EventKind
	// Asset keeps only events for this asset tag; empty keeps all.
	Asset string
	// Newest returns the newest matching events first.
	Newest bool
	// Limit is the most events returned; zero or negative means
	// DefaultLimit. A full page means more may follow.
	Limit int
}

func (q *EventQuery) match(e *Event) bool {
	if !q.From.IsZero() && e.Time.Before(q.From) {
		return false
	}
	if !q.To.IsZero() && !e.Time.Before(q.To) {
		return false
	}
	if len(q.Kinds) > 0 && !slices.Contains(q.Kinds, e.Kind) {
		return false
	}
	return q.Asset == "" || q.Asset == e.Asset
}

// Events returns the events q selects, in sequence order (newest first if
// q.Newest). A value that does not decode stops the read with an error
// wrapping ErrCorrupt that names its key.
func (s *Store) Events(q EventQuery) ([]Event, error) {
	if err := s.begin(false); err != nil {
		return nil, err
	}
	defer s.life.RUnlock()
	limit := q.Limit
	if limit <= 0 {
		limit = DefaultLimit
	}
	var out []Event
	err := s.db.View(func(tx *bolt.Tx) error {
		c := tx.Bucket(bucketEvents).Cursor()
		lo, hi := u64(q.AfterSeq+1), u64(q.BeforeSeq)
		if q.AfterSeq == ^uint64(0) {
			return nil
		}
		var k, v []byte
		if q.Newest {
			if q.BeforeSeq == 0 {
				k, v = c.Last()
			} else {
				k, v = c.Seek(hi)
				if k == nil {
					k, v = c.Last()
				}
				for k != nil && bytes.Compare(k, hi) >= 0 {
					k, v = c.Prev()
				}
			}
		} else {
			k, v = c.Seek(lo)
		}
		for ; k != nil && len(out) < limit; k, v = step(c, q.Newest) {
			if bytes.Compare(k, lo) < 0 || (q.BeforeSeq != 0 && bytes.Compare(k, hi) >= 0) {
				break
			}
			e, err := decodeEvent(k, v)
			if err != nil {
				return err
			}
			if q.match(&e) {
				out = append(out, e)
			}
		}
		return nil
	})
	return out, err
}

// step moves c forward, or backward if back is set.
func step(c *bolt.Cursor, back bool) ([]byte, []byte) {
	if back {
		return c.Prev()
	}
	return c.Next()
}
