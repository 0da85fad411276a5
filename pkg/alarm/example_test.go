package alarm_test

import (
	"fmt"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
)

// A bearing on pump P-492B at the Obrinvale raw-water lift station starts
// to whine: three windows over the alarm threshold raise an alarm, a single
// low window does not clear it, and the alarm clears once the score has
// stayed below the clear level for the off-delay.
func ExampleTracker_Observe() {
	cfg := alarm.DefaultConfig()
	cfg.AlarmThreshold = 0.52 // from the baseline calibration
	cfg.WarnThreshold = 0.45
	tr, err := alarm.NewTracker(cfg)
	if err != nil {
		fmt.Println(err)
		return
	}
	start := time.Date(2025, 3, 1, 6, 0, 0, 0, time.UTC)
	scores := []float64{0.31, 0.61, 0.66, 0.64, 0.30, 0.70}
	for range 12 {
		scores = append(scores, 0.30)
	}
	events := make([]alarm.Event, 0, 4)
	for i, s := range scores {
		w := alarm.Window{Score: s, Running: true, SampleIndex: int64(i) * 32768, NBands: 1}
		w.Bands[0] = alarm.Band{LowHz: 2800, HighHz: 3150, Deviation: 9.5}
		events = tr.Observe(events[:0], start.Add(time.Duration(i)*2*time.Second), w)
		for _, e := range events {
			fmt.Printf("%s %s #%d %s score %.2f, %d of %d over %.2f, %s\n",
				e.Time.Format("15:04:05"), e.Kind, e.Occurrence, e.Severity, e.Score, e.Over, e.N, e.Threshold, e.State)
			if e.Kind == alarm.Raised {
				b := e.Bands[0]
				fmt.Printf("  evidence at sample %d: %.0f-%.0f Hz, %+.1f\n", e.SampleIndex, b.LowHz, b.HighHz, b.Deviation)
			}
		}
	}
	// Output:
	// 06:00:06 raised #1 alarm score 0.64, 3 of 5 over 0.52, UNACK
	//   evidence at sample 98304: 2800-3150 Hz, +9.5
	// 06:00:32 cleared #1 alarm score 0.30, 0 of 5 over 0.52, RTNUN
}
