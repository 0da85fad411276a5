package monitor

import (
	"fmt"
	"math"
	"strings"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/gate"
	"github.com/auscult/auscult/pkg/store"
)

// Event codes are "<subject>.<what>": alarm.raised, warning.cleared,
// machine.stopped, sensor.clipping.active, capture.input_overflow and so on;
// docs/events.md lists them.

// alarmEvent logs one alarm tracker event and starts an evidence clip for a
// raise or an escalation. Called with mu held.
func (m *Monitor) alarmEvent(e alarm.Event) {
	subject := "alarm"
	if e.Severity == alarm.SeverityWarning {
		subject = "warning"
	}
	v := map[string]float64{"occurrence": float64(e.Occurrence), "over_windows": float64(e.Over),
		"of_windows": float64(e.N), "sample_pos": float64(e.SampleIndex)}
	var msg strings.Builder
	escalated := e.Kind == alarm.SeverityChanged && e.Severity > e.From
	if e.Kind == alarm.SeverityChanged {
		verb := "dropped"
		if escalated {
			verb = "escalated"
		}
		fmt.Fprintf(&msg, "%s %s to %s (state %s)", e.From, verb, e.Severity, e.State)
	} else {
		fmt.Fprintf(&msg, "%s %s (state %s)", subject, e.Kind, e.State)
	}
	switch {
	case e.Kind == alarm.Raised || escalated:
		fmt.Fprintf(&msg, ": %d of the last %d windows at or over %.4f", e.Over, e.N, e.Threshold)
		for i := range e.NBands {
			b := e.Bands[i]
			n := fmt.Sprint(i + 1)
			v["band"+n+"_lo_hz"], v["band"+n+"_hi_hz"], v["band"+n+"_dev_sd"] = b.LowHz, b.HighHz, b.Deviation
			if i == 0 {
				fmt.Fprintf(&msg, "; most deviating %s", bandText(b))
			}
		}
	case e.Kind == alarm.Acknowledged || e.Kind == alarm.Unshelved:
		if e.By != "" {
			fmt.Fprintf(&msg, " by %s", e.By)
		}
		if e.Reason != "" {
			fmt.Fprintf(&msg, " (%s)", e.Reason)
		}
	case e.Kind == alarm.Shelved:
		fmt.Fprintf(&msg, " by %s until %s: %s", e.By, e.Until.UTC().Format(time.RFC3339), e.Reason)
		v["shelved_s"] = e.Until.Sub(e.Time).Seconds()
	}
	labels := map[string]string{"change": e.Kind.String(), "state": e.State.String(),
		"severity": e.Severity.String(), "machine": m.machine.State().String()}
	if id := m.cfg.Baseline.ID; id != "" {
		labels["baseline"] = id
	}
	if e.From != alarm.SeverityNone {
		labels["from_severity"] = e.From.String()
	}
	if e.By != "" {
		labels["by"] = e.By
	}
	if e.Reason != "" {
		labels["reason"] = e.Reason
	}
	clip := uint64(0)
	wantClip := e.Kind == alarm.Raised || escalated
	if wantClip && m.evidence.room() {
		id, err := m.sink.ReserveClipID()
		if err != nil {
			m.fail(err)
		}
		clip = id
	}
	seq := m.append(store.Event{Time: e.Time, Kind: store.EventAlarm, Code: subject + "." + e.Kind.String(),
		Asset: m.cfg.Asset, Score: finite(e.Score), Threshold: e.Threshold, Message: msg.String(), Values: v,
		Labels: labels, ClipID: clip})
	if seq > 0 && wantClip && (clip == 0 || !m.evidence.trigger(seq, clip)) {
		m.cfg.Logger.Warn("evidence clip skipped: too many being collected", "event_seq", seq)
	}
	if seq > 0 && wantClip {
		if e.Severity == alarm.SeverityAlarm {
			m.summary.alarms++
		} else {
			m.summary.warnings++
		}
	}
}

func bandText(b alarm.Band) string {
	dir := "louder"
	if b.Deviation < 0 {
		dir = "quieter"
	}
	return fmt.Sprintf("%s to %s %s (%+.1f sd)", hz(b.LowHz), hz(b.HighHz), dir, b.Deviation)
}

func hz(f float64) string {
	if f >= 1000 {
		return fmt.Sprintf("%.2f kHz", f/1000)
	}
	return fmt.Sprintf("%.0f Hz", f)
}

// machineEvent logs a change of the running/stopped gate.
func (m *Monitor) machineEvent(now time.Time, e gate.MachineEvent) {
	m.append(store.Event{Time: now, Kind: store.EventState, Code: "machine." + e.To.String(), Asset: m.cfg.Asset,
		Message: fmt.Sprintf("machine %s (was %s); level %.1f dBFS, %.1f dB below healthy, line match %.2f",
			e.To, e.From, e.LevelDBFS, e.DropDB, e.Match),
		Values: map[string]float64{"level_dbfs": finite(e.LevelDBFS), "drop_db": finite(e.DropDB),
			"line_match": finite(e.Match), "sample_pos": float64(e.SamplePos)}})
}

// sensorEvent logs a sensor diagnostic raised or cleared.
func (m *Monitor) sensorEvent(e gate.SensorEvent) {
	state := "cleared"
	if e.Active {
		state = "active"
	}
	if e.Active {
		m.summary.sensorFaults++
	}
	m.append(store.Event{Time: m.cfg.Clock(e.SamplePos), Kind: store.EventDiagnostic,
		Code: "sensor." + e.Kind.String() + "." + state, Asset: m.cfg.Asset,
		Message: fmt.Sprintf("microphone %s %s: measured %.4g, limit %.4g", e.Kind, state, e.Value, e.Limit),
		Values:  map[string]float64{"value": finite(e.Value), "limit": finite(e.Limit), "sample_pos": float64(e.SamplePos)}})
}

// Diagnostic logs a diagnostic from outside the monitor, such as a capture
// gap or a lost device: code is "capture.<what>" by convention, values carry
// units in their keys.
func (m *Monitor) Diagnostic(now time.Time, code, message string, values map[string]float64) {
	m.mu.Lock()
	defer m.mu.Unlock()
	if code == "capture.input_overflow" || code == "capture.ring_overrun" {
		m.summary.overruns++
	}
	for k, v := range values {
		values[k] = finite(v) // the log keeps finite numbers only
	}
	m.append(store.Event{Time: now, Kind: store.EventDiagnostic, Code: code, Asset: m.cfg.Asset,
		Message: message, Values: values})
}

// append writes an event to the sink and the log line; it returns the
// event's sequence number (0 if the sink failed).
func (m *Monitor) append(e store.Event) uint64 {
	e.Time = e.Time.UTC()
	seq, err := m.sink.AppendEvent(e)
	if err != nil {
		m.fail(err)
		m.cfg.Logger.Error(e.Message, "event", e.Code, "stored", false, "err", err)
		return 0
	}
	m.cfg.Logger.Info(e.Message, "event", e.Code, "seq", seq, "score", e.Score)
	return seq
}

// saveClip stores a completed evidence clip.
func (m *Monitor) saveClip(c pendingClip) {
	if len(c.samples) == 0 {
		return
	}
	id, err := m.sink.PutClip(store.Clip{ID: c.clipID, EventSeq: c.eventSeq, Start: m.cfg.Clock(c.start).UTC(),
		Asset: m.cfg.Asset, WAV: audio.EncodeWAV(m.rate, c.samples)})
	m.fail(err)
	m.cfg.Logger.Info("evidence clip stored", "clip", id, "event_seq", c.eventSeq,
		"seconds", float64(len(c.samples))/float64(m.rate))
}

func finite(x float64) float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0
	}
	return x
}
