package store

import (
	"encoding/json"
	"fmt"
	"maps"
	"time"

	bolt "go.etcd.io/bbolt"
)

// EventKind says what an Event records.
type EventKind string

// Event kinds.
const (
	// EventAlarm is a change of an alarm: raised, cleared, acknowledged,
	// shelved.
	EventAlarm EventKind = "alarm"
	// EventDiagnostic is a finding about the agent or its sensor: silent
	// microphone, clipping, capture overruns, a failed publish.
	EventDiagnostic EventKind = "diagnostic"
	// EventState is a change of machine or agent state: machine started
	// or stopped, agent started, baseline enrolled.
	EventState EventKind = "state"
)

// Limits on Event fields, in bytes.
const (
	MaxCodeLen    = 64
	MaxAssetLen   = 64
	MaxMessageLen = 1024
	MaxValues     = 16
	MaxLabels     = 8
	MaxLabelLen   = 128
)

// Event is one entry of the event log. AppendEvent assigns Seq; the other
// fields come from the caller.
type Event struct {
	// Seq is the event's sequence number: 1 for the first event of a
	// store, one more for each event after it, never reused, across
	// restarts and crashes. Ignored by AppendEvent.
	Seq uint64
	// Time is the UTC wall-clock time the event was made, stored to the
	// millisecond. Required, not before 1970.
	Time time.Time
	// Kind is EventAlarm, EventDiagnostic or EventState.
	Kind EventKind
	// Code is a short token the agent defines, 1 to MaxCodeLen bytes of
	// a-z, 0-9, '_', '.', '-': "raised", "cleared", "mic_silent".
	Code string
	// Asset is the asset tag the event concerns ("P-492B"); optional.
	Asset string
	// Score is the cosine distance to the baseline at the event (0 to 2),
	// zero when not applicable.
	Score float64
	// Threshold is the alarm threshold on Score in force, zero when not
	// applicable.
	Threshold float64
	// Message is a sentence for people, valid UTF-8; optional.
	Message string
	// Values holds further numbers, at most MaxValues, each key naming
	// its unit as a suffix ("rms_dbfs", "freq_hz", "duration_s"). Keys
	// use a-z, 0-9 and '_'; values are finite.
	Values map[string]float64
	// Labels holds further words, at most MaxLabels: the ISA-18.2 state
	// after an alarm change ("state": "UNACK"), the baseline in force,
	// who acknowledged. Keys as for Values; values are valid UTF-8 of at
	// most MaxLabelLen bytes.
	Labels map[string]string
	// ClipID is the evidence clip reserved for this event with
	// ReserveClipID, zero for none. The clip itself is stored later.
	ClipID uint64
}

// eventJSON is the stored value of an event; see doc.go.
type eventJSON struct {
	Seq       uint64             `json:"seq"`
	TimeMs    uint64             `json:"time_ms"`
	Kind      EventKind          `json:"kind"`
	Code      string             `json:"code"`
	Asset     string             `json:"asset,omitempty"`
	Score     float64            `json:"score,omitempty"`
	Threshold float64            `json:"threshold,omitempty"`
	Message   string             `json:"message,omitempty"`
	Values    map[string]float64 `json:"values,omitempty"`
	Labels    map[string]string  `json:"labels,omitempty"`
	ClipID    uint64             `json:"clip_id,omitempty"`
}

func (e *Event) validate() error {
	const kind = "event"
	if err := checkTime(kind, "time", e.Time); err != nil {
		return err
	}
	switch e.Kind {
	case EventAlarm, EventDiagnostic, EventState:
	default:
		return fmt.Errorf("%w: event: kind %q is not alarm, diagnostic or state", ErrInvalid, e.Kind)
	}
	if err := checkToken(kind, "code", e.Code, MaxCodeLen, "_.-"); err != nil {
		return err
	}
	if err := checkText(kind, "asset", e.Asset, MaxAssetLen); err != nil {
		return err
	}
	if err := checkText(kind, "message", e.Message, MaxMessageLen); err != nil {
		return err
	}
	if err := checkFinite(kind, "score", e.Score); err != nil {
		return err
	}
	if err := checkFinite(kind, "threshold", e.Threshold); err != nil {
		return err
	}
	if len(e.Values) > MaxValues {
		return fmt.Errorf("%w: event: %d values, at most %d", ErrInvalid, len(e.Values), MaxValues)
	}
	for k, v := range e.Values {
		if err := checkToken(kind, "values key", k, 32, "_"); err != nil {
			return err
		}
		if err := checkFinite(kind, "values["+k+"]", v); err != nil {
			return err
		}
	}
	if len(e.Labels) > MaxLabels {
		return fmt.Errorf("%w: event: %d labels, at most %d", ErrInvalid, len(e.Labels), MaxLabels)
	}
	for k, v := range e.Labels {
		if err := checkToken(kind, "labels key", k, 32, "_"); err != nil {
			return err
		}
		if err := checkText(kind, "labels["+k+"]", v, MaxLabelLen); err != nil {
			return err
		}
	}
	return nil
}

// AppendEvent validates e, gives it the next sequence number and writes it
// in its own transaction, synced to disk before AppendEvent returns: an
// event reported stored survives a crash. The sequence counter is updated
// in the same transaction, and so is the outbox when Options.Outbox is
// enabled: an event is stored and queued for publishing, or neither.
func (s *Store) AppendEvent(e Event) (seq uint64, err error) {
	if err := e.validate(); err != nil {
		return 0, err
	}
	if err := s.begin(true); err != nil {
		return 0, err
	}
	defer s.life.RUnlock()
	err = s.update(func(tx *bolt.Tx) error {
		n, err := nextID(tx, metaNextEvent)
		if err != nil {
			return err
		}
		v, err := json.Marshal(eventJSON{
			Seq: n, TimeMs: unixMs(e.Time), Kind: e.Kind, Code: e.Code, Asset: e.Asset,
			Score: e.Score, Threshold: e.Threshold, Message: e.Message, Values: e.Values,
			Labels: e.Labels, ClipID: e.ClipID,
		})
		if err != nil {
			return err
		}
		b := tx.Bucket(bucketEvents)
		b.FillPercent = 1 // keys only grow: fill pages completely
		if err := b.Put(u64(n), v); err != nil {
			return err
		}
		seq = n
		if s.opt.Outbox.Enabled {
			return s.enqueue(tx, eventClass(e.Kind), e.Time, v)
		}
		return nil
	})
	if err != nil {
		return 0, fmt.Errorf("store: append event to %s: %w", s.path, err)
	}
	s.notifyQueued()
	return seq, nil
}

// decodeEvent decodes the value stored under key k.
func decodeEvent(k, v []byte) (Event, error) {
	seq, ok := fromU64(k)
	var w eventJSON
	if err := json.Unmarshal(v, &w); err != nil || !ok || w.Seq != seq {
		return Event{}, fmt.Errorf("%w: events key %x: %d bytes do not decode to event %d", ErrCorrupt, k, len(v), seq)
	}
	return Event{
		Seq: w.Seq, Time: fromMs(w.TimeMs), Kind: w.Kind, Code: w.Code, Asset: w.Asset,
		Score: w.Score, Threshold: w.Threshold, Message: w.Message, Values: maps.Clone(w.Values),
		Labels: maps.Clone(w.Labels), ClipID: w.ClipID,
	}, nil
}

// Event returns the event with sequence number seq, or an error wrapping
// ErrNotFound.
func (s *Store) Event(seq uint64) (Event, error) {
	if err := s.begin(false); err != nil {
		return Event{}, err
	}
	defer s.life.RUnlock()
	var e Event
	err := s.db.View(func(tx *bolt.Tx) error {
		k := u64(seq)
		v := tx.Bucket(bucketEvents).Get(k)
		if v == nil {
			return fmt.Errorf("%w: event %d", ErrNotFound, seq)
		}
		var err error
		e, err = decodeEvent(k, v)
		return err
	})
	return e, err
}
