package alarm_test

import (
	"errors"
	"strings"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
)

// Shelve durations are bounded: positive and at most Config.MaxShelve; a
// refusal names the limit.
func TestShelveBounds(t *testing.T) {
	limit := alarm.DefaultConfig().MaxShelve
	tests := []struct {
		name    string
		d       time.Duration
		err     error
		mention string // text the error must contain
	}{
		{"zero", 0, alarm.ErrShelveNonPositive, "0s"},
		{"negative", -time.Minute, alarm.ErrShelveNonPositive, "-1m0s"},
		{"one nanosecond over the limit", limit + 1, alarm.ErrShelveTooLong, limit.String()},
		{"a day", 24 * time.Hour, alarm.ErrShelveTooLong, "8h0m0s"},
		{"exactly the limit", limit, nil, ""},
		{"one nanosecond", 1, nil, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d := newDriver(t, testConfig(false))
			evs, err := d.shelve(tc.d)
			if !errors.Is(err, tc.err) {
				t.Fatalf("error %v, want %v", err, tc.err)
			}
			if err != nil {
				if !strings.Contains(err.Error(), tc.mention) || !strings.HasPrefix(err.Error(), "alarm: ") {
					t.Errorf("error %q should start with \"alarm: \" and mention %q", err, tc.mention)
				}
				if len(evs) != 0 || d.tr.State() != alarm.StateNormal {
					t.Errorf("refused shelve left events %v, state %s", evs, d.tr.State())
				}
				return
			}
			e := evs[0]
			if e.Kind != alarm.Shelved || !e.Until.Equal(t0.Add(tc.d)) || e.By != "j.okafor" || e.Reason == "" {
				t.Errorf("shelved event %+v, want until %v with who and why", e, t0.Add(tc.d))
			}
			if s := d.tr.Snapshot(); !s.ShelvedUntil.Equal(e.Until) || s.State != alarm.StateShelved {
				t.Errorf("snapshot %+v, want shelved until %v", s, e.Until)
			}
		})
	}
}

// A shelve ends by itself at the first Observe at or after its end. A
// condition present then is annunciated at once, with the evidence of the
// window where it arose while shelved.
func TestShelveExpiry(t *testing.T) {
	const shelveFor = 10 * time.Second // five steps: expires at the fifth window after shelving
	expiresAt := int(shelveFor / step)
	tests := []struct {
		name    string
		pattern string // windows from the moment of shelving
		want    string // events of the expiring window
		raiseAt int    // window (from shelving) whose evidence the raise carries, -1 for none
	}{
		{"nothing present", "uuuuuuu", "unshelved/none/NORM", -1},
		{"stopped machine", "-------", "unshelved/none/NORM", -1},
		{"alarm present", "uaaaaaa", "unshelved/alarm/NORM raised/alarm/UNACK", 3},
		{"warning present", "uwwwwww", "unshelved/warning/NORM raised/warning/UNACK", 3},
		{"raised by the expiring window itself", "uuuaaaa", "unshelved/none/NORM raised/alarm/UNACK", 5},
		{"arose, then the machine stopped", "aaa----", "unshelved/alarm/NORM raised/alarm/UNACK", 2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d := newDriver(t, testConfig(true))
			d.all("uu")
			shelvedAt := d.i
			mustShelveFor(d, shelveFor)
			steps := d.feed(tc.pattern)
			for i, evs := range steps {
				if i != expiresAt && len(evs) != 0 {
					t.Fatalf("window %d after shelving: events %q, want none", i, kinds(evs))
				}
			}
			evs := steps[expiresAt]
			if got := kinds(evs); got != tc.want {
				t.Fatalf("expiry events %q, want %q", got, tc.want)
			}
			if u := evs[0]; u.Reason != alarm.ReasonExpired || u.By != "" || !u.Time.Equal(t0.Add(time.Duration(shelvedAt)*step+shelveFor)) {
				t.Errorf("unshelved event %+v, want reason %q at the shelve's end", u, alarm.ReasonExpired)
			}
			if tc.raiseAt >= 0 {
				r := evs[1]
				if want := int64(shelvedAt+tc.raiseAt) * hop; r.SampleIndex != want || r.Occurrence != 1 {
					t.Errorf("raise at sample %d, occurrence %d; want sample %d, occurrence 1", r.SampleIndex, r.Occurrence, want)
				}
			}
		})
	}
}

// Unshelve by request: a condition present is annunciated as a new
// occurrence; an alarm shelved while active gets no Cleared event for a
// clear that happened while shelved.
func TestUnshelve(t *testing.T) {
	tests := []struct {
		name   string
		before string // windows before shelving
		during string // windows while shelved
		want   string // events of Unshelve
		occ    uint64 // occurrence after unshelving
	}{
		{"normal before and after", "uuu", "uuu", "unshelved/none/NORM", 0},
		{"condition arose while shelved", "uuu", "uaaa", "unshelved/alarm/NORM raised/alarm/UNACK", 1},
		{"active alarm still present", "aaa", "aaa", "unshelved/alarm/NORM raised/alarm/UNACK", 2},
		{"active alarm cleared while shelved", "aaa", rep("u", offWindows), "unshelved/none/NORM", 1},
		{"alarm de-escalated while shelved", "aaa", rep("w", offWindows), "unshelved/warning/NORM raised/warning/UNACK", 2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d := newDriver(t, testConfig(true))
			d.all(tc.before)
			mustShelve(d)
			if evs := d.all(tc.during); len(evs) != 0 {
				t.Fatalf("events while shelved: %q", kinds(evs))
			}
			evs, err := d.unshelve()
			if err != nil {
				t.Fatal(err)
			}
			if got := kinds(evs); got != tc.want {
				t.Errorf("events %q, want %q", got, tc.want)
			}
			if evs[0].By != "j.okafor" || evs[0].Reason != "" {
				t.Errorf("unshelved by %q reason %q, want the operator and no reason", evs[0].By, evs[0].Reason)
			}
			if s := d.tr.Snapshot(); s.Occurrence != tc.occ || !s.ShelvedUntil.IsZero() {
				t.Errorf("snapshot %+v: want occurrence %d and no shelve end", s, tc.occ)
			}
		})
	}
}

// While shelved the conditions are still tracked, as the snapshot shows.
func TestShelvedTracking(t *testing.T) {
	d := newDriver(t, testConfig(true))
	mustShelve(d)
	d.all("uaa")
	if s := d.tr.Snapshot(); s.Severity != alarm.SeverityNone || s.OverAlarm != 2 || s.OverWarning != 2 {
		t.Errorf("after two over windows: %+v", s)
	}
	d.all("a")
	if s := d.tr.Snapshot(); s.Severity != alarm.SeverityAlarm || s.State != alarm.StateShelved {
		t.Errorf("after three over windows: %+v, want alarm condition, still shelved", s)
	}
}

func mustShelveFor(d *driver, dur time.Duration) {
	d.t.Helper()
	if _, err := d.shelve(dur); err != nil {
		d.t.Fatal(err)
	}
}
