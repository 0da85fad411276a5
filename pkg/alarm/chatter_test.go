package alarm_test

import (
	"math/rand/v2"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
)

// The point of this test: a noisy borderline score must not make the alarm
// chatter. A naive comparator (raise whenever the score goes from under to
// at-or-over the threshold) raises on a large share of windows; the
// debounced tracker must raise far less often, and rarely per hour.
//
// The score is the centre plus Gaussian noise whose standard deviation
// equals the hysteresis gap (threshold − clear level), 10 000 windows
// 2 s apart (about 5.6 h), from a fixed-seed PCG generator.
//
// The bounds: the tracker must raise at least 20 times less often than the
// comparator and at most 2 times per hour. Both are choices (common
// practice, no source), meant to leave a wide margin: the reasoning below
// expects well under one raise per hour. The control case turns the
// debounce off (1 of 1, no hysteresis, no off-delay) and must then count
// exactly as many raises as the comparator, which shows the two counts
// measure the same thing.
func TestNoChattering(t *testing.T) {
	const windows = 10000
	gap := alarmAt * (1 - alarm.DefaultConfig().ClearFraction)
	tests := []struct {
		name    string
		centre  float64
		control bool // debounce off: must equal the comparator
	}{
		// Half the windows over: the condition is raised once and, since
		// 11 windows in a row below centre−1 sd are very unlikely
		// (0.16^11), it stays.
		{"centred on the threshold", alarmAt, false},
		// 16 % of windows over: 3 of 5 happens, but clearing needs 11 in a
		// row under the centre (0.5^11), so the alarm mostly stays.
		{"centred on the clear level", alarmAt - gap, false},
		// 2 % over: k-of-n rarely fires and clears soon after.
		{"one gap below the clear level", alarmAt - 2*gap, false},
		{"control: debounce off", alarmAt, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			cfg := testConfig(false)
			if tc.control {
				cfg.K, cfg.N, cfg.ClearFraction, cfg.OffDelay = 1, 1, 1, 0
			}
			tr, err := alarm.NewTracker(cfg)
			if err != nil {
				t.Fatal(err)
			}
			rng := rand.New(rand.NewPCG(2025, 492))
			buf := make([]alarm.Event, 0, 4)
			naive, raised := 0, 0
			wasOver := false
			for i := range windows {
				s := tc.centre + gap*rng.NormFloat64()
				over := s >= alarmAt
				if over && !wasOver {
					naive++
				}
				wasOver = over
				buf = tr.Observe(buf[:0], t0.Add(time.Duration(i)*step), alarm.Window{Score: s, Running: true})
				for _, e := range buf {
					if e.Kind == alarm.Raised {
						raised++
					}
				}
			}
			hours := float64(windows) * step.Hours()
			t.Logf("comparator %d raises, tracker %d raises in %.1f h (%.2f per hour)", naive, raised, hours, float64(raised)/hours)
			if tc.control {
				if raised != naive {
					t.Errorf("with the debounce off the tracker raised %d times, the comparator %d", raised, naive)
				}
				return
			}
			if naive < 100 {
				t.Fatalf("the comparator raised only %d times: the signal is not borderline", naive)
			}
			if raised*20 > naive {
				t.Errorf("tracker raised %d times, comparator %d: want at least 20 times fewer", raised, naive)
			}
			if perHour := float64(raised) / hours; perHour > 2 {
				t.Errorf("tracker raised %.2f times per hour, want at most 2", perHour)
			}
		})
	}
}
