package store

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"slices"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	bolt "go.etcd.io/bbolt"
	berrors "go.etcd.io/bbolt/errors"
)

// SchemaVersion is the layout of buckets, keys and values this build
// writes. Open refuses files with a higher version.
const SchemaVersion = 2

// Keys in the meta bucket; each value is an 8-byte big-endian integer.
var (
	metaSchema       = []byte("schema")
	metaCreatedMs    = []byte("created_ms")
	metaNextEvent    = []byte("next_event_seq")
	metaNextClip     = []byte("next_clip_id")
	metaNextBaseline = []byte("next_baseline_id")
	metaNextMessage  = []byte("next_message_seq")
)

// Store is the agent's local log: one bbolt file. Its methods are safe for
// concurrent use. Open returns it; the caller must Close it, which writes
// what is still buffered.
type Store struct {
	db       *bolt.DB
	path     string
	opt      Options
	pageSize int // read once at Open: bbolt's DB.Info races with remapping

	// life guards closed and the db handle: every method holds it for
	// reading, Close holds it for writing.
	life   sync.RWMutex
	closed bool

	// mu guards pendingTrend, pendingSum and lastFlushErr.
	mu           sync.Mutex
	pendingTrend []TrendPoint
	pendingSum   []Summary
	lastFlushErr error

	// flushMu serialises flushes and guards lastPrune and morePrune.
	flushMu   sync.Mutex
	lastPrune time.Time
	morePrune bool

	commits atomic.Int64 // write transactions committed since Open
	pruned  atomic.Int64 // records removed by retention since Open
	shifted atomic.Int64 // trend points or summaries moved to a free millisecond
	dropped atomic.Int64 // trend points or summaries dropped: no free key

	stopOnce sync.Once
	stop     chan struct{} // closed by Close to stop the flusher
	done     chan struct{} // closed by the flusher when it returns
}

// Open opens or creates the store at path. A missing file is created
// (mode 0600, built under a temporary name and linked into place) unless
// opt.ReadOnly is set; the directory must exist. (A crash during creation
// can leave an empty-of-records path+".new-<pid>" beside it, safe to
// delete.) If another process holds the file, Open waits up to
// opt.Timeout and then fails with ErrLocked. Unless read-only or
// opt.FlushInterval is negative, Open starts a goroutine that flushes
// every FlushInterval until Close.
func Open(path string, opt Options) (*Store, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	if opt.ReadOnly {
		// bbolt would create a missing file even for a read-only open.
		fi, err := os.Stat(path)
		if err != nil {
			return nil, fmt.Errorf("store: open %s read-only: %w", path, err)
		}
		if fi.Size() == 0 {
			return nil, fmt.Errorf("%w: %s is empty, not a bbolt file", ErrNotStore, path)
		}
	}
	if !opt.ReadOnly {
		if err := create(path, opt.Now()); err != nil {
			return nil, err
		}
	}
	// bbolt waits forever for a zero timeout and tries once for a negative
	// one; withDefaults has already replaced zero.
	bo := &bolt.Options{Timeout: opt.Timeout, ReadOnly: opt.ReadOnly, PreLoadFreelist: true}
	db, err := bolt.Open(path, 0o600, bo)
	if err != nil {
		return nil, openError(path, opt, err)
	}
	s := &Store{db: db, path: path, opt: opt, pageSize: db.Info().PageSize}
	fresh, old := false, false
	err = db.View(func(tx *bolt.Tx) error {
		if first, _ := tx.Cursor().First(); first == nil && !opt.ReadOnly {
			fresh = true // an empty bbolt file made by hand: adopt it
			return nil
		}
		if err := checkMeta(path, tx); err != nil {
			return err
		}
		v, _ := fromU64(tx.Bucket(bucketMeta).Get(metaSchema))
		old = v < SchemaVersion
		return nil
	})
	if err == nil && fresh {
		err = s.update(func(tx *bolt.Tx) error { return initBuckets(tx, path, opt.Now()) })
	}
	if err == nil && old && !opt.ReadOnly {
		err = s.update(upgrade)
	}
	if err != nil {
		db.Close()
		return nil, err
	}
	if !opt.ReadOnly && opt.FlushInterval > 0 {
		s.stop, s.done = make(chan struct{}), make(chan struct{})
		go s.flushLoop(opt.FlushInterval)
	}
	return s, nil
}

// openError turns bbolt's open errors into this package's.
func openError(path string, opt Options, err error) error {
	switch {
	case errors.Is(err, berrors.ErrTimeout):
		wait := "waited " + opt.Timeout.String()
		if opt.Timeout < 0 {
			wait = "did not wait"
		}
		return fmt.Errorf("%w: %s: another agent or tool holds it open (%s); stop it, or read a backup copy instead",
			ErrLocked, path, wait)
	case errors.Is(err, berrors.ErrInvalid), errors.Is(err, berrors.ErrVersionMismatch), errors.Is(err, berrors.ErrChecksum),
		strings.HasPrefix(err.Error(), "file size too small"): // bbolt v1.4.3 has no sentinel for this one
		return fmt.Errorf("%w: %s is not a bbolt file or its header is damaged (%v)", ErrNotStore, path, err)
	}
	return fmt.Errorf("store: open %s: %w", path, err)
}

// checkMeta verifies that tx holds a store this build can read.
func checkMeta(path string, tx *bolt.Tx) error {
	m := tx.Bucket(bucketMeta)
	if m == nil {
		other, _ := tx.Cursor().First()
		if other == nil {
			return fmt.Errorf("%w: %s is an empty bbolt file with no %q bucket", ErrNotStore, path, bucketMeta)
		}
		return fmt.Errorf("%w: %s has no %q bucket but holds bucket %q of some other program; refusing to use it",
			ErrNotStore, path, bucketMeta, other)
	}
	v, ok := fromU64(m.Get(metaSchema))
	if !ok {
		return fmt.Errorf("%w: %s: meta bucket has no valid schema version", ErrNotStore, path)
	}
	if v > SchemaVersion {
		return fmt.Errorf("%w: %s has schema %d, this build reads up to %d; use a newer agent", ErrSchema, path, v, SchemaVersion)
	}
	for _, name := range allBuckets {
		if tx.Bucket(name) == nil && (v >= 2 || !slices.ContainsFunc(addedInV2, func(b []byte) bool { return bytes.Equal(b, name) })) {
			return fmt.Errorf("%w: %s: bucket %q is missing", ErrCorrupt, path, name)
		}
	}
	return nil
}

// upgrade brings a schema 1 file to schema 2: the outbox and commands
// buckets and the message counter. It does nothing to a current file.
func upgrade(tx *bolt.Tx) error {
	m := tx.Bucket(bucketMeta)
	for _, name := range addedInV2 {
		if _, err := tx.CreateBucketIfNotExists(name); err != nil {
			return err
		}
	}
	if err := m.Put(metaNextMessage, u64(1)); err != nil {
		return err
	}
	return m.Put(metaSchema, u64(SchemaVersion))
}

// initBuckets creates the buckets and meta keys of a new file.
func initBuckets(tx *bolt.Tx, path string, now time.Time) error {
	for _, name := range allBuckets {
		if _, err := tx.CreateBucket(name); err != nil {
			return fmt.Errorf("store: create bucket %q in %s: %w", name, path, err)
		}
	}
	m := tx.Bucket(bucketMeta)
	for _, kv := range []struct {
		k []byte
		v uint64
	}{
		{metaSchema, SchemaVersion},
		{metaCreatedMs, uint64(max(now.UnixMilli(), 0))},
		{metaNextEvent, 1},
		{metaNextClip, 1},
		{metaNextBaseline, 1},
		{metaNextMessage, 1},
	} {
		if err := m.Put(kv.k, u64(kv.v)); err != nil {
			return err
		}
	}
	return nil
}

// nextID returns the counter stored under key in the meta bucket and
// stores it plus one, inside the caller's transaction, so a number is
// never handed out twice, even after a crash.
func nextID(tx *bolt.Tx, key []byte) (uint64, error) {
	m := tx.Bucket(bucketMeta)
	n, ok := fromU64(m.Get(key))
	if !ok || n == 0 {
		return 0, fmt.Errorf("%w: meta key %q", ErrCorrupt, key)
	}
	return n, m.Put(key, u64(n+1))
}

// Path returns the file name the store was opened with.
func (s *Store) Path() string { return s.path }

// Close stops the flusher, writes buffered trend points and summaries,
// and closes the file. It returns the final flush error, if any, joined
// with the close error; records that final flush could not write are
// lost. Closing twice is a no-op.
func (s *Store) Close() error {
	s.stopOnce.Do(func() {
		if s.stop != nil {
			close(s.stop)
			<-s.done
		}
	})
	s.life.Lock()
	defer s.life.Unlock()
	if s.closed {
		return nil
	}
	var ferr error
	if !s.opt.ReadOnly {
		ferr = s.flush()
	}
	s.closed = true
	cerr := s.db.Close()
	if cerr != nil {
		cerr = fmt.Errorf("store: close %s: %w", s.path, cerr)
	}
	return errors.Join(ferr, cerr)
}

// begin checks that the store is open (and writable if write is set) and
// takes the life lock for reading; the caller must call s.life.RUnlock.
func (s *Store) begin(write bool) error {
	s.life.RLock()
	switch {
	case s.closed:
		s.life.RUnlock()
		return ErrClosed
	case write && s.opt.ReadOnly:
		s.life.RUnlock()
		return fmt.Errorf("%w: %s", ErrReadOnly, s.path)
	}
	return nil
}

// update runs fn in a write transaction, committed and synced to disk
// before it returns, and counts the commit.
func (s *Store) update(fn func(*bolt.Tx) error) error {
	if err := s.db.Update(fn); err != nil {
		return err
	}
	s.commits.Add(1)
	return nil
}
