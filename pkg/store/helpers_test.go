package store

import (
	"encoding/binary"
	"math"
	"path/filepath"
	"sync"
	"testing"
	"time"
)

// t0 is the fixed "now" of the tests' virtual clock.
var t0 = time.Date(2026, 5, 11, 8, 0, 0, 0, time.UTC)

// clock is a settable clock for Options.Now.
type clock struct {
	mu sync.Mutex // guards t
	t  time.Time
}

func newClock(t time.Time) *clock { return &clock{t: t} }

func (c *clock) Now() time.Time {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.t
}

func (c *clock) Set(t time.Time) {
	c.mu.Lock()
	c.t = t
	c.mu.Unlock()
}

// testOptions flushes only when asked and runs on a clock stopped at t0.
func testOptions() Options {
	return Options{FlushInterval: -1, Now: newClock(t0).Now}
}

// mustOpen opens a new store in a temporary folder, closed at cleanup.
func mustOpen(t testing.TB, opt Options) *Store {
	t.Helper()
	return mustOpenAt(t, filepath.Join(t.TempDir(), "obrinvale.db"), opt)
}

// mustOpenAt opens the store at path, closed at cleanup.
func mustOpenAt(t testing.TB, path string, opt Options) *Store {
	t.Helper()
	s, err := Open(path, opt)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		if err := s.Close(); err != nil {
			t.Error(err)
		}
	})
	return s
}

func mustFlush(t testing.TB, s *Store) {
	t.Helper()
	if err := s.Flush(); err != nil {
		t.Fatal(err)
	}
}

func mustStats(t testing.TB, s *Store) Stats {
	t.Helper()
	st, err := s.Stats()
	if err != nil {
		t.Fatal(err)
	}
	return st
}

// makeWAV returns a canonical 44-byte-header WAV file of 16-bit mono PCM
// (Microsoft RIFF layout) holding frames samples of a ramp.
func makeWAV(rate, frames int) []byte {
	le := binary.LittleEndian
	data := 2 * frames
	b := make([]byte, 44+data)
	copy(b[0:], "RIFF")
	le.PutUint32(b[4:], uint32(36+data))
	copy(b[8:], "WAVEfmt ")
	le.PutUint32(b[16:], 16)
	le.PutUint16(b[20:], 1) // PCM
	le.PutUint16(b[22:], 1) // mono
	le.PutUint32(b[24:], uint32(rate))
	le.PutUint32(b[28:], uint32(2*rate))
	le.PutUint16(b[32:], 2)
	le.PutUint16(b[34:], 16)
	copy(b[36:], "data")
	le.PutUint32(b[40:], uint32(data))
	for i := 0; i < frames; i++ {
		le.PutUint16(b[44+2*i:], uint16(i*37))
	}
	return b
}

// trendAt returns a valid trend point for minute i after start, with
// values that depend on i.
func trendAt(start time.Time, i int) TrendPoint {
	x := float64(i%97) / 97
	return TrendPoint{
		Start: start.Add(time.Duration(i) * time.Minute), Windows: 30,
		ScoreMin: 0.2 + 0.1*x, ScoreMean: 0.3 + 0.1*x, ScoreMax: 0.45 + 0.1*x,
		RMSMeanDBFS: -31.5 + x, RMSMaxDBFS: -28.25 + x, RunningFraction: math.Mod(float64(i), 4) / 4,
		Alarm: AlarmState(i % int(alarmStates)),
	}
}

// summaryAt returns a valid summary for hour i after start.
func summaryAt(start time.Time, i int) Summary {
	return Summary{
		Start: start.Add(time.Duration(i) * time.Hour), Windows: 1800, RunningFraction: 0.75,
		ScoreMin: 0.18, ScoreMean: 0.29, ScoreP95: 0.41, ScoreMax: 0.52,
		RMSMeanDBFS: -30.5, RMSMaxDBFS: -24, AlarmSeconds: float64(i), Alarms: i % 3, Overruns: 1, Alarm: AlarmActive,
	}
}

// eventAt returns a valid event made i seconds after start.
func eventAt(start time.Time, i int) Event {
	return Event{
		Time: start.Add(time.Duration(i) * time.Second), Kind: EventAlarm, Code: "raised", Asset: "P-492B",
		Score: 0.61, Threshold: 0.48, Message: "Obrinvale raw-water lift station: score over threshold",
		Values: map[string]float64{"rms_dbfs": -27.5, "freq_hz": 147},
	}
}
