// Command prefill writes invented history into an agent's log file: DAYS of
// minute trend ending now, hourly summaries and a few alarm and diagnostic
// events, so that pages, exports and reports can be measured on a full
// month. The numbers are made up for load tests and demos; nothing is
// measured from them.
//
//	go run ./scripts/prefill -days 30 /tmp/listen.db
package main

import (
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

func main() {
	days := flag.Int("days", 30, "days of history ending now")
	asset := flag.String("asset", "P-492B", "asset tag stamped on the events")
	flag.Parse()
	if flag.NArg() != 1 || *days < 1 || *days > 400 {
		fmt.Fprintln(os.Stderr, "usage: prefill [-days N (1-400)] [-asset TAG] LOGFILE")
		os.Exit(2)
	}
	st, err := store.Open(flag.Arg(0), store.Options{FlushInterval: -1})
	if err != nil {
		fmt.Fprintln(os.Stderr, "prefill:", err)
		os.Exit(1)
	}
	defer st.Close()
	rng := rand.New(rand.NewPCG(492, 7))
	end := time.Now().UTC().Truncate(time.Minute)
	start := end.Add(-time.Duration(*days) * 24 * time.Hour)
	n := 0
	for t := start; t.Before(end); t = t.Add(time.Minute) {
		drift := 0.02 * float64(t.Sub(start)) / float64(end.Sub(start))
		mean := 0.18 + drift + 0.03*math.Sin(float64(t.Unix())/5400) + 0.01*rng.NormFloat64()
		if err := st.AddTrend(store.TrendPoint{Start: t, Windows: 29, ScoreMin: mean - 0.05, ScoreMean: mean, ScoreMax: mean + 0.06,
			RMSMeanDBFS: -31 + rng.NormFloat64(), RMSMaxDBFS: -27 + rng.NormFloat64(), RunningFraction: 1}); err != nil {
			fmt.Fprintln(os.Stderr, "prefill:", err)
			os.Exit(1)
		}
		if t.Minute() == 0 {
			st.AddSummary(store.Summary{Start: t, Windows: 1750, RunningFraction: 1, ScoreMin: 0.1, ScoreMean: mean, ScoreP95: mean + 0.05,
				ScoreMax: mean + 0.1, RMSMeanDBFS: -31, RMSMaxDBFS: -25})
		}
		if n++; n%5000 == 0 {
			if err := st.Flush(); err != nil {
				fmt.Fprintln(os.Stderr, "prefill:", err)
				os.Exit(1)
			}
		}
		if n%(3*24*60) == 0 {
			st.AppendEvent(store.Event{Time: t, Kind: store.EventAlarm, Code: "warning.raised", Asset: *asset, Score: 0.7, Threshold: 0.65,
				Message: "warning raised (invented history)", Labels: map[string]string{"state": "UNACK"}})
			st.AppendEvent(store.Event{Time: t.Add(time.Minute), Kind: store.EventAlarm, Code: "warning.cleared", Asset: *asset,
				Score: 0.3, Threshold: 0.65, Message: "warning cleared (invented history)", Labels: map[string]string{"state": "NORM"}})
		}
	}
	if err := st.Flush(); err != nil {
		fmt.Fprintln(os.Stderr, "prefill:", err)
		os.Exit(1)
	}
	s, _ := st.Stats()
	fmt.Printf("prefill: %s: %d trend minutes, %d summaries, %d events, %.1f MiB\n", flag.Arg(0), s.Trend, s.Summaries, s.Events, float64(s.FileBytes)/(1<<20))
}
