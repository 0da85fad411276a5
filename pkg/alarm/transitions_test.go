package alarm_test

import (
	"errors"
	"strings"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
)

// The state transition table: for each (state, input) pair, the state it
// leads to and the events it emits.
//
// Reference: ANSI/ISA-18.2-2016, the alarm state transition diagram (from
// memory, not checked against the text): NORM -abnormal-> UNACK;
// UNACK -ack-> ACKED; UNACK -normal-> RTNUN; ACKED -normal-> NORM;
// RTNUN -ack-> NORM; RTNUN -abnormal-> UNACK; any -shelve-> SHLVD;
// SHLVD -unshelve-> NORM, annunciated again (UNACK) if abnormal; a latched
// alarm does not leave UNACK/ACKED on returning to normal until the
// operator acts. Rows marked "package choice" are decisions of this package
// where the standard is silent (see doc.go): a return in RTNUN or while
// latched is a new occurrence, shelving is allowed in every state and
// replaces the end of a shelve, and acknowledging is refused while shelved.
func TestStateTransitions(t *testing.T) {
	off := rep("u", offWindows)
	// Setups drive a fresh tracker into a state through the public API.
	setups := map[string]func(d *driver){
		"NORM":             func(d *driver) {},
		"UNACK":            func(d *driver) { d.all("aaa") },
		"ACKED":            func(d *driver) { d.all("aaa"); mustAck(d) },
		"RTNUN":            func(d *driver) { d.all("aaa" + off) },
		"SHLVD normal":     func(d *driver) { mustShelve(d) },
		"SHLVD abnormal":   func(d *driver) { mustShelve(d); d.all("aaa") },
		"UNACK latched":    func(d *driver) { d.all("aaa") },
		"ACKED latched":    func(d *driver) { d.all("aaa"); mustAck(d) },
		"UNACK latched rt": func(d *driver) { d.all("aaa" + off) },
		"ACKED latched rt": func(d *driver) { d.all("aaa"); mustAck(d); d.all(off) },
	}
	// Inputs: the process turning abnormal or normal, and operator actions.
	inputs := map[string]func(d *driver) ([]alarm.Event, error){
		"abnormal": func(d *driver) ([]alarm.Event, error) { return d.all("aaa"), nil },
		"normal":   func(d *driver) ([]alarm.Event, error) { return d.all(off), nil },
		"ack":      func(d *driver) ([]alarm.Event, error) { return d.ack("m.ilves") },
		"shelve":   func(d *driver) ([]alarm.Event, error) { return d.shelve(time.Hour) },
		"unshelve": func(d *driver) ([]alarm.Event, error) { return d.unshelve() },
	}
	tests := []struct {
		from, input string
		want        alarm.State
		events      string
		err         error
	}{
		{"NORM", "abnormal", alarm.StateUnacked, "raised/alarm/UNACK", nil},
		{"NORM", "normal", alarm.StateNormal, "", nil},
		{"NORM", "ack", alarm.StateNormal, "", alarm.ErrNothingToAck},
		{"NORM", "shelve", alarm.StateShelved, "shelved/none/SHLVD", nil},
		{"NORM", "unshelve", alarm.StateNormal, "", alarm.ErrNotShelved},

		{"UNACK", "abnormal", alarm.StateUnacked, "", nil},
		{"UNACK", "normal", alarm.StateReturnedUnacked, "cleared/alarm/RTNUN", nil},
		{"UNACK", "ack", alarm.StateAcked, "acknowledged/alarm/ACKED", nil},
		{"UNACK", "shelve", alarm.StateShelved, "shelved/alarm/SHLVD", nil},
		{"UNACK", "unshelve", alarm.StateUnacked, "", alarm.ErrNotShelved},

		{"ACKED", "abnormal", alarm.StateAcked, "", nil},
		{"ACKED", "normal", alarm.StateNormal, "cleared/alarm/NORM", nil},
		{"ACKED", "ack", alarm.StateAcked, "", alarm.ErrNothingToAck},
		{"ACKED", "shelve", alarm.StateShelved, "shelved/alarm/SHLVD", nil},
		{"ACKED", "unshelve", alarm.StateAcked, "", alarm.ErrNotShelved},

		{"RTNUN", "abnormal", alarm.StateUnacked, "raised/alarm/UNACK", nil}, // package choice: new occurrence
		{"RTNUN", "normal", alarm.StateReturnedUnacked, "", nil},
		{"RTNUN", "ack", alarm.StateNormal, "acknowledged/alarm/NORM", nil},
		{"RTNUN", "shelve", alarm.StateShelved, "shelved/none/SHLVD", nil},
		{"RTNUN", "unshelve", alarm.StateReturnedUnacked, "", alarm.ErrNotShelved},

		{"SHLVD normal", "abnormal", alarm.StateShelved, "", nil},
		{"SHLVD normal", "normal", alarm.StateShelved, "", nil},
		{"SHLVD normal", "ack", alarm.StateShelved, "", alarm.ErrNothingToAck},    // package choice
		{"SHLVD normal", "shelve", alarm.StateShelved, "shelved/none/SHLVD", nil}, // package choice
		{"SHLVD normal", "unshelve", alarm.StateNormal, "unshelved/none/NORM", nil},
		{"SHLVD abnormal", "normal", alarm.StateShelved, "", nil},
		{"SHLVD abnormal", "unshelve", alarm.StateUnacked, "unshelved/alarm/NORM raised/alarm/UNACK", nil},

		{"UNACK latched", "normal", alarm.StateUnacked, "cleared/alarm/UNACK", nil},
		{"ACKED latched", "normal", alarm.StateAcked, "cleared/alarm/ACKED", nil},
		{"UNACK latched rt", "abnormal", alarm.StateUnacked, "raised/alarm/UNACK", nil}, // package choice: new occurrence
		{"UNACK latched rt", "normal", alarm.StateUnacked, "", nil},
		{"UNACK latched rt", "ack", alarm.StateNormal, "acknowledged/alarm/NORM", nil},
		{"UNACK latched rt", "shelve", alarm.StateShelved, "shelved/none/SHLVD", nil},
		{"ACKED latched rt", "abnormal", alarm.StateUnacked, "raised/alarm/UNACK", nil}, // package choice: new occurrence
		{"ACKED latched rt", "normal", alarm.StateAcked, "", nil},
		{"ACKED latched rt", "ack", alarm.StateNormal, "acknowledged/alarm/NORM", nil},
		{"ACKED latched rt", "shelve", alarm.StateShelved, "shelved/none/SHLVD", nil},
	}
	for _, tc := range tests {
		t.Run(tc.from+"/"+tc.input, func(t *testing.T) {
			cfg := testConfig(false)
			cfg.Latch = strings.Contains(tc.from, "latched")
			d := newDriver(t, cfg)
			setups[tc.from](d)
			if got, want := d.tr.State().String(), strings.Fields(tc.from)[0]; got != want {
				t.Fatalf("setup reached %s, want %s", got, want)
			}
			before := d.tr.Snapshot()
			evs, err := inputs[tc.input](d)
			if !errors.Is(err, tc.err) {
				t.Fatalf("error %v, want %v", err, tc.err)
			}
			if got := d.tr.State(); got != tc.want {
				t.Errorf("state %s, want %s", got, tc.want)
			}
			if got := kinds(evs); got != tc.events {
				t.Errorf("events %q, want %q", got, tc.events)
			}
			if err != nil && d.tr.Snapshot() != before {
				t.Errorf("a refused %s changed the tracker: %+v, was %+v", tc.input, d.tr.Snapshot(), before)
			}
		})
	}
}

func mustAck(d *driver) {
	d.t.Helper()
	if _, err := d.ack("m.ilves"); err != nil {
		d.t.Fatal(err)
	}
}

func mustShelve(d *driver) {
	d.t.Helper()
	if _, err := d.shelve(time.Hour); err != nil {
		d.t.Fatal(err)
	}
}
