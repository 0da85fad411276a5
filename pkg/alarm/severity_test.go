package alarm_test

import (
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
)

// Escalation and de-escalation between warning and alarm, with and without
// an acknowledgement in between. Each step feeds a pattern (or acks) and
// states the events it must produce, as "kind/severity/STATE".
func TestSeverityChanges(t *testing.T) {
	type step struct {
		pattern string // windows to feed; "ack" acknowledges instead
		want    string
	}
	off := rep("u", offWindows)
	tests := []struct {
		name  string
		steps []step
	}{
		{"warning escalates to alarm and back, then clears", []step{
			{"www", "raised/warning/UNACK"},
			{"aa", ""},
			// The alarm level has 3 of 5 over at the third alarm window.
			{"a", "severity_changed/alarm/UNACK"},
			// w is over the warning level but below the alarm clear level.
			{rep("w", offWindows-1), ""},
			{"w", "severity_changed/warning/UNACK"},
			{rep("w", 100), ""},
			{off, "cleared/warning/RTNUN"},
		}},
		{"escalation re-annunciates an acknowledged warning", []step{
			{"www", "raised/warning/UNACK"},
			{"ack", "acknowledged/warning/ACKED"},
			{"aaa", "severity_changed/alarm/UNACK"},
			{"ack", "acknowledged/alarm/ACKED"},
			// De-escalation keeps the acknowledgement.
			{rep("w", offWindows), "severity_changed/warning/ACKED"},
			{off, "cleared/warning/NORM"},
		}},
		{"a sudden fault raises an alarm directly and clears once", []step{
			{"aaa", "raised/alarm/UNACK"},
			{off, "cleared/alarm/RTNUN"},
		}},
		{"hovering over the warning level keeps a de-escalated warning", []step{
			{"aaa", "raised/alarm/UNACK"},
			{rep("w", offWindows), "severity_changed/warning/UNACK"},
			{rep("h", 300), ""},
		}},
		{"alarm condition back while a warning is shown escalates again", []step{
			{"aaa", "raised/alarm/UNACK"},
			{rep("w", offWindows), "severity_changed/warning/UNACK"},
			{"aa", ""},
			{"a", "severity_changed/alarm/UNACK"},
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d := newDriver(t, testConfig(true))
			for i, s := range tc.steps {
				var evs []alarm.Event
				if s.pattern == "ack" {
					var err error
					if evs, err = d.ack("m.ilves"); err != nil {
						t.Fatalf("step %d: %v", i, err)
					}
				} else {
					evs = d.all(s.pattern)
				}
				if got := kinds(evs); got != s.want {
					t.Fatalf("step %d (%.12q): events %q, want %q", i, s.pattern, got, s.want)
				}
				for _, e := range evs {
					if e.Kind == alarm.SeverityChanged && e.From == e.Severity {
						t.Errorf("step %d: severity change from %s to itself", i, e.From)
					}
					if e.Occurrence != 1 {
						t.Errorf("step %d: %s event of occurrence %d, want 1", i, e.Kind, e.Occurrence)
					}
				}
			}
		})
	}
}

// Escalation carries the evidence of the window that escalated; the raise
// carries that of the raising window, and later events repeat it.
func TestEvidence(t *testing.T) {
	d := newDriver(t, testConfig(true))
	evs := d.all("uwww") // raised at window 3
	if len(evs) != 1 || evs[0].SampleIndex != 3*hop || evs[0].NBands != 1 || evs[0].Bands[0].LowHz != 300 {
		t.Fatalf("raise evidence %+v, want window 3", evs)
	}
	evs = d.all("aaa") // escalated at window 6
	if len(evs) != 1 || evs[0].SampleIndex != 6*hop || evs[0].Bands[0].LowHz != 600 {
		t.Fatalf("escalation evidence %+v, want window 6", evs)
	}
	if evs[0].Threshold != alarmAt || evs[0].From != alarm.SeverityWarning {
		t.Errorf("escalation threshold %g from %s, want %g from warning", evs[0].Threshold, evs[0].From, alarmAt)
	}
	ack, err := d.ack("m.ilves")
	if err != nil || ack[0].SampleIndex != 6*hop || ack[0].By != "m.ilves" {
		t.Errorf("ack %+v, %v: want the escalation's evidence and the operator", ack, err)
	}
	if s := d.tr.Snapshot(); s.SampleIndex != 6*hop || s.Bands[0].LowHz != 600 || s.Occurrence != 1 {
		t.Errorf("snapshot evidence %+v, want window 6", s)
	}
}

// Window.NBands outside 0..MaxBands is clamped, so a bad caller cannot make
// an event claim more bands than it holds.
func TestBandCountClamped(t *testing.T) {
	for _, tc := range []struct {
		name    string
		n, want int
	}{
		{"negative", -2, 0},
		{"in range", 2, 2},
		{"too many", alarm.MaxBands + 5, alarm.MaxBands},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tr, err := alarm.NewTracker(testConfig(false))
			if err != nil {
				t.Fatal(err)
			}
			var evs []alarm.Event
			for i := range 3 {
				evs = tr.Observe(evs, t0.Add(time.Duration(i)*step), alarm.Window{Score: 0.9, Running: true, NBands: tc.n})
			}
			if len(evs) != 1 || evs[0].NBands != tc.want {
				t.Errorf("events %+v, want one raise with %d bands", evs, tc.want)
			}
		})
	}
}
