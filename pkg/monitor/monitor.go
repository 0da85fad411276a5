package monitor

import (
	"context"
	"fmt"
	"sync"
	"sync/atomic"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/gate"
	"github.com/auscult/auscult/pkg/pipeline"
)

// Monitor is the live loop of one machine. Make it with New, run it with Run;
// the operator methods and Status may be called from any goroutine.
type Monitor struct {
	cfg  Config
	sink Sink
	pipe *pipeline.Pipeline
	rate int

	// mu guards everything below it: the window path, the operator actions
	// and Status all take it.
	mu       sync.Mutex
	tracker  *alarm.Tracker
	sensor   *gate.Sensor
	machine  *gate.Machine
	scorer   *baseline.Scorer
	finder   *baseline.BandFinder
	evidence *evidence
	minute   period
	summary  period
	status   Status
	err      error // first sink failure, ends Run

	// Scratch reused by the window path.
	alarmEv  []alarm.Event
	sensorEv []gate.SensorEvent
	gateEv   []gate.MachineEvent
	dev      []float32
	bands    []baseline.Band
	clips    []pendingClip
	sinceHz  int // samples since the sensor interval was last closed

	lastWindow atomic.Int64 // wall-clock unix nanoseconds of the last window
}

// New checks cfg and builds a monitor writing to sink.
func New(cfg Config, sink Sink) (*Monitor, error) {
	if err := cfg.fill(); err != nil {
		return nil, err
	}
	b := cfg.Baseline
	pipe, err := pipeline.ForBaseline(b)
	if err != nil {
		return nil, err
	}
	tracker, err := alarm.NewTracker(cfg.Alarm)
	if err != nil {
		return nil, err
	}
	sensor, err := gate.NewSensor(cfg.Sensor)
	if err != nil {
		return nil, err
	}
	layout := pipe.Embedder().Layout()
	machine, err := gate.NewMachine(cfg.Machine, gate.Reference{Level: b.Level, Layout: layout, Lines: cfg.Lines})
	if err != nil {
		return nil, err
	}
	rate := b.Features.Rate
	m := &Monitor{cfg: cfg, sink: sink, pipe: pipe, rate: rate, tracker: tracker, sensor: sensor,
		machine: machine, scorer: b.Model.NewScorer(), finder: baseline.NewBandFinder(layout),
		evidence: newEvidence(int(cfg.EvidenceBefore.Seconds()*float64(rate)), int(cfg.EvidenceAfter.Seconds()*float64(rate))),
		alarmEv:  make([]alarm.Event, 0, 8), sensorEv: make([]gate.SensorEvent, 0, 8),
		gateEv: make([]gate.MachineEvent, 0, 4), dev: make([]float32, len(layout)),
		bands: make([]baseline.Band, 0, alarm.MaxBands), clips: make([]pendingClip, 0, maxPendingClips)}
	m.summary.scores = make([]float64, 0, int(cfg.SummaryPeriod.Seconds())+16)
	m.status = Status{Asset: cfg.Asset, BaselineID: b.ID, Threshold: cfg.Alarm.AlarmThreshold,
		WarnThreshold: cfg.Alarm.WarnThreshold, Machine: gate.Unknown.String(), Alarm: alarm.StateNormal.String(),
		Severity: alarm.SeverityNone.String()}
	return m, nil
}

// Rate is the analysis rate in Hz: sources must deliver it (resample first).
func (m *Monitor) Rate() int { return m.rate }

// Run listens to src until it ends (io.EOF), ctx is cancelled, or the sink
// fails. It flushes the partial minute, summary and any evidence clip being
// collected before it returns. A cancelled context returns nil: stopping is
// not a failure.
func (m *Monitor) Run(ctx context.Context, src audio.Source) error {
	if src.Rate() != m.rate {
		return fmt.Errorf("monitor: source rate %d Hz, analysis rate %d Hz; resample first", src.Rate(), m.rate)
	}
	t := &tee{ctx: ctx, src: src, m: m}
	err := m.pipe.Run(t, m.window)
	m.mu.Lock()
	defer m.mu.Unlock()
	m.finish()
	if err == nil {
		err = m.err
	}
	if err == nil && t.err != nil && ctx.Err() == nil {
		err = t.err
	}
	return err
}

// LastWindow is the wall-clock time the last analysis window was processed:
// the liveness of the processing loop, for a watchdog.
func (m *Monitor) LastWindow() time.Time {
	n := m.lastWindow.Load()
	if n == 0 {
		return time.Time{}
	}
	return time.Unix(0, n)
}

// window is the per-window path, called by the pipeline.
func (m *Monitor) window(w *embed.Window, score float64) error {
	m.lastWindow.Store(time.Now().UnixNano())
	m.mu.Lock()
	defer m.mu.Unlock()
	now := m.cfg.Clock(w.End)
	m.gateEv = m.machine.Update(w, m.gateEv[:0])
	for _, e := range m.gateEv {
		m.machineEvent(now, e)
	}
	running := m.machine.State() == gate.Running && m.sensor.Healthy()
	aw := alarm.Window{Score: score, Running: running, SampleIndex: w.End}
	if running && score >= m.cfg.Alarm.ClearFraction*m.lowestThreshold() {
		m.bands = m.finder.Find(m.scorer.Deviations(w.Vec, m.dev), m.bands)
		for i, b := range m.bands {
			aw.Bands[i] = alarm.Band{LowHz: b.LoHz, HighHz: b.HiHz, Deviation: b.Deviation}
		}
		aw.NBands = len(m.bands)
	}
	m.alarmEv = m.tracker.Observe(m.alarmEv[:0], now, aw)
	for _, e := range m.alarmEv {
		m.alarmEvent(e)
	}
	m.account(now, score, w.LevelDBFS, running)
	m.status.update(now, score, w.LevelDBFS, running, m.machine.State(), m.tracker.Snapshot())
	return m.err
}

// sensorMask has a bit set for each sensor diagnostic now active.
func (m *Monitor) sensorMask() uint32 {
	var mask uint32
	for k := gate.Kind(0); k < gate.NumKinds; k++ {
		if m.sensor.Active(k) {
			mask |= 1 << k
		}
	}
	return mask
}

func (m *Monitor) lowestThreshold() float64 {
	if t := m.cfg.Alarm.WarnThreshold; t > 0 {
		return t
	}
	return m.cfg.Alarm.AlarmThreshold
}

// account adds a window to the minute trend and the summary, writing out
// whichever period it closes.
func (m *Monitor) account(now time.Time, score, level float64, running bool) {
	state := storeState(m.tracker.State())
	if start := floorTo(now, time.Minute); !start.Equal(m.minute.start) {
		if m.minute.windows > 0 {
			m.fail(m.sink.AddTrend(m.minute.trendPoint()))
		}
		m.minute.reset(start, state)
	}
	if start := floorTo(now, m.cfg.SummaryPeriod); !start.Equal(m.summary.start) {
		if m.summary.windows > 0 {
			m.summary.sensorActive = m.sensorMask()
			m.fail(m.sink.AddSummary(m.summary.summary()))
		}
		m.summary.reset(start, state)
	}
	m.minute.add(score, level, running, state, false)
	m.summary.add(score, level, running, state, true)
	if a := m.tracker.State(); a == alarm.StateUnacked || a == alarm.StateAcked {
		m.summary.alarmTime += time.Duration(float64(m.stepSamples()) / float64(m.rate) * float64(time.Second))
	}
}

func (m *Monitor) stepSamples() int {
	ec, fc := m.cfg.Baseline.Embed, m.cfg.Baseline.Features
	return ec.Step * ec.SubHops * fc.Hop
}

// finish writes out what is pending at the end of a run. Called with mu held.
func (m *Monitor) finish() {
	if m.minute.windows > 0 {
		m.fail(m.sink.AddTrend(m.minute.trendPoint()))
		m.minute.windows = 0
	}
	if m.summary.windows > 0 {
		m.summary.sensorActive = m.sensorMask()
		m.fail(m.sink.AddSummary(m.summary.summary()))
		m.summary.windows = 0
	}
	for _, c := range m.evidence.flushAll() {
		m.saveClip(c)
	}
}

// fail keeps the first sink error; Run returns it.
func (m *Monitor) fail(err error) {
	if err != nil && m.err == nil {
		m.err = fmt.Errorf("monitor: writing the log: %w", err)
	}
}
