package store_test

import (
	"fmt"
	"log"
	"os"
	"path/filepath"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

func Example() {
	dir, err := os.MkdirTemp("", "example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	s, err := store.Open(filepath.Join(dir, "obrinvale.db"), store.Options{})
	if err != nil {
		log.Fatal(err)
	}
	defer s.Close()

	at := time.Date(2026, 5, 11, 8, 14, 0, 0, time.UTC)
	seq, err := s.AppendEvent(store.Event{
		Time: at, Kind: store.EventAlarm, Code: "raised", Asset: "P-492B",
		Score: 0.62, Threshold: 0.48, Values: map[string]float64{"rms_dbfs": -27.5},
	})
	if err != nil {
		log.Fatal(err)
	}
	// Trend points are buffered and written together at the next flush.
	err = s.AddTrend(store.TrendPoint{
		Start: at, Windows: 30, ScoreMin: 0.31, ScoreMean: 0.52, ScoreMax: 0.66,
		RMSMeanDBFS: -29.1, RMSMaxDBFS: -26.4, RunningFraction: 1, Alarm: store.AlarmActive,
	})
	if err != nil {
		log.Fatal(err)
	}
	if err := s.Flush(); err != nil {
		log.Fatal(err)
	}

	evs, _ := s.Events(store.EventQuery{Newest: true, Limit: 10})
	pts, _ := s.Trend(store.Range{From: at.Add(-time.Hour)})
	fmt.Println(seq, evs[0].Code, evs[0].Score, evs[0].Values["rms_dbfs"])
	fmt.Println(pts[0].Start.Format(time.RFC3339), pts[0].ScoreMax, pts[0].Alarm)
	// Output:
	// 1 raised 0.62 -27.5
	// 2026-05-11T08:14:00Z 0.66 active
}
