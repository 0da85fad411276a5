package store

import (
	"encoding/binary"
	"fmt"
	"math"
	"time"
)

// TrendPoint sums up one minute of scoring. The agent aggregates the
// windows of the minute itself; the store keeps no per-window state.
type TrendPoint struct {
	// Start is the UTC start of the minute, stored to the millisecond and
	// used as the key. Required, not before 1970.
	Start time.Time
	// Windows is the number of analysis windows scored in the minute (at
	// most 2^31-1, so 32-bit boards read it back); zero when the machine was stopped or the sensor faulty, and then
	// the score fields are not meaningful (store them as zero).
	Windows int
	// ScoreMin, ScoreMean and ScoreMax are the cosine distances of the
	// scored windows to the baseline (0 to 2), with min <= mean <= max.
	ScoreMin, ScoreMean, ScoreMax float64
	// RMSMeanDBFS and RMSMaxDBFS are the mean and maximum RMS level of the
	// minute in dB relative to full scale. They must be finite: floor
	// digital silence (for example at -120 dBFS) before storing.
	RMSMeanDBFS, RMSMaxDBFS float64
	// RunningFraction is the fraction of the minute the machine was
	// judged running, 0 to 1.
	RunningFraction float64
	// Alarm is the alarm state the agent reports for the minute.
	Alarm AlarmState
}

// trendLen is the length of a stored trend value; see doc.go.
const (
	trendVersion = 1
	trendLen     = 56
)

func (p *TrendPoint) validate() error {
	const kind = "trend point"
	if err := checkTime(kind, "start", p.Start); err != nil {
		return err
	}
	if p.Windows < 0 || int64(p.Windows) > math.MaxInt32 {
		return fmt.Errorf("%w: trend point %s: windows %d out of range", ErrInvalid, p.Start.UTC().Format(time.RFC3339), p.Windows)
	}
	if err := checkScores(kind, p.ScoreMin, p.ScoreMean, p.ScoreMax); err != nil {
		return err
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"rms_dbfs_mean", p.RMSMeanDBFS}, {"rms_dbfs_max", p.RMSMaxDBFS}} {
		if err := checkFinite(kind, f.name, f.v); err != nil {
			return fmt.Errorf("%w (floor digital silence, for example at -120 dBFS)", err)
		}
	}
	if err := checkUnit(kind, "running_fraction", p.RunningFraction); err != nil {
		return err
	}
	return p.Alarm.validate(kind)
}

// checkScores requires finite scores with min <= mean <= max.
func checkScores(kind string, lo, mean, hi float64) error {
	for _, f := range []struct {
		name string
		v    float64
	}{{"score_min", lo}, {"score_mean", mean}, {"score_max", hi}} {
		if err := checkFinite(kind, f.name, f.v); err != nil {
			return err
		}
	}
	if lo > mean || mean > hi {
		return fmt.Errorf("%w: %s: scores must satisfy min <= mean <= max, got %v, %v, %v", ErrInvalid, kind, lo, mean, hi)
	}
	return nil
}

func (p *TrendPoint) key() uint64 { return unixMs(p.Start) }

func (p *TrendPoint) encode() []byte {
	b := make([]byte, trendLen)
	b[0], b[1] = trendVersion, byte(p.Alarm)
	le := binary.LittleEndian
	le.PutUint32(b[4:], uint32(p.Windows))
	for i, f := range []float64{p.ScoreMin, p.ScoreMean, p.ScoreMax, p.RMSMeanDBFS, p.RMSMaxDBFS, p.RunningFraction} {
		le.PutUint64(b[8+8*i:], math.Float64bits(f))
	}
	return b
}

func decodeTrend(k, v []byte) (TrendPoint, error) {
	ms, ok := fromU64(k)
	if !ok || len(v) != trendLen || v[0] != trendVersion {
		return TrendPoint{}, fmt.Errorf("%w: trend key %x: %d-byte value is not a version %d trend point", ErrCorrupt, k, len(v), trendVersion)
	}
	le := binary.LittleEndian
	f := func(i int) float64 { return math.Float64frombits(le.Uint64(v[8+8*i:])) }
	p := TrendPoint{
		Start: fromMs(ms), Windows: int(le.Uint32(v[4:])),
		ScoreMin: f(0), ScoreMean: f(1), ScoreMax: f(2),
		RMSMeanDBFS: f(3), RMSMaxDBFS: f(4), RunningFraction: f(5),
		Alarm: AlarmState(v[1]),
	}
	if err := p.validate(); err != nil {
		return TrendPoint{}, fmt.Errorf("%w: trend key %x: %v", ErrCorrupt, k, err)
	}
	return p, nil
}

// AddTrend validates p and buffers it; the next flush (every
// FlushInterval, or Flush, or Close) writes it together with the other
// buffered records in one transaction. If the minute's key is already
// taken (the clock stepped back), the point is stored at the next free
// millisecond, so nothing stored is overwritten; Stats counts these.
func (s *Store) AddTrend(p TrendPoint) error {
	if err := p.validate(); err != nil {
		return err
	}
	return s.buffer(func() { s.pendingTrend = append(s.pendingTrend, p) })
}

// buffer runs add (which appends a validated record to a pending list)
// under the store's lock, unless the backlog is full.
func (s *Store) buffer(add func()) error {
	if err := s.begin(true); err != nil {
		return err
	}
	defer s.life.RUnlock()
	s.mu.Lock()
	defer s.mu.Unlock()
	if len(s.pendingTrend)+len(s.pendingSum) >= MaxPending {
		return fmt.Errorf("%w: %d buffered for %s (last flush error: %v)", ErrBacklog, MaxPending, s.path, s.lastFlushErr)
	}
	add()
	return nil
}

// Trend returns the stored trend points with Start in [r.From, r.To), in
// time order. Points still buffered are not included; Flush first to see
// them.
func (s *Store) Trend(r Range) ([]TrendPoint, error) {
	return scanTime(s, bucketTrend, r, decodeTrend)
}
