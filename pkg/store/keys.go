package store

import (
	"encoding/binary"
	"fmt"
	"time"
)

// Bucket names. Every bucket is keyed by 8-byte big-endian unsigned
// integers, so a cursor visits records in numeric order.
var (
	bucketEvents    = []byte("events")
	bucketTrend     = []byte("trend")
	bucketSummaries = []byte("summaries")
	bucketClips     = []byte("clips")
	bucketBaselines = []byte("baselines")
	bucketMeta      = []byte("meta")
	bucketOutbox    = []byte("outbox")
	bucketCommands  = []byte("commands")

	allBuckets = [][]byte{bucketEvents, bucketTrend, bucketSummaries, bucketClips, bucketBaselines, bucketMeta,
		bucketOutbox, bucketCommands}

	// addedInV2 are the buckets schema 2 added; Open creates them in a
	// schema 1 file it may write.
	addedInV2 = [][]byte{bucketOutbox, bucketCommands}
)

// u64 encodes n as 8 big-endian bytes.
func u64(n uint64) []byte {
	var b [8]byte
	binary.BigEndian.PutUint64(b[:], n)
	return b[:]
}

// fromU64 decodes an 8-byte big-endian key; ok is false for other lengths.
func fromU64(b []byte) (n uint64, ok bool) {
	if len(b) != 8 {
		return 0, false
	}
	return binary.BigEndian.Uint64(b), true
}

// unixMs returns t as milliseconds since 1970-01-01 UTC. t must have passed
// checkTime.
func unixMs(t time.Time) uint64 { return uint64(t.UnixMilli()) }

// fromMs is the inverse of unixMs; the result is in UTC.
func fromMs(ms uint64) time.Time { return time.UnixMilli(int64(ms)).UTC() }

// checkTime refuses the zero time and times before 1970, which have no
// unsigned millisecond key.
func checkTime(kind, field string, t time.Time) error {
	if t.IsZero() {
		return fmt.Errorf("%w: %s: %s is the zero time", ErrInvalid, kind, field)
	}
	if t.UnixMilli() < 0 {
		return fmt.Errorf("%w: %s: %s %s is before 1970", ErrInvalid, kind, field, t.UTC().Format(time.RFC3339))
	}
	return nil
}

// msRange turns [from, to) into an inclusive-exclusive millisecond range;
// zero times mean unbounded.
func msRange(from, to time.Time) (lo, hi uint64) {
	lo, hi = 0, ^uint64(0)
	if !from.IsZero() && from.UnixMilli() > 0 {
		lo = unixMs(from)
	}
	if !to.IsZero() {
		if to.UnixMilli() <= 0 {
			return 0, 0
		}
		hi = unixMs(to)
	}
	return lo, hi
}
