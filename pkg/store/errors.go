package store

import "errors"

// Sentinel errors. Every error this package returns wraps one of these (or
// an operating-system error from the file itself), so callers can test with
// errors.Is; the wrapping message names the file, record or field.
var (
	// ErrLocked is returned by Open when another process holds the file
	// open (usually a running agent) and the lock did not come free within
	// Options.Timeout. A read-only open cannot share the file with a writer.
	ErrLocked = errors.New("store: file is locked by another process")

	// ErrNotStore is returned by Open when the file is not a bbolt file, or
	// is a bbolt file that holds buckets but not this package's meta bucket
	// (so it belongs to some other program and is left untouched).
	ErrNotStore = errors.New("store: not an auscult store")

	// ErrSchema is returned by Open when the file was written with a newer
	// schema version than this build reads.
	ErrSchema = errors.New("store: unsupported schema version")

	// ErrOptions is returned by Open when an Options field is out of range.
	ErrOptions = errors.New("store: invalid options")

	// ErrInvalid is returned when a record handed to the store breaks its
	// contract (zero time, NaN score, unknown kind, malformed WAV...). The
	// message names the record kind and the field; nothing is written.
	ErrInvalid = errors.New("store: invalid record")

	// ErrNotFound is returned when a record looked up by sequence number or
	// id does not exist (never written, or removed by retention).
	ErrNotFound = errors.New("store: not found")

	// ErrCorrupt is returned when a stored value cannot be decoded or does
	// not agree with its key. The message names the bucket and key.
	ErrCorrupt = errors.New("store: corrupt record")

	// ErrBaselineConflict is returned by AddBaseline when Baseline.Previous
	// does not name the newest stored baseline, so the distance the caller
	// measured is not the distance to the previous one.
	ErrBaselineConflict = errors.New("store: baseline does not follow the newest stored baseline")

	// ErrBacklog is returned by AddTrend and AddSummary when MaxPending
	// records are already buffered because flushes keep failing.
	ErrBacklog = errors.New("store: too many records waiting to be written")

	// ErrReadOnly is returned by every write method of a Store opened with
	// Options.ReadOnly.
	ErrReadOnly = errors.New("store: opened read-only")

	// ErrClosed is returned by every method called after Close.
	ErrClosed = errors.New("store: closed")
)
