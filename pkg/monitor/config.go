package monitor

import (
	"errors"
	"fmt"
	"log/slog"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/gate"
)

// ErrConfig is returned by New when the configuration cannot work; the
// message names the field.
var ErrConfig = errors.New("monitor: invalid config")

// Config is what a Monitor needs. Baseline and Clock are required; zero
// durations take the defaults given.
type Config struct {
	// Baseline is the enrolled machine; its thresholds go into Alarm when
	// Alarm leaves them zero.
	Baseline *baseline.Baseline
	// Asset is the machine's tag, stamped on every event and clip.
	Asset string
	// Alarm tunes the alarm tracker (alarm.DefaultConfig and the baseline's
	// thresholds and debounce when zero).
	Alarm alarm.Config
	// Sensor and Machine tune the gate (gate defaults when zero).
	Sensor  gate.SensorConfig
	Machine gate.MachineConfig
	// Lines is the machine's tonal signature learnt at enrolment; empty
	// judges running by level alone.
	Lines gate.Lines
	// EvidenceBefore and EvidenceAfter are the sound kept around each
	// raised alarm (defaults 10 s and 10 s).
	EvidenceBefore, EvidenceAfter time.Duration
	// SummaryPeriod is the summary length (default 1 h); it must divide a
	// day.
	SummaryPeriod time.Duration
	// Clock maps a stream position in samples to the UTC time stamped on
	// what the window ending there produces. Required.
	Clock func(samplePos int64) time.Time
	// Logger receives one structured line per event (default: discard).
	Logger *slog.Logger
}

func (c *Config) fill() error {
	if c.Baseline == nil || c.Baseline.Model == nil {
		return fmt.Errorf("%w: Baseline is required", ErrConfig)
	}
	if c.Clock == nil {
		return fmt.Errorf("%w: Clock is required", ErrConfig)
	}
	cal := c.Baseline.Calib
	if c.Alarm == (alarm.Config{}) {
		c.Alarm = alarm.DefaultConfig()
	}
	if c.Alarm.AlarmThreshold == 0 {
		c.Alarm.AlarmThreshold, c.Alarm.WarnThreshold = cal.Threshold, cal.WarnThreshold
	}
	if c.Alarm.WarnThreshold >= c.Alarm.AlarmThreshold {
		c.Alarm.WarnThreshold = 0 // an old baseline without a warning level
	}
	if c.Alarm.K == 0 && cal.K > 0 {
		c.Alarm.K, c.Alarm.N = cal.K, cal.N
	}
	if c.Sensor == (gate.SensorConfig{}) {
		c.Sensor = gate.DefaultSensorConfig()
	}
	c.Sensor.Rate = c.Baseline.Features.Rate
	if c.Machine == (gate.MachineConfig{}) {
		c.Machine = gate.DefaultMachineConfig()
	}
	if c.EvidenceBefore == 0 && c.EvidenceAfter == 0 {
		c.EvidenceBefore, c.EvidenceAfter = 10*time.Second, 10*time.Second
	}
	if c.EvidenceBefore < 0 || c.EvidenceAfter < 0 {
		return fmt.Errorf("%w: evidence durations must not be negative", ErrConfig)
	}
	if c.SummaryPeriod == 0 {
		c.SummaryPeriod = time.Hour
	}
	if c.SummaryPeriod < time.Minute || (24*time.Hour)%c.SummaryPeriod != 0 {
		return fmt.Errorf("%w: SummaryPeriod %v must be at least a minute and divide a day", ErrConfig, c.SummaryPeriod)
	}
	if c.Logger == nil {
		c.Logger = slog.New(slog.DiscardHandler)
	}
	return nil
}
