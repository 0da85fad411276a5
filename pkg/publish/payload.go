package publish

import (
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"strings"
	"time"

	"github.com/auscult/auscult/pkg/gate"
	"github.com/auscult/auscult/pkg/store"
)

// SchemaVersion is the payload version every message carries in "schema".
// It grows when a field changes meaning or disappears, not when one is
// added.
const SchemaVersion = 1

// Stamp formats t as UTC RFC 3339 with milliseconds, the time format of
// every payload.
func Stamp(t time.Time) string { return t.UTC().Format("2006-01-02T15:04:05.000Z07:00") }

// Envelope is what every payload starts with.
type Envelope struct {
	Schema int    `json:"schema"`
	Kind   string `json:"kind"`
	Site   string `json:"site"`
	Asset  string `json:"asset"`
	Seq    uint64 `json:"seq"`
	Time   string `json:"time"`
}

// Band is one deviating frequency band of an alarm.
type Band struct {
	LowHz       float64 `json:"low_hz"`
	HighHz      float64 `json:"high_hz"`
	DeviationSD float64 `json:"deviation_sd"`
}

// Alarm is the payload of an alarm state change.
type Alarm struct {
	Envelope
	EventSeq       uint64  `json:"event_seq"`
	Code           string  `json:"code"`
	Change         string  `json:"change"`
	State          string  `json:"state"`
	Severity       string  `json:"severity"`
	FromSeverity   string  `json:"from_severity,omitempty"`
	Occurrence     int     `json:"occurrence"`
	Score          float64 `json:"score"`
	Threshold      float64 `json:"threshold"`
	WindowsOver    int     `json:"windows_over"`
	WindowsOf      int     `json:"windows_of"`
	Bands          []Band  `json:"bands"`
	Machine        string  `json:"machine"`
	EvidenceClipID uint64  `json:"evidence_clip_id,omitempty"`
	BaselineID     string  `json:"baseline_id,omitempty"`
	By             string  `json:"by,omitempty"`
	Reason         string  `json:"reason,omitempty"`
	ShelvedUntil   string  `json:"shelved_until,omitempty"`
	Message        string  `json:"message"`
}

// Event is the payload of a diagnostic or a state change.
type Event struct {
	Envelope
	EventSeq uint64             `json:"event_seq"`
	Code     string             `json:"code"`
	Source   string             `json:"source"`
	Active   *bool              `json:"active,omitempty"`
	Values   map[string]float64 `json:"values"`
	Message  string             `json:"message"`
}

// SensorHealth sums up the microphone's health over a summary period.
type SensorHealth struct {
	Healthy      bool     `json:"healthy"`
	Active       []string `json:"active"`
	FaultsRaised int      `json:"faults_raised"`
}

// Summary is the payload of a periodic summary.
type Summary struct {
	Envelope
	PeriodStart          string       `json:"period_start"`
	PeriodEnd            string       `json:"period_end"`
	PeriodS              float64      `json:"period_s"`
	RunningFraction      float64      `json:"running_fraction"`
	WindowsScored        int          `json:"windows_scored"`
	ScoreMin             float64      `json:"score_min"`
	ScoreMean            float64      `json:"score_mean"`
	ScoreP95             float64      `json:"score_p95"`
	ScoreMax             float64      `json:"score_max"`
	AlarmsRaised         int          `json:"alarms_raised"`
	WarningsRaised       int          `json:"warnings_raised"`
	AlarmActiveS         float64      `json:"alarm_active_s"`
	WorstState           string       `json:"worst_state"`
	RMSMeanDBFS          float64      `json:"rms_mean_dbfs"`
	RMSMaxDBFS           float64      `json:"rms_max_dbfs"`
	CaptureOverruns      int          `json:"capture_overruns"`
	Sensor               SensorHealth `json:"sensor"`
	MessagesDropped      uint64       `json:"messages_dropped"`
	MessagesDroppedTotal uint64       `json:"messages_dropped_total"`
}

// renderer turns queued messages into payloads.
type renderer struct {
	site, asset string
	period      time.Duration
}

func (r renderer) envelope(kind string, seq uint64, t time.Time) Envelope {
	return Envelope{Schema: SchemaVersion, Kind: kind, Site: r.site, Asset: r.asset, Seq: seq, Time: Stamp(t)}
}

// render returns the kind and JSON payload of a queued message. The same
// message always renders to the same bytes, so a resend is a duplicate.
func (r renderer) render(m store.Message) (kind string, payload []byte, err error) {
	var v any
	switch m.Class {
	case store.ClassSummary:
		kind, v = KindSummary, r.summary(m)
	case store.ClassAlarm:
		kind, v = KindAlarm, r.alarm(m)
	case store.ClassDiagnostic:
		kind, v = KindDiagnostic, r.event(KindDiagnostic, m)
	case store.ClassState:
		kind, v = KindState, r.event(KindState, m)
	default:
		return "", nil, fmt.Errorf("publish: message %d: class %v cannot be rendered", m.Seq, m.Class)
	}
	payload, err = json.Marshal(v)
	return kind, payload, err
}

func (r renderer) alarm(m store.Message) Alarm {
	e := m.Event
	v, l := e.Values, e.Labels
	a := Alarm{Envelope: r.envelope(KindAlarm, m.Seq, e.Time), EventSeq: e.Seq, Code: e.Code,
		Change: l["change"], State: l["state"], Severity: l["severity"], FromSeverity: l["from_severity"],
		Occurrence: int(v["occurrence"]), Score: e.Score, Threshold: e.Threshold,
		WindowsOver: int(v["over_windows"]), WindowsOf: int(v["of_windows"]), Bands: []Band{},
		Machine: l["machine"], EvidenceClipID: e.ClipID, BaselineID: l["baseline"], By: l["by"], Reason: l["reason"],
		Message: e.Message}
	if a.Change == "" { // an event written before labels existed
		a.Change = e.Code[strings.LastIndexByte(e.Code, '.')+1:]
	}
	for _, f := range []*string{&a.State, &a.Severity, &a.Machine} {
		if *f == "" {
			*f = "unknown"
		}
	}
	for i := 1; i <= 3; i++ {
		n := fmt.Sprint(i)
		hi, ok := v["band"+n+"_hi_hz"]
		if !ok {
			break
		}
		a.Bands = append(a.Bands, Band{LowHz: v["band"+n+"_lo_hz"], HighHz: hi, DeviationSD: v["band"+n+"_dev_sd"]})
	}
	if s, ok := v["shelved_s"]; ok {
		a.ShelvedUntil = Stamp(e.Time.Add(time.Duration(s * float64(time.Second))))
	}
	return a
}

func (r renderer) event(kind string, m store.Message) Event {
	e := m.Event
	out := Event{Envelope: r.envelope(kind, m.Seq, e.Time), EventSeq: e.Seq, Code: e.Code,
		Source: e.Code[:max(strings.IndexByte(e.Code, '.'), 0)], Values: e.Values, Message: e.Message}
	if out.Source == "" {
		out.Source = "agent"
	}
	if out.Values == nil {
		out.Values = map[string]float64{}
	}
	switch {
	case strings.HasSuffix(e.Code, ".active"):
		t := true
		out.Active = &t
	case strings.HasSuffix(e.Code, ".cleared"):
		f := false
		out.Active = &f
	}
	return out
}

func (r renderer) summary(m store.Message) Summary {
	s := m.Summary
	end := s.Start.Add(r.period)
	h := SensorHealth{Healthy: s.SensorActive == 0, Active: []string{}, FaultsRaised: s.SensorFaults}
	for k := gate.Kind(0); k < gate.NumKinds; k++ {
		if s.SensorActive&(1<<k) != 0 {
			h.Active = append(h.Active, k.String())
		}
	}
	sort.Strings(h.Active)
	return Summary{Envelope: r.envelope(KindSummary, m.Seq, end), PeriodStart: Stamp(s.Start), PeriodEnd: Stamp(end),
		PeriodS: r.period.Seconds(), RunningFraction: round(s.RunningFraction, 4), WindowsScored: s.Windows,
		ScoreMin: s.ScoreMin, ScoreMean: s.ScoreMean, ScoreP95: s.ScoreP95, ScoreMax: s.ScoreMax,
		AlarmsRaised: s.Alarms, WarningsRaised: s.Warnings, AlarmActiveS: round(s.AlarmSeconds, 3),
		WorstState: s.Alarm.ISA(), RMSMeanDBFS: round(s.RMSMeanDBFS, 2), RMSMaxDBFS: round(s.RMSMaxDBFS, 2),
		CaptureOverruns: s.Overruns, Sensor: h, MessagesDropped: m.Drops.SinceSummary, MessagesDroppedTotal: m.Drops.Total}
}

func round(x float64, digits int) float64 {
	p := math.Pow(10, float64(digits))
	return math.Round(x*p) / p
}
