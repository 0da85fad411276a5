package alarm_test

import (
	"testing"

	"github.com/auscult/auscult/pkg/alarm"
)

// Latching and occurrences over a longer story: each step feeds windows or
// acknowledges and states the events and the occurrence they carry.
func TestLatchAndOccurrences(t *testing.T) {
	type step struct {
		pattern string // windows, or "ack"
		want    string
		occ     uint64 // occurrence every event of the step carries
	}
	off := rep("u", offWindows)
	tests := []struct {
		name  string
		latch bool
		steps []step
	}{
		{"latched alarm stays until acknowledged", true, []step{
			{"aaa", "raised/alarm/UNACK", 1},
			{off, "cleared/alarm/UNACK", 1},
			{rep("u", 500), "", 0},
			{"ack", "acknowledged/alarm/NORM", 1},
			{"aaa", "raised/alarm/UNACK", 2},
		}},
		{"latched and acknowledged needs an ack of the return", true, []step{
			{"aaa", "raised/alarm/UNACK", 1},
			{"ack", "acknowledged/alarm/ACKED", 1},
			{off, "cleared/alarm/ACKED", 1},
			{"ack", "acknowledged/alarm/NORM", 1},
		}},
		{"a return while latched is a new occurrence", true, []step{
			{"aaa", "raised/alarm/UNACK", 1},
			{off, "cleared/alarm/UNACK", 1},
			{"aaa", "raised/alarm/UNACK", 2},
			{"ack", "acknowledged/alarm/ACKED", 2},
			{off, "cleared/alarm/ACKED", 2},
		}},
		{"without latch RTNUN then a return", false, []step{
			{"aaa", "raised/alarm/UNACK", 1},
			{off, "cleared/alarm/RTNUN", 1},
			{"aaa", "raised/alarm/UNACK", 2},
			{"ack", "acknowledged/alarm/ACKED", 2},
			{off, "cleared/alarm/NORM", 2},
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			cfg := testConfig(false)
			cfg.Latch = tc.latch
			d := newDriver(t, cfg)
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
					t.Fatalf("step %d: events %q, want %q", i, got, s.want)
				}
				for _, e := range evs {
					if e.Occurrence != s.occ {
						t.Errorf("step %d: %s carries occurrence %d, want %d", i, e.Kind, e.Occurrence, s.occ)
					}
				}
			}
		})
	}
}

// Stopped windows neither raise nor clear: an active alarm stays as it is
// through a long stop, and the state's Since does not move.
func TestStoppedKeepsState(t *testing.T) {
	tests := []struct {
		name   string
		before string
		state  alarm.State
		sev    alarm.Severity
	}{
		{"normal", "uuu", alarm.StateNormal, alarm.SeverityNone},
		{"warning", "www", alarm.StateUnacked, alarm.SeverityWarning},
		{"alarm", "aaa", alarm.StateUnacked, alarm.SeverityAlarm},
		{"returned", "aaa" + rep("u", offWindows), alarm.StateReturnedUnacked, alarm.SeverityNone},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d := newDriver(t, testConfig(true))
			d.all(tc.before)
			before := d.tr.Snapshot()
			if evs := d.all(rep("-", 5000)); len(evs) != 0 {
				t.Fatalf("events while stopped: %q", kinds(evs))
			}
			s := d.tr.Snapshot()
			if s.State != tc.state || s.Severity != tc.sev || !s.Since.Equal(before.Since) || s.Running {
				t.Errorf("after the stop %+v, want %s %s since %v, not running", s, tc.state, tc.sev, before.Since)
			}
			if s.Score != before.Score || s.OverAlarm != before.OverAlarm || s.OverWarning != before.OverWarning {
				t.Errorf("the stop changed score or history: %+v, was %+v", s, before)
			}
		})
	}
}
