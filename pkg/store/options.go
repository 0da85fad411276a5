package store

import (
	"fmt"
	"time"
)

// Defaults applied by Open to zero Options fields.
const (
	// DefaultTimeout is how long Open waits for the file lock.
	DefaultTimeout = 5 * time.Second

	// DefaultMaxBytes is the default cap on live data bytes (256 MiB).
	DefaultMaxBytes = 256 << 20

	// MinMaxBytes is the smallest cap Open accepts (256 KiB): an empty
	// store already uses about 40 KiB of pages.
	MinMaxBytes = 256 << 10

	// DefaultFlushInterval is how often buffered trend points and summaries
	// are written, in one transaction.
	DefaultFlushInterval = 10 * time.Second

	// DefaultPruneInterval is how often retention by age runs.
	DefaultPruneInterval = time.Hour

	// MaxPending is how many trend points and summaries together may wait
	// in memory for a flush before AddTrend and AddSummary refuse more.
	// At one trend point a minute it is about a week of failed flushes.
	MaxPending = 10000

	day = 24 * time.Hour
)

// DefaultMaxAge returns the retention by age applied to zero fields of
// Options.MaxAge: events 5 years, summaries 3 years, trend 400 days, clips
// 90 days. Events are kept longest, clips (the bulkiest) shortest. These
// are our choices for a pump skid visited a few times a year, no source.
func DefaultMaxAge() Ages {
	return Ages{Events: 5 * 365 * day, Summaries: 3 * 365 * day, Trend: 400 * day, Clips: 90 * day}
}

// Ages holds the maximum age of each record kind, measured from the
// record's own time (Event.Time, TrendPoint.Start, Summary.Start,
// Clip.Start) to the store's clock. Zero means the DefaultMaxAge value;
// a negative duration keeps records of that kind forever (only MaxBytes
// then removes them). Baselines are never removed.
type Ages struct {
	Events    time.Duration
	Trend     time.Duration
	Summaries time.Duration
	Clips     time.Duration
}

// Options configures Open. The zero value is a writable store with the
// documented defaults.
type Options struct {
	// Timeout is how long Open waits for another process to release the
	// file lock before failing with ErrLocked. Zero means DefaultTimeout;
	// a negative value tries once.
	Timeout time.Duration

	// ReadOnly opens the file for reading only (a technician's copy, a
	// backup). It shares the file with other readers but not with a
	// writer. All write methods then return ErrReadOnly.
	ReadOnly bool

	// MaxBytes caps the live data of the file: the bytes of pages in use,
	// that is the file's data size minus free pages (see the package
	// documentation). Zero means DefaultMaxBytes; a negative value
	// disables the cap. Values between 1 and MinMaxBytes are refused.
	MaxBytes int64

	// MaxAge is the retention by age of each record kind.
	MaxAge Ages

	// FlushInterval is how often buffered trend points and summaries are
	// written and retention is checked, by a goroutine the Store owns.
	// Zero means DefaultFlushInterval; a negative value starts no
	// goroutine, so only Flush and Close write them.
	FlushInterval time.Duration

	// PruneInterval is how often a flush also runs retention by age.
	// Retention by size is checked at every flush. Zero means
	// DefaultPruneInterval.
	PruneInterval time.Duration

	// Outbox configures the store-and-forward queue of outgoing messages;
	// the zero value disables it.
	Outbox OutboxOptions

	// Now is the clock used for retention ages and prune scheduling. Nil
	// means time.Now. Record times always come from the records.
	Now func() time.Time
}

// withDefaults returns o with zero fields replaced by defaults, or an
// error wrapping ErrOptions naming the bad field.
func (o Options) withDefaults() (Options, error) {
	if o.Timeout == 0 {
		o.Timeout = DefaultTimeout
	}
	switch {
	case o.MaxBytes == 0:
		o.MaxBytes = DefaultMaxBytes
	case o.MaxBytes > 0 && o.MaxBytes < MinMaxBytes:
		return o, fmt.Errorf("%w: MaxBytes %d is below the minimum %d", ErrOptions, o.MaxBytes, MinMaxBytes)
	}
	def := DefaultMaxAge()
	ages := []struct {
		name string
		v    *time.Duration
		def  time.Duration
	}{
		{"Events", &o.MaxAge.Events, def.Events},
		{"Trend", &o.MaxAge.Trend, def.Trend},
		{"Summaries", &o.MaxAge.Summaries, def.Summaries},
		{"Clips", &o.MaxAge.Clips, def.Clips},
	}
	for _, a := range ages {
		if *a.v == 0 {
			*a.v = a.def
		}
	}
	if o.FlushInterval == 0 {
		o.FlushInterval = DefaultFlushInterval
	}
	switch {
	case o.PruneInterval == 0:
		o.PruneInterval = DefaultPruneInterval
	case o.PruneInterval < 0:
		return o, fmt.Errorf("%w: PruneInterval %v is negative", ErrOptions, o.PruneInterval)
	}
	if o.Now == nil {
		o.Now = time.Now
	}
	if o.Outbox.Enabled {
		if err := o.Outbox.fill(); err != nil {
			return o, err
		}
	}
	return o, nil
}
