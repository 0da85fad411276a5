package alarm_test

import (
	"math"
	"strings"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
)

// Test thresholds and the scores that the pattern letters stand for.
const (
	alarmAt = 0.5
	warnAt  = 0.4
	step    = 2 * time.Second // time between windows
	hop     = 32768           // samples between windows (2 s at 16 kHz)
)

// t0 is the time of the first window.
var t0 = time.Date(2025, 3, 1, 6, 0, 0, 0, time.UTC)

// testConfig returns the defaults with the test thresholds; warning says
// whether the warning level is on.
func testConfig(warning bool) alarm.Config {
	c := alarm.DefaultConfig()
	c.AlarmThreshold = alarmAt
	if warning {
		c.WarnThreshold = warnAt
	}
	return c
}

// offWindows is how many windows below the clear level clear a condition
// at the default OffDelay: the first one starts the run and the condition
// clears at the first window OffDelay after it.
var offWindows = int(alarm.DefaultConfig().OffDelay/step) + 1

// score returns the score a pattern letter stands for, and whether the
// window is running. Clear levels are 0.45 (alarm) and 0.36 (warning).
//
//	u  0.30, under both levels and below both clear levels
//	w  0.42, over the warning level, below the alarm clear level
//	h  0.47, between the alarm clear level and the alarm threshold
//	a  0.60, over the alarm level
//	A  exactly the alarm threshold
//	c  exactly the alarm clear level
//	-  a stopped window (score 0.9, not running)
//	n  a running window whose score is NaN
func score(t testing.TB, c byte) (float64, bool) {
	switch c {
	case 'u':
		return 0.30, true
	case 'w':
		return 0.42, true
	case 'h':
		return 0.47, true
	case 'a':
		return 0.60, true
	case 'A':
		return alarmAt, true
	case 'c':
		return alarm.DefaultConfig().ClearFraction * alarmAt, true
	case '-':
		return 0.9, false
	case 'n':
		return math.NaN(), true
	}
	t.Fatalf("unknown pattern letter %q", c)
	return 0, false
}

// driver feeds windows to a Tracker one step apart in virtual time.
type driver struct {
	t   testing.TB
	tr  *alarm.Tracker
	i   int // index of the next window
	buf []alarm.Event
}

func newDriver(t testing.TB, cfg alarm.Config) *driver {
	t.Helper()
	tr, err := alarm.NewTracker(cfg)
	if err != nil {
		t.Fatal(err)
	}
	return &driver{t: t, tr: tr}
}

// now is the time of the next window.
func (d *driver) now() time.Time { return t0.Add(time.Duration(d.i) * step) }

// window builds the window with index i: one band that names i, so tests
// can tell which window's evidence an event carries.
func window(s float64, running bool, i int) alarm.Window {
	w := alarm.Window{Score: s, Running: running, SampleIndex: int64(i) * hop, NBands: 1}
	w.Bands[0] = alarm.Band{LowHz: float64(100 * i), HighHz: float64(100*i + 100), Deviation: 6}
	return w
}

// feed runs one window per pattern letter and returns, for each, the events
// it caused.
func (d *driver) feed(pattern string) [][]alarm.Event {
	out := make([][]alarm.Event, len(pattern))
	for j := range len(pattern) {
		s, running := score(d.t, pattern[j])
		d.buf = d.tr.Observe(d.buf[:0], d.now(), window(s, running, d.i))
		out[j] = append([]alarm.Event(nil), d.buf...)
		d.i++
	}
	return out
}

// all runs the pattern and returns its events in order.
func (d *driver) all(pattern string) []alarm.Event {
	var evs []alarm.Event
	for _, e := range d.feed(pattern) {
		evs = append(evs, e...)
	}
	return evs
}

func (d *driver) ack(by string) ([]alarm.Event, error) {
	return d.tr.Acknowledge(nil, d.now(), by)
}

func (d *driver) shelve(dur time.Duration) ([]alarm.Event, error) {
	return d.tr.Shelve(nil, d.now(), dur, "pump on hand for seal change", "j.okafor")
}

func (d *driver) unshelve() ([]alarm.Event, error) {
	return d.tr.Unshelve(nil, d.now(), "j.okafor")
}

// firstIndex returns the index of the first window whose events include
// one of kind k, or -1.
func firstIndex(steps [][]alarm.Event, k alarm.Kind) int {
	for i, evs := range steps {
		for _, e := range evs {
			if e.Kind == k {
				return i
			}
		}
	}
	return -1
}

// kinds describes events as "kind/severity/STATE" joined by spaces.
func kinds(evs []alarm.Event) string {
	s := make([]string, len(evs))
	for i, e := range evs {
		s[i] = e.Kind.String() + "/" + e.Severity.String() + "/" + e.State.String()
	}
	return strings.Join(s, " ")
}

func rep(s string, n int) string { return strings.Repeat(s, n) }
