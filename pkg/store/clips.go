package store

import (
	"bytes"
	"fmt"
	"time"

	bolt "go.etcd.io/bbolt"
)

// MaxClipBytes is the largest WAV file PutClip accepts (32 MiB, about
// 17 minutes of 16 kHz 16-bit mono). A clip must also be at most a quarter
// of Options.MaxBytes, or retention would evict most of the log for it.
const MaxClipBytes = 32 << 20

// Clip is a piece of evidence audio: a complete WAV file, stored and served
// byte for byte as given.
type Clip struct {
	// ID is assigned by PutClip: 1 for the first clip of a store, one more
	// for each clip after it, never reused. A non-zero ID given to PutClip
	// must come from ReserveClipID and not be stored yet.
	ID uint64
	// EventSeq is the event the clip is evidence for; zero for none. A
	// non-zero value must name a stored event.
	EventSeq uint64
	// Start is the UTC wall-clock time of the first sample, stored to the
	// millisecond. Required, not before 1970.
	Start time.Time
	// SampleRate is the sample rate in Hz. PutClip reads it from the WAV
	// header; a non-zero value given must agree.
	SampleRate int
	// Duration is the length of the audio, stored to the millisecond.
	// PutClip computes it from the WAV header; a non-zero value given must
	// agree to within a millisecond.
	Duration time.Duration
	// Asset is the asset tag the clip was recorded at; optional.
	Asset string
	// WAV is the whole WAV file. Clips leaves it nil.
	WAV []byte
}

// clipJSON is the metadata stored before the WAV bytes; see doc.go.
type clipJSON struct {
	ID           uint64 `json:"id"`
	EventSeq     uint64 `json:"event_seq,omitempty"`
	StartMs      uint64 `json:"start_ms"`
	SampleRateHz int    `json:"sample_rate_hz"`
	DurationMs   int64  `json:"duration_ms"`
	Asset        string `json:"asset,omitempty"`
	WAVBytes     int    `json:"wav_bytes"`
}

func (s *Store) checkClip(c *Clip) error {
	if err := checkTime("clip", "start", c.Start); err != nil {
		return err
	}
	if err := checkText("clip", "asset", c.Asset, MaxAssetLen); err != nil {
		return err
	}
	limit := int64(MaxClipBytes)
	if s.opt.MaxBytes > 0 {
		limit = min(limit, s.opt.MaxBytes/4)
	}
	if int64(len(c.WAV)) > limit {
		return fmt.Errorf("%w: clip: %d bytes, at most %d", ErrInvalid, len(c.WAV), limit)
	}
	w, err := checkWAV(c.WAV)
	if err != nil {
		return err
	}
	if c.SampleRate != 0 && c.SampleRate != w.sampleRate {
		return fmt.Errorf("%w: clip: sample rate given as %d Hz, the WAV header says %d Hz", ErrInvalid, c.SampleRate, w.sampleRate)
	}
	if d := c.Duration - w.duration; c.Duration != 0 && (d > time.Millisecond || d < -time.Millisecond) {
		return fmt.Errorf("%w: clip: duration given as %v, the WAV data lasts %v", ErrInvalid, c.Duration, w.duration)
	}
	c.SampleRate, c.Duration = w.sampleRate, w.duration
	return nil
}

// ReserveClipID hands out the next clip id without storing a clip, so an
// event can name its evidence before the sound after it is recorded.
func (s *Store) ReserveClipID() (uint64, error) {
	if err := s.begin(true); err != nil {
		return 0, err
	}
	defer s.life.RUnlock()
	var id uint64
	err := s.update(func(tx *bolt.Tx) error {
		var err error
		id, err = nextID(tx, metaNextClip)
		return err
	})
	if err != nil {
		return 0, fmt.Errorf("store: reserve a clip id in %s: %w", s.path, err)
	}
	return id, nil
}

// PutClip validates c and writes it in its own transaction, synced to disk
// before PutClip returns, under c.ID if it was reserved, else a new id.
func (s *Store) PutClip(c Clip) (id uint64, err error) {
	if err := s.checkClip(&c); err != nil {
		return 0, err
	}
	if err := s.begin(true); err != nil {
		return 0, err
	}
	defer s.life.RUnlock()
	err = s.update(func(tx *bolt.Tx) error {
		if c.EventSeq != 0 && tx.Bucket(bucketEvents).Get(u64(c.EventSeq)) == nil {
			return fmt.Errorf("%w: clip: event %d does not exist", ErrInvalid, c.EventSeq)
		}
		n := c.ID
		if n == 0 {
			var err error
			if n, err = nextID(tx, metaNextClip); err != nil {
				return err
			}
		} else if next, _ := fromU64(tx.Bucket(bucketMeta).Get(metaNextClip)); n >= next {
			return fmt.Errorf("%w: clip: id %d was not reserved", ErrInvalid, n)
		} else if tx.Bucket(bucketClips).Get(u64(n)) != nil {
			return fmt.Errorf("%w: clip: id %d is already stored", ErrInvalid, n)
		}
		v, err := encodeBlob(clipJSON{
			ID: n, EventSeq: c.EventSeq, StartMs: unixMs(c.Start), SampleRateHz: c.SampleRate,
			DurationMs: c.Duration.Milliseconds(), Asset: c.Asset, WAVBytes: len(c.WAV),
		}, c.WAV)
		if err != nil {
			return err
		}
		b := tx.Bucket(bucketClips)
		b.FillPercent = 1
		id = n
		return b.Put(u64(n), v)
	})
	if err != nil {
		return 0, fmt.Errorf("store: put clip in %s: %w", s.path, err)
	}
	return id, nil
}

// decodeClip decodes a stored clip; wav aliases v.
func decodeClip(k, v []byte) (c Clip, wav []byte, err error) {
	var m clipJSON
	wav, err = decodeBlob(bucketClips, k, v, &m)
	if err != nil {
		return Clip{}, nil, err
	}
	if id, _ := fromU64(k); id != m.ID || m.WAVBytes != len(wav) {
		return Clip{}, nil, fmt.Errorf("%w: clips key %x: metadata says clip %d of %d bytes, value holds %d", ErrCorrupt, k, m.ID, m.WAVBytes, len(wav))
	}
	return Clip{
		ID: m.ID, EventSeq: m.EventSeq, Start: fromMs(m.StartMs), SampleRate: m.SampleRateHz,
		Duration: time.Duration(m.DurationMs) * time.Millisecond, Asset: m.Asset,
	}, wav, nil
}

// Clip returns the clip with the given id, WAV bytes included (a copy), or
// an error wrapping ErrNotFound.
func (s *Store) Clip(id uint64) (Clip, error) {
	if err := s.begin(false); err != nil {
		return Clip{}, err
	}
	defer s.life.RUnlock()
	var c Clip
	err := s.db.View(func(tx *bolt.Tx) error {
		k := u64(id)
		v := tx.Bucket(bucketClips).Get(k)
		if v == nil {
			return fmt.Errorf("%w: clip %d", ErrNotFound, id)
		}
		var wav []byte
		var err error
		c, wav, err = decodeClip(k, v)
		c.WAV = bytes.Clone(wav)
		return err
	})
	return c, err
}

// Clips lists the clips with Start in [r.From, r.To), in id order, without
// their WAV bytes. Clips are keyed by id, so the time bounds filter a scan.
func (s *Store) Clips(r Range) ([]Clip, error) {
	if err := s.begin(false); err != nil {
		return nil, err
	}
	defer s.life.RUnlock()
	var out []Clip
	limit := r.limit()
	err := s.db.View(func(tx *bolt.Tx) error {
		c := tx.Bucket(bucketClips).Cursor()
		for k, v := c.First(); k != nil && len(out) < limit; k, v = c.Next() {
			x, _, err := decodeClip(k, v)
			if err != nil {
				return err
			}
			if (r.From.IsZero() || !x.Start.Before(r.From)) && (r.To.IsZero() || x.Start.Before(r.To)) {
				out = append(out, x)
			}
		}
		return nil
	})
	return out, err
}
