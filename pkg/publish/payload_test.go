package publish

import (
	"encoding/json"
	"strings"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

var t0 = time.Date(2026, 12, 2, 3, 14, 7, 250e6, time.UTC)

func testRenderer() renderer {
	return renderer{site: "obrinvale", asset: "P-492B", period: time.Hour}
}

// An alarm event renders with its ISA-18.2 state, bands in Hz, clip id and
// times in UTC with milliseconds; rendering twice gives the same bytes.
func TestRenderAlarm(t *testing.T) {
	e := store.Event{Seq: 17, Time: t0, Kind: store.EventAlarm, Code: "alarm.raised", Score: 0.41, Threshold: 0.33,
		Message: "alarm raised", ClipID: 5,
		Values: map[string]float64{"occurrence": 2, "over_windows": 3, "of_windows": 5, "band1_lo_hz": 880, "band1_hi_hz": 1120,
			"band1_dev_sd": 4.5, "band2_lo_hz": 40, "band2_hi_hz": 60, "band2_dev_sd": -2},
		Labels: map[string]string{"change": "raised", "state": "UNACK", "severity": "alarm", "machine": "running", "baseline": "b1c2"}}
	m := store.Message{Seq: 42, Class: store.ClassAlarm, Time: t0, Event: &e}
	kind, b, err := testRenderer().render(m)
	if err != nil || kind != KindAlarm {
		t.Fatal(kind, err)
	}
	_, again, _ := testRenderer().render(m)
	if string(again) != string(b) {
		t.Error("rendering is not deterministic")
	}
	var a Alarm
	if err := json.Unmarshal(b, &a); err != nil {
		t.Fatal(err)
	}
	if a.Seq != 42 || a.EventSeq != 17 || a.Time != "2026-12-02T03:14:07.250Z" || a.State != "UNACK" || a.Change != "raised" ||
		a.WindowsOver != 3 || a.WindowsOf != 5 || a.EvidenceClipID != 5 || a.BaselineID != "b1c2" || a.Occurrence != 2 {
		t.Errorf("alarm payload %s", b)
	}
	if len(a.Bands) != 2 || a.Bands[0] != (Band{880, 1120, 4.5}) || a.Bands[1].DeviationSD != -2 {
		t.Errorf("bands %+v", a.Bands)
	}
	if !strings.Contains(string(b), `"schema":1,"kind":"alarm","site":"obrinvale","asset":"P-492B","seq":42`) {
		t.Errorf("envelope first, in order: %s", b)
	}
}

// A summary renders its period, sensor health by name and the drops.
func TestRenderSummary(t *testing.T) {
	s := store.Summary{Start: t0.Truncate(time.Hour), Windows: 1780, RunningFraction: 0.98765, ScoreMin: 0.1, ScoreMean: 0.12,
		ScoreP95: 0.2, ScoreMax: 0.3, RMSMeanDBFS: -30.123, RMSMaxDBFS: -20, Alarms: 1, Warnings: 2, Overruns: 3,
		SensorFaults: 1, SensorActive: 1 << 2, Alarm: store.AlarmAcknowledged}
	m := store.Message{Seq: 9, Class: store.ClassSummary, Time: s.Start, Summary: &s, Drops: store.Drops{Total: 7, SinceSummary: 4}}
	_, b, err := testRenderer().render(m)
	if err != nil {
		t.Fatal(err)
	}
	var p Summary
	json.Unmarshal(b, &p)
	if p.PeriodStart != "2026-12-02T03:00:00.000Z" || p.PeriodEnd != "2026-12-02T04:00:00.000Z" || p.Time != p.PeriodEnd ||
		p.PeriodS != 3600 || p.RunningFraction != 0.9877 || p.WorstState != "ACKED" || p.MessagesDropped != 4 ||
		p.MessagesDroppedTotal != 7 || p.Sensor.Healthy || len(p.Sensor.Active) != 1 || p.WarningsRaised != 2 {
		t.Errorf("summary payload %s", b)
	}
}

// Diagnostics say whether the fault is active; state changes name the
// machine's state.
func TestRenderEvents(t *testing.T) {
	d := store.Event{Seq: 3, Time: t0, Kind: store.EventDiagnostic, Code: "sensor.clipping.active", Message: "clipping",
		Values: map[string]float64{"value": 0.02, "limit": 0.01}}
	_, b, _ := testRenderer().render(store.Message{Seq: 4, Class: store.ClassDiagnostic, Event: &d})
	var e Event
	json.Unmarshal(b, &e)
	if e.Kind != KindDiagnostic || e.Source != "sensor" || e.Active == nil || !*e.Active || e.Values["limit"] != 0.01 {
		t.Errorf("diagnostic %s", b)
	}
	s := store.Event{Seq: 5, Time: t0, Kind: store.EventState, Code: "machine.stopped", Message: "stopped"}
	_, b, _ = testRenderer().render(store.Message{Seq: 6, Class: store.ClassState, Event: &s})
	e = Event{}
	json.Unmarshal(b, &e)
	if e.Kind != KindState || e.Source != "machine" || e.Active != nil || e.Values == nil {
		t.Errorf("state %s", b)
	}
}

func TestTopics(t *testing.T) {
	tp, err := NewTopics("plant/north", "obrinvale", "P-492B")
	if err != nil || tp.Topic(KindAlarm) != "plant/north/obrinvale/P-492B/alarm" {
		t.Fatal(tp, err)
	}
	for _, bad := range [][3]string{{"", "s", "a"}, {"p", "s/t", "a"}, {"p", "s", "a+"}, {"p#", "s", "a"}, {"/p", "s", "a"}} {
		if _, err := NewTopics(bad[0], bad[1], bad[2]); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}
