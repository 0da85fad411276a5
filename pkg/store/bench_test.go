package store

import (
	"testing"
	"time"
)

// reportPages reports the store's page-write estimate per operation; it
// equals the bytes handed to pwrite (checked against /proc/self/io wchar by
// scripts/storebytes).
func reportPages(b *testing.B, s *Store, before Stats) {
	after := mustStats(b, s)
	b.ReportMetric(float64(after.PageBytesWritten-before.PageBytesWritten)/float64(b.N), "pagebytes/op")
	b.ReportMetric(float64(after.Commits-before.Commits)/float64(b.N), "commits/op")
}

// prefilled returns a store holding a day of trend, so trees have depth.
func prefilled(b *testing.B) *Store {
	s := mustOpen(b, testOptions())
	for i := 0; i < 1440; i++ {
		if err := s.AddTrend(trendAt(t0.Add(-24*time.Hour), i)); err != nil {
			b.Fatal(err)
		}
	}
	mustFlush(b, s)
	return s
}

func BenchmarkAppendEvent(b *testing.B) {
	s := prefilled(b)
	before := mustStats(b, s)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := s.AppendEvent(eventAt(t0, i)); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	reportPages(b, s, before)
}

// BenchmarkFlushOneTrendPoint is the steady state: one minute's point per
// flush.
func BenchmarkFlushOneTrendPoint(b *testing.B) {
	s := prefilled(b)
	before := mustStats(b, s)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := s.AddTrend(trendAt(t0, i)); err != nil {
			b.Fatal(err)
		}
		if err := s.Flush(); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	reportPages(b, s, before)
}

func BenchmarkTrendReadDay(b *testing.B) {
	s := prefilled(b)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		pts, err := s.Trend(Range{})
		if err != nil || len(pts) != 1440 {
			b.Fatal(len(pts), err)
		}
	}
}
