package store

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"time"

	bolt "go.etcd.io/bbolt"
)

// MaxBaselineBytes is the largest baseline file AddBaseline accepts.
const MaxBaselineBytes = 16 << 20

// Baseline is one entry of the history of enrolled baselines. Entries are
// only ever appended: enrolling again adds an entry with the distance to
// the one before, it never replaces it. Retention never removes them.
type Baseline struct {
	// ID is assigned by AddBaseline: 1 for the first, one more for each
	// after it.
	ID uint64
	// Created is when the baseline was enrolled (UTC, to the millisecond).
	// Required, not before 1970.
	Created time.Time
	// FileID is the identifier the baseline file itself carries, if any;
	// at most 64 bytes.
	FileID string
	// Asset is the asset tag the baseline describes; optional.
	Asset string
	// Label is a note for people ("after bearing change"); optional, at
	// most 256 bytes.
	Label string
	// Threshold is the calibrated alarm threshold on the cosine distance;
	// zero if not calibrated.
	Threshold float64
	// Previous is the ID of the baseline Distance was measured against. It
	// must be the newest stored baseline (zero when there is none), else
	// AddBaseline fails with ErrBaselineConflict.
	Previous uint64
	// Distance is the cosine distance from the previous baseline's mean
	// embedding to this one's: how far "healthy" moved. Zero when Previous
	// is zero; NaN when the two cannot be compared (different feature
	// settings), stored as JSON null.
	Distance float64
	// SHA256 is the hex SHA-256 of File, set by AddBaseline when File is
	// not empty.
	SHA256 string
	// File is the baseline file, stored byte for byte; may be empty when
	// the file is kept elsewhere. Baselines leaves it nil.
	File []byte
}

// baselineJSON is the metadata stored before the file bytes; see doc.go.
type baselineJSON struct {
	ID         uint64   `json:"id"`
	CreatedMs  uint64   `json:"created_ms"`
	FileID     string   `json:"file_id,omitempty"`
	Asset      string   `json:"asset,omitempty"`
	Label      string   `json:"label,omitempty"`
	Threshold  float64  `json:"threshold,omitempty"`
	PreviousID uint64   `json:"previous_id,omitempty"`
	Distance   *float64 `json:"distance_to_previous"`
	SHA256     string   `json:"sha256,omitempty"`
	FileBytes  int      `json:"file_bytes"`
}

func (b *Baseline) validate() error {
	const kind = "baseline"
	if err := checkTime(kind, "created", b.Created); err != nil {
		return err
	}
	for _, f := range []struct {
		name, v string
		max     int
	}{{"file_id", b.FileID, 64}, {"asset", b.Asset, MaxAssetLen}, {"label", b.Label, 256}} {
		if err := checkText(kind, f.name, f.v, f.max); err != nil {
			return err
		}
	}
	if err := checkFinite(kind, "threshold", b.Threshold); err != nil {
		return err
	}
	if math.IsInf(b.Distance, 0) || b.Distance < 0 {
		return fmt.Errorf("%w: baseline: distance_to_previous %v must be finite and not negative (NaN: not comparable)", ErrInvalid, b.Distance)
	}
	if b.Previous == 0 && b.Distance != 0 {
		return fmt.Errorf("%w: baseline: distance_to_previous %v given without a previous baseline", ErrInvalid, b.Distance)
	}
	if len(b.File) > MaxBaselineBytes {
		return fmt.Errorf("%w: baseline: file is %d bytes, at most %d", ErrInvalid, len(b.File), MaxBaselineBytes)
	}
	return nil
}

// AddBaseline validates b and appends it to the baseline history with a
// new id, in its own transaction synced to disk before it returns.
func (s *Store) AddBaseline(b Baseline) (id uint64, err error) {
	if err := b.validate(); err != nil {
		return 0, err
	}
	if err := s.begin(true); err != nil {
		return 0, err
	}
	defer s.life.RUnlock()
	m := baselineJSON{
		CreatedMs: unixMs(b.Created), FileID: b.FileID, Asset: b.Asset, Label: b.Label,
		Threshold: b.Threshold, PreviousID: b.Previous, FileBytes: len(b.File),
	}
	if !math.IsNaN(b.Distance) {
		m.Distance = &b.Distance
	}
	if len(b.File) > 0 {
		sum := sha256.Sum256(b.File)
		m.SHA256 = hex.EncodeToString(sum[:])
	}
	err = s.update(func(tx *bolt.Tx) error {
		bk := tx.Bucket(bucketBaselines)
		var newest uint64
		if k, _ := bk.Cursor().Last(); k != nil {
			newest, _ = fromU64(k)
		}
		if b.Previous != newest {
			return fmt.Errorf("%w: Previous is %d but the newest stored baseline is %d; measure the distance to %d and try again",
				ErrBaselineConflict, b.Previous, newest, newest)
		}
		n, err := nextID(tx, metaNextBaseline)
		if err != nil {
			return err
		}
		m.ID = n
		v, err := encodeBlob(m, b.File)
		if err != nil {
			return err
		}
		bk.FillPercent = 1
		id = n
		return bk.Put(u64(n), v)
	})
	if err != nil {
		return 0, fmt.Errorf("store: add baseline to %s: %w", s.path, err)
	}
	return id, nil
}

func decodeBaseline(k, v []byte) (Baseline, []byte, error) {
	var m baselineJSON
	file, err := decodeBlob(bucketBaselines, k, v, &m)
	if err != nil {
		return Baseline{}, nil, err
	}
	if id, _ := fromU64(k); id != m.ID || m.FileBytes != len(file) {
		return Baseline{}, nil, fmt.Errorf("%w: baselines key %x: metadata says baseline %d of %d bytes, value holds %d", ErrCorrupt, k, m.ID, m.FileBytes, len(file))
	}
	d := math.NaN()
	if m.Distance != nil {
		d = *m.Distance
	}
	return Baseline{
		ID: m.ID, Created: fromMs(m.CreatedMs), FileID: m.FileID, Asset: m.Asset, Label: m.Label,
		Threshold: m.Threshold, Previous: m.PreviousID, Distance: d, SHA256: m.SHA256,
	}, file, nil
}

// Baselines returns the whole baseline history, oldest first, without the
// file bytes.
func (s *Store) Baselines() ([]Baseline, error) {
	if err := s.begin(false); err != nil {
		return nil, err
	}
	defer s.life.RUnlock()
	var out []Baseline
	err := s.db.View(func(tx *bolt.Tx) error {
		return tx.Bucket(bucketBaselines).ForEach(func(k, v []byte) error {
			b, _, err := decodeBaseline(k, v)
			out = append(out, b)
			return err
		})
	})
	return out, err
}

// Baseline returns the baseline with the given id, file bytes included (a
// copy). An id of zero means the newest. It fails with ErrNotFound if
// there is no such baseline.
func (s *Store) Baseline(id uint64) (Baseline, error) {
	if err := s.begin(false); err != nil {
		return Baseline{}, err
	}
	defer s.life.RUnlock()
	var out Baseline
	err := s.db.View(func(tx *bolt.Tx) error {
		bk := tx.Bucket(bucketBaselines)
		k, v := u64(id), []byte(nil)
		if id == 0 {
			k, v = bk.Cursor().Last()
		} else {
			v = bk.Get(k)
		}
		switch {
		case v == nil && id == 0:
			return fmt.Errorf("%w: no baseline stored yet", ErrNotFound)
		case v == nil:
			return fmt.Errorf("%w: baseline %d", ErrNotFound, id)
		}
		b, file, err := decodeBaseline(k, v)
		b.File = bytes.Clone(file)
		out = b
		return err
	})
	return out, err
}
