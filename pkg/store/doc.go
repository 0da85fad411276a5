// Package store is the agent's local log: events, a minute trend, hourly
// summaries, evidence clips and the history of baselines, kept in one
// bbolt file on the device and read on site visits.
//
// # Durability
//
// AppendEvent, PutClip and AddBaseline each commit their own transaction,
// synced to disk (two fdatasync calls) before they return: a record
// reported stored survives a crash. AddTrend and AddSummary only buffer in
// memory; a goroutine the Store owns writes the buffer in one transaction
// every Options.FlushInterval (10 s by default), and Flush and Close do the
// same. This spares the SD card a commit per record; the price is that a
// crash loses at most one flush interval of trend. A transaction is all or
// nothing, so after any crash every record present is whole.
//
// Sequence numbers (events) and ids (clips, baselines) start at 1, have a
// counter each in the meta bucket, and the counter is written in the same
// transaction as the record, so they never go back or repeat.
//
// # Buckets, keys and values
//
// Every key is an unsigned integer in 8 big-endian bytes, so cursors visit
// records in order.
//
//	bucket     key                         value
//	events     sequence number             JSON, see below
//	trend      minute start, Unix ms       56 bytes binary, see below
//	summaries  hour start, Unix ms         80 bytes binary, see below
//	clips      clip id                     blob: JSON metadata + WAV file
//	baselines  baseline id                 blob: JSON metadata + baseline file
//	meta       (string keys)               8-byte big-endian integers:
//	           schema, created_ms, next_event_seq, next_clip_id, next_baseline_id
//
// Times are UTC milliseconds since 1970; records before 1970 are refused.
// A trend point or summary whose key is taken (the clock stepped back) is
// stored at the next free millisecond rather than overwrite anything.
//
// Event JSON: seq, time_ms, kind ("alarm", "diagnostic", "state"), code,
// asset, score (cosine distance, unitless, 0 to 2), threshold, message and
// values (an object of numbers whose names end in their unit: rms_dbfs,
// freq_hz, duration_s). Zero and empty fields are left out. The seq in the
// value must equal the key, which is checked on every read.
//
// Trend value, version 1, little-endian: byte 0 version (1), byte 1 alarm
// state, bytes 2-3 zero, bytes 4-7 windows (uint32), then six IEEE-754
// float64 at bytes 8, 16, ... 48: score_min, score_mean, score_max,
// rms_dbfs_mean, rms_dbfs_max, running_fraction (0 to 1).
//
// Summary value, version 1, little-endian: byte 0 version (1), byte 1
// alarm state, bytes 2-3 zero, then uint32 windows, alarms, overruns at
// bytes 4, 8, 12, then eight float64 at bytes 16, 24, ... 72:
// running_fraction, score_min, score_mean, score_p95, score_max,
// rms_dbfs_mean, rms_dbfs_max, alarm_s (seconds).
//
// The two time series are binary because they are the bulk of the file: a
// trend point is 56 bytes, about a third of its JSON; 400 days of minutes,
// with their summaries and a few events a day, measured 48 MB of live
// pages. Everything else is JSON so that
// `bbolt get` on a copy of the file is readable.
//
// Blob values (clips, baselines): byte 0 version (1), bytes 1-4 the
// metadata length n (big-endian uint32), n bytes of JSON metadata, then the
// file byte for byte. Clip metadata: id, event_seq, start_ms,
// sample_rate_hz, duration_ms, asset, wav_bytes. Baseline metadata: id,
// created_ms, file_id, asset, label, threshold, previous_id,
// distance_to_previous (null when not comparable), sha256, file_bytes.
//
// # Retention
//
// Retention runs inside a flush, deleting at most 2000 records per pass;
// if that was not enough the next flush goes on. By age it runs every
// Options.PruneInterval (1 h): records older than Options.MaxAge for their
// kind go (package defaults: events 5 years, summaries 3 years, trend 400
// days, clips 90 days; the agent passes its configuration's log.event_days,
// 1000 by default, and log.trend_days, 400, for trend and summaries
// alike). By size it runs at every flush that finds the live bytes
// over Options.MaxBytes (256 MiB): it deletes, oldest first, trend points
// and clips (whichever of the two is older), then summaries, and events
// last, until an estimate says the live bytes are down to 90% of the cap.
// Baselines are never deleted.
//
// MaxBytes bounds the live bytes: bbolt's data size (pages up to the
// high-water mark) minus the free and pending pages on its freelist, that
// is the pages holding records, tree structure and the freelist itself.
// The bound holds after each flush; between flushes, events and clips can
// push it over. The file itself never shrinks (bbolt reuses free pages
// rather than truncating), so its size is the highest live size reached
// plus bbolt's growth step (up to 16 MiB past 16 MiB). Give the cap that
// much head room below the free space of the card. Records are removed by
// their own time, so after a clock step the order by time and by key can
// differ; age pruning then stops at the first record that is not old
// enough.
//
// # Writes and SD-card wear
//
// Every commit writes whole 4 KiB pages: the changed leaf, the branch
// pages above it, the root of the bucket tree, the freelist and a meta
// page, about 20 to 25 KiB whatever the record size, plus two fdatasync
// calls. Steady state is therefore set by the number of commits: with one
// trend point a minute, any FlushInterval up to a minute makes about 60
// commits an hour (a flush with nothing to write commits nothing). The
// program scripts/storebytes measured about 1.6 MB an hour handed to
// pwrite (65 commits: 60 trend, 4 events, the summary) and 2.4 MB of page
// cache dirtied; a FlushInterval of 5 minutes cuts both by three quarters,
// at the price of losing up to 5 minutes of trend in a crash.
//
// # Caveats
//
// bbolt checksums its meta pages but not data pages; a value that does not
// decode is reported as ErrCorrupt naming its bucket and key, and the rest
// of the file stays readable. A file is held by one process at a time:
// a second agent, or a read-only open while the agent runs, fails with
// ErrLocked after Options.Timeout. Read a copy made with Backup instead.
// Do not keep a read transaction open across a write in the same
// goroutine; this package never hands out a transaction.
package store
