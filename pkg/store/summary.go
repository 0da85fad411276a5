package store

import (
	"encoding/binary"
	"fmt"
	"math"
	"time"
)

// Summary sums up one hour of operation. The agent computes it; the store
// keeps it after the minute trend of the hour has aged out.
type Summary struct {
	// Start is the UTC start of the hour, stored to the millisecond and
	// used as the key. Required, not before 1970.
	Start time.Time
	// Windows is the number of analysis windows scored in the hour.
	Windows int
	// RunningFraction is the fraction of the hour the machine ran, 0 to 1.
	RunningFraction float64
	// ScoreMin, ScoreMean, ScoreP95 and ScoreMax describe the cosine
	// distances of the hour's windows (0 to 2): min <= mean <= max and
	// min <= p95 <= max. All zero when Windows is zero.
	ScoreMin, ScoreMean, ScoreP95, ScoreMax float64
	// RMSMeanDBFS and RMSMaxDBFS are the mean and maximum RMS level in
	// dBFS; finite (floor digital silence).
	RMSMeanDBFS, RMSMaxDBFS float64
	// AlarmSeconds is how long an alarm was active or acknowledged, in
	// seconds; not negative.
	AlarmSeconds float64
	// Alarms is the number of alarms raised in the hour.
	Alarms int
	// Warnings is the number of warnings raised in the hour.
	Warnings int
	// Overruns is the number of capture gaps (input overflows) in the hour.
	Overruns int
	// SensorFaults is how many microphone faults became active in the
	// hour, and SensorActive the faults active at its end, one bit per
	// fault (the gate package's numbering, bit 0 for its first fault).
	SensorFaults int
	SensorActive uint32
	// Alarm is the most severe state the agent reports for the hour.
	Alarm AlarmState
}

// Stored summary layouts: version 1 (80 bytes) lacks the warning and
// sensor counts, which read as zero.
const (
	summaryVersion   = 2
	summaryLen       = 92
	summaryV1Len     = 80
	summaryV1Version = 1
)

func (m *Summary) validate() error {
	const kind = "summary"
	if err := checkTime(kind, "start", m.Start); err != nil {
		return err
	}
	for _, c := range []struct {
		name string
		v    int
	}{{"windows", m.Windows}, {"alarms", m.Alarms}, {"warnings", m.Warnings}, {"overruns", m.Overruns}, {"sensor_faults", m.SensorFaults}} {
		if c.v < 0 || int64(c.v) > math.MaxInt32 {
			return fmt.Errorf("%w: summary %s: %s %d out of range", ErrInvalid, m.Start.UTC().Format(time.RFC3339), c.name, c.v)
		}
	}
	if err := checkScores(kind, m.ScoreMin, m.ScoreMean, m.ScoreMax); err != nil {
		return err
	}
	if err := checkFinite(kind, "score_p95", m.ScoreP95); err != nil {
		return err
	}
	if m.ScoreP95 < m.ScoreMin || m.ScoreP95 > m.ScoreMax {
		return fmt.Errorf("%w: summary: score_p95 %v is outside [score_min, score_max]", ErrInvalid, m.ScoreP95)
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"rms_dbfs_mean", m.RMSMeanDBFS}, {"rms_dbfs_max", m.RMSMaxDBFS}, {"alarm_s", m.AlarmSeconds}} {
		if err := checkFinite(kind, f.name, f.v); err != nil {
			return err
		}
	}
	if m.AlarmSeconds < 0 {
		return fmt.Errorf("%w: summary: alarm_s %v is negative", ErrInvalid, m.AlarmSeconds)
	}
	if err := checkUnit(kind, "running_fraction", m.RunningFraction); err != nil {
		return err
	}
	return m.Alarm.validate(kind)
}

func (m *Summary) floats() []float64 {
	return []float64{m.RunningFraction, m.ScoreMin, m.ScoreMean, m.ScoreP95, m.ScoreMax, m.RMSMeanDBFS, m.RMSMaxDBFS, m.AlarmSeconds}
}

func (m *Summary) encode() []byte {
	b := make([]byte, summaryLen)
	b[0], b[1] = summaryVersion, byte(m.Alarm)
	le := binary.LittleEndian
	le.PutUint32(b[4:], uint32(m.Windows))
	le.PutUint32(b[8:], uint32(m.Alarms))
	le.PutUint32(b[12:], uint32(m.Overruns))
	for i, f := range m.floats() {
		le.PutUint64(b[16+8*i:], math.Float64bits(f))
	}
	le.PutUint32(b[80:], uint32(m.Warnings))
	le.PutUint32(b[84:], uint32(m.SensorFaults))
	le.PutUint32(b[88:], m.SensorActive)
	return b
}

func decodeSummary(k, v []byte) (Summary, error) {
	ms, ok := fromU64(k)
	v1 := len(v) == summaryV1Len && len(v) > 0 && v[0] == summaryV1Version
	if !ok || !v1 && (len(v) != summaryLen || v[0] != summaryVersion) {
		return Summary{}, fmt.Errorf("%w: summaries key %x: %d-byte value is not a version %d summary", ErrCorrupt, k, len(v), summaryVersion)
	}
	le := binary.LittleEndian
	f := func(i int) float64 { return math.Float64frombits(le.Uint64(v[16+8*i:])) }
	m := Summary{
		Start: fromMs(ms), Windows: int(le.Uint32(v[4:])), Alarms: int(le.Uint32(v[8:])), Overruns: int(le.Uint32(v[12:])),
		RunningFraction: f(0), ScoreMin: f(1), ScoreMean: f(2), ScoreP95: f(3), ScoreMax: f(4),
		RMSMeanDBFS: f(5), RMSMaxDBFS: f(6), AlarmSeconds: f(7), Alarm: AlarmState(v[1]),
	}
	if !v1 {
		m.Warnings, m.SensorFaults, m.SensorActive = int(le.Uint32(v[80:])), int(le.Uint32(v[84:])), le.Uint32(v[88:])
	}
	if err := m.validate(); err != nil {
		return Summary{}, fmt.Errorf("%w: summaries key %x: %v", ErrCorrupt, k, err)
	}
	return m, nil
}

// AddSummary validates m and buffers it like AddTrend: it is written at
// the next flush, at the next free millisecond if its key is taken.
func (s *Store) AddSummary(m Summary) error {
	if err := m.validate(); err != nil {
		return err
	}
	return s.buffer(func() { s.pendingSum = append(s.pendingSum, m) })
}

// Summaries returns the stored summaries with Start in [r.From, r.To), in
// time order. Buffered summaries are not included; Flush first.
func (s *Store) Summaries(r Range) ([]Summary, error) {
	return scanTime(s, bucketSummaries, r, decodeSummary)
}
