package store

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
	"time"

	bolt "go.etcd.io/bbolt"
)

// Class says what an outbox message carries. Classes are numbered in the
// order a full outbox drops them: summaries first, alarms last.
type Class uint8

// Message classes.
const (
	ClassSummary    Class = 1
	ClassState      Class = 2
	ClassDiagnostic Class = 3
	ClassAlarm      Class = 4
	numClasses            = 5 // index bound for per-class arrays
)

func (c Class) String() string {
	switch c {
	case ClassSummary:
		return "summary"
	case ClassState:
		return "state"
	case ClassDiagnostic:
		return "diagnostic"
	case ClassAlarm:
		return "alarm"
	}
	return fmt.Sprintf("class(%d)", uint8(c))
}

func eventClass(k EventKind) Class {
	switch k {
	case EventAlarm:
		return ClassAlarm
	case EventDiagnostic:
		return ClassDiagnostic
	}
	return ClassState
}

// Outbox defaults.
const (
	// DefaultOutboxBytes bounds the outbox (8 MiB: about 20 000 messages,
	// years of hourly summaries or weeks of a chattering sensor).
	DefaultOutboxBytes = 8 << 20
	// DefaultOutboxAge is how long a message may wait for the broker.
	DefaultOutboxAge = 30 * day
	// MinOutboxBytes is the smallest bound accepted.
	MinOutboxBytes = 64 << 10
)

// OutboxOptions configures the store-and-forward outbox. The zero value
// disables it.
type OutboxOptions struct {
	// Enabled queues every appended event and every flushed summary for
	// publishing, in the same transaction that stores it.
	Enabled bool
	// MaxBytes bounds the queued bytes (keys and values). When a new
	// message passes it, the oldest message of the lowest class is
	// dropped (summaries, then state, diagnostic, alarm) until it fits.
	// Zero means DefaultOutboxBytes; at least MinOutboxBytes.
	MaxBytes int64
	// MaxAge drops messages older than this (by their record time) when
	// a message is queued. Zero means DefaultOutboxAge; negative keeps
	// them until MaxBytes pushes them out.
	MaxAge time.Duration
	// Notify, if set, is called after each commit that queued a message.
	// It must not block.
	Notify func()
}

func (o *OutboxOptions) fill() error {
	if o.MaxBytes == 0 {
		o.MaxBytes = DefaultOutboxBytes
	}
	if o.MaxBytes < MinOutboxBytes {
		return fmt.Errorf("%w: Outbox.MaxBytes %d is below the minimum %d", ErrOptions, o.MaxBytes, MinOutboxBytes)
	}
	if o.MaxAge == 0 {
		o.MaxAge = DefaultOutboxAge
	}
	return nil
}

// Drops counts the messages a full or aged outbox dropped.
type Drops struct {
	// Total is every message ever dropped from this store's outbox.
	Total uint64
	// ByClass is Total by class, indexed by Class.
	ByClass [numClasses]uint64
	// SinceSummary is the drops since the previous summary was queued;
	// set on summary messages only.
	SinceSummary uint64
}

// Message is one queued outgoing message.
type Message struct {
	// Seq is the message's sequence number: one counter for every
	// message of the store, never reused, so it only grows.
	Seq uint64
	// Class says which of Event and Summary is set.
	Class Class
	// Time is the record's time (the event's, or the summary's start).
	Time time.Time
	// Event is the event of a state, diagnostic or alarm message.
	Event *Event
	// Summary and Drops are set on summary messages.
	Summary *Summary
	Drops   Drops
	// Err is set, wrapping ErrCorrupt, when the stored entry cannot be
	// decoded; the caller should Ack it away (and say so).
	Err error
}

// Meta keys of the outbox, each an 8-byte big-endian integer.
var (
	metaOutboxBytes   = []byte("outbox_bytes")
	metaOutboxCount   = []byte("outbox_count")
	metaDropsAtSumm   = []byte("outbox_drops_at_summary")
	metaDroppedPrefix = "outbox_dropped_"
)

func droppedKey(c Class) []byte { return []byte(metaDroppedPrefix + c.String()) }

// header of an outbox value: class byte, then the record time in ms.
const outboxHeader = 9

// summaryMessage is the stored body of a summary message.
type summaryMessage struct {
	Summary summaryJSON `json:"summary"`
	Drops   Drops       `json:"drops"`
}

// summaryJSON is a summary as JSON, for the outbox.
type summaryJSON struct {
	StartMs         uint64  `json:"start_ms"`
	Windows         int     `json:"windows"`
	RunningFraction float64 `json:"running_fraction"`
	ScoreMin        float64 `json:"score_min"`
	ScoreMean       float64 `json:"score_mean"`
	ScoreP95        float64 `json:"score_p95"`
	ScoreMax        float64 `json:"score_max"`
	RMSMeanDBFS     float64 `json:"rms_mean_dbfs"`
	RMSMaxDBFS      float64 `json:"rms_max_dbfs"`
	AlarmSeconds    float64 `json:"alarm_s"`
	Alarms          int     `json:"alarms"`
	Warnings        int     `json:"warnings"`
	Overruns        int     `json:"overruns"`
	SensorFaults    int     `json:"sensor_faults"`
	SensorActive    uint32  `json:"sensor_active"`
	Alarm           uint8   `json:"alarm"`
}

func toSummaryJSON(m *Summary) summaryJSON {
	return summaryJSON{StartMs: unixMs(m.Start), Windows: m.Windows, RunningFraction: m.RunningFraction,
		ScoreMin: m.ScoreMin, ScoreMean: m.ScoreMean, ScoreP95: m.ScoreP95, ScoreMax: m.ScoreMax,
		RMSMeanDBFS: m.RMSMeanDBFS, RMSMaxDBFS: m.RMSMaxDBFS, AlarmSeconds: m.AlarmSeconds, Alarms: m.Alarms,
		Warnings: m.Warnings, Overruns: m.Overruns, SensorFaults: m.SensorFaults, SensorActive: m.SensorActive,
		Alarm: uint8(m.Alarm)}
}

func (j summaryJSON) summary() Summary {
	return Summary{Start: fromMs(j.StartMs), Windows: j.Windows, RunningFraction: j.RunningFraction,
		ScoreMin: j.ScoreMin, ScoreMean: j.ScoreMean, ScoreP95: j.ScoreP95, ScoreMax: j.ScoreMax,
		RMSMeanDBFS: j.RMSMeanDBFS, RMSMaxDBFS: j.RMSMaxDBFS, AlarmSeconds: j.AlarmSeconds, Alarms: j.Alarms,
		Warnings: j.Warnings, Overruns: j.Overruns, SensorFaults: j.SensorFaults, SensorActive: j.SensorActive,
		Alarm: AlarmState(j.Alarm)}
}

// enqueueSummary queues m with the drop counters, in tx.
func (s *Store) enqueueSummary(tx *bolt.Tx, m *Summary) error {
	meta := tx.Bucket(bucketMeta)
	d := readDrops(meta)
	at, _ := fromU64(meta.Get(metaDropsAtSumm))
	d.SinceSummary = d.Total - at
	body, err := json.Marshal(summaryMessage{Summary: toSummaryJSON(m), Drops: d})
	if err != nil {
		return err
	}
	if err := meta.Put(metaDropsAtSumm, u64(d.Total)); err != nil {
		return err
	}
	return s.enqueue(tx, ClassSummary, m.Start, body)
}

func readDrops(meta *bolt.Bucket) Drops {
	var d Drops
	for c := ClassSummary; c < numClasses; c++ {
		n, _ := fromU64(meta.Get(droppedKey(c)))
		d.ByClass[c] = n
		d.Total += n
	}
	return d
}

// enqueue writes one message in tx, then enforces the outbox bounds.
func (s *Store) enqueue(tx *bolt.Tx, c Class, t time.Time, body []byte) error {
	seq, err := nextID(tx, metaNextMessage)
	if err != nil {
		return err
	}
	v := make([]byte, outboxHeader+len(body))
	v[0] = byte(c)
	binary.BigEndian.PutUint64(v[1:], unixMs(t))
	copy(v[outboxHeader:], body)
	b := tx.Bucket(bucketOutbox)
	b.FillPercent = 1
	if err := b.Put(u64(seq), v); err != nil {
		return err
	}
	if err := addCounter(tx, metaOutboxBytes, int64(8+len(v))); err != nil {
		return err
	}
	if err := addCounter(tx, metaOutboxCount, 1); err != nil {
		return err
	}
	return s.bound(tx)
}

func addCounter(tx *bolt.Tx, key []byte, d int64) error {
	m := tx.Bucket(bucketMeta)
	n, _ := fromU64(m.Get(key))
	return m.Put(key, u64(uint64(max(int64(n)+d, 0))))
}

// bound drops aged messages, then the oldest of the lowest class while the
// outbox is over its byte bound.
func (s *Store) bound(tx *bolt.Tx) error {
	o := s.opt.Outbox
	b := tx.Bucket(bucketOutbox)
	if o.MaxAge > 0 {
		limit := s.opt.Now().Add(-o.MaxAge)
		var old [][]byte
		c := b.Cursor()
		for k, v := c.First(); k != nil && len(v) >= outboxHeader; k, v = c.Next() {
			if !fromMs(binary.BigEndian.Uint64(v[1:])).Before(limit) {
				break
			}
			old = append(old, k)
		}
		for _, k := range old {
			if err := s.drop(tx, k); err != nil {
				return err
			}
		}
	}
	for {
		n, _ := fromU64(tx.Bucket(bucketMeta).Get(metaOutboxBytes))
		if int64(n) <= o.MaxBytes {
			return nil
		}
		var first [numClasses][]byte
		c := b.Cursor()
		for k, v := c.First(); k != nil; k, v = c.Next() {
			if len(v) > 0 && v[0] < numClasses && first[v[0]] == nil {
				first[v[0]] = k
			}
		}
		victim := []byte(nil)
		for cl := ClassSummary; cl < numClasses && victim == nil; cl++ {
			victim = first[cl]
		}
		if victim == nil {
			return nil
		}
		if err := s.drop(tx, victim); err != nil {
			return err
		}
	}
}

// drop deletes one queued message and counts it as dropped.
func (s *Store) drop(tx *bolt.Tx, k []byte) error {
	b := tx.Bucket(bucketOutbox)
	v := b.Get(k)
	if v == nil {
		return nil
	}
	c := Class(v[0])
	size := int64(len(k) + len(v))
	if err := b.Delete(k); err != nil {
		return err
	}
	if c < numClasses {
		if err := addCounter(tx, droppedKey(c), 1); err != nil {
			return err
		}
	}
	if err := addCounter(tx, metaOutboxBytes, -size); err != nil {
		return err
	}
	return addCounter(tx, metaOutboxCount, -1)
}

// notifyQueued calls Outbox.Notify after a commit that queued a message.
func (s *Store) notifyQueued() {
	if s.opt.Outbox.Enabled && s.opt.Outbox.Notify != nil {
		s.opt.Outbox.Notify()
	}
}

// decodeMessage decodes the outbox entry k, v.
func decodeMessage(k, v []byte) (Message, error) {
	seq, ok := fromU64(k)
	if !ok || len(v) < outboxHeader {
		return Message{}, fmt.Errorf("%w: outbox key %x: %d-byte value", ErrCorrupt, k, len(v))
	}
	m := Message{Seq: seq, Class: Class(v[0]), Time: fromMs(binary.BigEndian.Uint64(v[1:]))}
	body := v[outboxHeader:]
	switch m.Class {
	case ClassSummary:
		var w summaryMessage
		if err := json.Unmarshal(body, &w); err != nil {
			return Message{}, fmt.Errorf("%w: outbox key %x: summary: %v", ErrCorrupt, k, err)
		}
		sum := w.Summary.summary()
		m.Summary, m.Drops = &sum, w.Drops
	case ClassState, ClassDiagnostic, ClassAlarm:
		var w eventJSON
		if err := json.Unmarshal(body, &w); err != nil {
			return Message{}, fmt.Errorf("%w: outbox key %x: event: %v", ErrCorrupt, k, err)
		}
		e, err := decodeEvent(u64(w.Seq), body)
		if err != nil {
			return Message{}, err
		}
		m.Event = &e
	default:
		return Message{}, fmt.Errorf("%w: outbox key %x: unknown class %d", ErrCorrupt, k, v[0])
	}
	return m, nil
}

// Outbox returns up to max queued messages with Seq > after, oldest first.
// A corrupt entry comes back with only Seq and Err set.
func (s *Store) Outbox(after uint64, max int) ([]Message, error) {
	if err := s.begin(false); err != nil {
		return nil, err
	}
	defer s.life.RUnlock()
	var out []Message
	err := s.db.View(func(tx *bolt.Tx) error {
		b := tx.Bucket(bucketOutbox)
		if b == nil {
			return nil
		}
		c := b.Cursor()
		for k, v := c.Seek(u64(after + 1)); k != nil && len(out) < max; k, v = c.Next() {
			m, err := decodeMessage(k, v)
			if err != nil {
				seq, _ := fromU64(k)
				m = Message{Seq: seq, Err: err}
			}
			out = append(out, m)
		}
		return nil
	})
	return out, err
}

// Ack deletes the given messages from the outbox, in one transaction:
// the broker has acknowledged them. Sequence numbers no longer queued
// (dropped meanwhile) are ignored.
func (s *Store) Ack(seqs []uint64) error {
	if len(seqs) == 0 {
		return nil
	}
	if err := s.begin(true); err != nil {
		return err
	}
	defer s.life.RUnlock()
	err := s.update(func(tx *bolt.Tx) error {
		b := tx.Bucket(bucketOutbox)
		var size, n int64
		for _, seq := range seqs {
			k := u64(seq)
			v := b.Get(k)
			if v == nil {
				continue
			}
			size += int64(len(k) + len(v))
			n++
			if err := b.Delete(k); err != nil {
				return err
			}
		}
		if err := addCounter(tx, metaOutboxBytes, -size); err != nil {
			return err
		}
		return addCounter(tx, metaOutboxCount, -n)
	})
	if err != nil {
		return fmt.Errorf("store: ack %d messages in %s: %w", len(seqs), s.path, err)
	}
	return nil
}

// OutboxStats describes the outbox.
type OutboxStats struct {
	// Depth and Bytes are the queued messages and their bytes.
	Depth int
	Bytes int64
	// Oldest is the record time of the oldest queued message; zero when
	// empty.
	Oldest time.Time
	// Drops counts what the bounds dropped, since the store was made.
	Drops Drops
	// LastSeq is the sequence number of the newest message ever queued or
	// reserved (0 for none).
	LastSeq uint64
}

// OutboxStats reports the outbox's depth, size and drops.
func (s *Store) OutboxStats() (OutboxStats, error) {
	if err := s.begin(false); err != nil {
		return OutboxStats{}, err
	}
	defer s.life.RUnlock()
	var st OutboxStats
	err := s.db.View(func(tx *bolt.Tx) error {
		m := tx.Bucket(bucketMeta)
		n, _ := fromU64(m.Get(metaOutboxCount))
		size, _ := fromU64(m.Get(metaOutboxBytes))
		next, _ := fromU64(m.Get(metaNextMessage))
		st.Depth, st.Bytes, st.Drops = int(n), int64(size), readDrops(m)
		if next > 0 {
			st.LastSeq = next - 1
		}
		if b := tx.Bucket(bucketOutbox); b != nil {
			if _, v := b.Cursor().First(); len(v) >= outboxHeader {
				st.Oldest = fromMs(binary.BigEndian.Uint64(v[1:]))
			}
		}
		return nil
	})
	return st, err
}

// ReserveSeq hands out the next message sequence number without queuing
// a message, for messages sent directly (status, command responses), so
// every message of the agent carries a number that only grows.
func (s *Store) ReserveSeq() (uint64, error) {
	if err := s.begin(true); err != nil {
		return 0, err
	}
	defer s.life.RUnlock()
	var seq uint64
	err := s.update(func(tx *bolt.Tx) error {
		var err error
		seq, err = nextID(tx, metaNextMessage)
		return err
	})
	if err != nil {
		return 0, fmt.Errorf("store: reserve a message number in %s: %w", s.path, err)
	}
	return seq, nil
}
