package store

import (
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"
	"time"
)

func TestTrendRoundTripAndOrder(t *testing.T) {
	s := mustOpen(t, testOptions())
	const n = 300
	// Add out of order, across two flushes.
	for i := n - 1; i >= 0; i -= 2 {
		if err := s.AddTrend(trendAt(t0, i)); err != nil {
			t.Fatal(err)
		}
	}
	mustFlush(t, s)
	for i := 0; i < n; i += 2 {
		if err := s.AddTrend(trendAt(t0, i)); err != nil {
			t.Fatal(err)
		}
	}
	mustFlush(t, s)
	got, err := s.Trend(Range{})
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != n {
		t.Fatalf("%d points, want %d", len(got), n)
	}
	for i, p := range got {
		if want := trendAt(t0, i); !reflect.DeepEqual(p, want) {
			t.Fatalf("point %d\n%+v\nwant\n%+v", i, p, want)
		}
	}
}

func TestTrendBufferedUntilFlush(t *testing.T) {
	s := mustOpen(t, testOptions())
	if err := s.AddTrend(trendAt(t0, 0)); err != nil {
		t.Fatal(err)
	}
	if got, _ := s.Trend(Range{}); len(got) != 0 {
		t.Errorf("%d points visible before Flush, want 0", len(got))
	}
	if st := mustStats(t, s); st.Pending != 1 {
		t.Errorf("Pending %d, want 1", st.Pending)
	}
	before := mustStats(t, s).Commits
	mustFlush(t, s)
	mustFlush(t, s) // nothing left: must not commit
	st := mustStats(t, s)
	if got, _ := s.Trend(Range{}); len(got) != 1 || st.Pending != 0 {
		t.Errorf("after Flush: %d points, %d pending; want 1, 0", len(got), st.Pending)
	}
	if st.Commits-before != 1 {
		t.Errorf("two flushes made %d commits, want 1 (an empty flush writes nothing)", st.Commits-before)
	}
}

func TestTrendRange(t *testing.T) {
	s := mustOpen(t, testOptions())
	for i := 0; i < 120; i++ {
		if err := s.AddTrend(trendAt(t0, i)); err != nil {
			t.Fatal(err)
		}
	}
	mustFlush(t, s)
	min := func(i int) time.Time { return t0.Add(time.Duration(i) * time.Minute) }
	cases := []struct {
		name        string
		r           Range
		first, size int
	}{
		{"all", Range{}, 0, 120},
		{"from is inclusive", Range{From: min(10)}, 10, 110},
		{"to is exclusive", Range{To: min(10)}, 0, 10},
		{"window", Range{From: min(30), To: min(90)}, 30, 60},
		{"mid-minute bounds", Range{From: min(30).Add(time.Second), To: min(33).Add(time.Second)}, 31, 3},
		{"limit", Range{From: min(50), Limit: 5}, 50, 5},
		{"empty window", Range{From: min(500)}, 0, 0},
		{"to before 1970", Range{To: time.Date(1960, 1, 1, 0, 0, 0, 0, time.UTC)}, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := s.Trend(c.r)
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != c.size || (c.size > 0 && !got[0].Start.Equal(min(c.first))) {
				t.Errorf("%d points from %v, want %d from %v", len(got), got, c.size, min(c.first))
			}
		})
	}
}

// TestTrendKeyTaken checks a point whose minute is already stored (the
// clock stepped back) is kept at the next free millisecond.
func TestTrendKeyTaken(t *testing.T) {
	s := mustOpen(t, testOptions())
	a, b := trendAt(t0, 0), trendAt(t0, 1)
	b.Start = a.Start
	for _, p := range []TrendPoint{a, b, b} {
		if err := s.AddTrend(p); err != nil {
			t.Fatal(err)
		}
		mustFlush(t, s)
	}
	got, _ := s.Trend(Range{})
	if len(got) != 3 || got[0].ScoreMean != a.ScoreMean || got[1].ScoreMean != b.ScoreMean ||
		!got[1].Start.Equal(a.Start.Add(time.Millisecond)) || !got[2].Start.Equal(a.Start.Add(2*time.Millisecond)) {
		t.Errorf("got %+v", got)
	}
	if st := mustStats(t, s); st.Shifted != 2 {
		t.Errorf("Shifted %d, want 2", st.Shifted)
	}
}

func TestTrendValidation(t *testing.T) {
	s := mustOpen(t, testOptions())
	mod := func(f func(p *TrendPoint)) TrendPoint {
		p := trendAt(t0, 1)
		f(&p)
		return p
	}
	cases := []struct {
		name string
		p    TrendPoint
		says string
	}{
		{"zero start", mod(func(p *TrendPoint) { p.Start = time.Time{} }), "zero time"},
		{"negative windows", mod(func(p *TrendPoint) { p.Windows = -1 }), "windows -1"},
		{"mean above max", mod(func(p *TrendPoint) { p.ScoreMean = 9 }), "min <= mean <= max"},
		{"NaN score", mod(func(p *TrendPoint) { p.ScoreMin = math.NaN() }), "score_min is NaN"},
		{"digital silence", mod(func(p *TrendPoint) { p.RMSMeanDBFS = math.Inf(-1) }), "floor digital silence"},
		{"running fraction above 1", mod(func(p *TrendPoint) { p.RunningFraction = 1.5 }), "running_fraction 1.5"},
		{"undefined alarm state", mod(func(p *TrendPoint) { p.Alarm = 200 }), "alarm state 200"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := s.AddTrend(c.p)
			if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.says) {
				t.Errorf("error %v, want ErrInvalid mentioning %q", err, c.says)
			}
		})
	}
	if st := mustStats(t, s); st.Pending != 0 {
		t.Errorf("refused points were buffered: %d", st.Pending)
	}
}

func TestAlarmStateString(t *testing.T) {
	cases := []struct {
		a    AlarmState
		want string
	}{{AlarmNormal, "normal"}, {AlarmLatched, "latched"}, {AlarmUnknown, "unknown"}, {42, "alarm_state(42)"}}
	for _, c := range cases {
		if got := c.a.String(); got != c.want {
			t.Errorf("%d: %q, want %q", uint8(c.a), got, c.want)
		}
	}
}

func TestSummaryRoundTripAndValidation(t *testing.T) {
	s := mustOpen(t, testOptions())
	for i := 23; i >= 0; i-- {
		if err := s.AddSummary(summaryAt(t0, i)); err != nil {
			t.Fatal(err)
		}
	}
	mustFlush(t, s)
	got, err := s.Summaries(Range{From: t0.Add(time.Hour), Limit: 100})
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 23 {
		t.Fatalf("%d summaries, want 23", len(got))
	}
	for i, m := range got {
		if want := summaryAt(t0, i+1); !reflect.DeepEqual(m, want) {
			t.Fatalf("summary %d\n%+v\nwant\n%+v", i, m, want)
		}
	}
	mod := func(f func(m *Summary)) Summary {
		m := summaryAt(t0, 1)
		f(&m)
		return m
	}
	cases := []struct {
		name string
		m    Summary
		says string
	}{
		{"p95 above max", mod(func(m *Summary) { m.ScoreP95 = 0.9 }), "score_p95 0.9"},
		{"negative alarm seconds", mod(func(m *Summary) { m.AlarmSeconds = -1 }), "alarm_s -1"},
		{"negative overruns", mod(func(m *Summary) { m.Overruns = -2 }), "overruns -2"},
		{"before 1970", mod(func(m *Summary) { m.Start = time.Unix(-3600, 0) }), "before 1970"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := s.AddSummary(c.m)
			if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.says) {
				t.Errorf("error %v, want ErrInvalid mentioning %q", err, c.says)
			}
		})
	}
}

func TestBacklogRefusesWithoutLosingBuffered(t *testing.T) {
	s := mustOpen(t, testOptions())
	for i := 0; i < MaxPending; i++ {
		if err := s.AddTrend(trendAt(t0, i)); err != nil {
			t.Fatal(err)
		}
	}
	if err := s.AddSummary(summaryAt(t0, 0)); !errors.Is(err, ErrBacklog) {
		t.Errorf("summary beyond MaxPending: %v, want ErrBacklog", err)
	}
	if err := s.AddTrend(trendAt(t0, MaxPending)); !errors.Is(err, ErrBacklog) {
		t.Errorf("point beyond MaxPending: %v, want ErrBacklog", err)
	}
	mustFlush(t, s)
	if st := mustStats(t, s); st.Trend != MaxPending || st.Pending != 0 {
		t.Errorf("after flush: %d stored, %d pending; want %d, 0", st.Trend, st.Pending, MaxPending)
	}
	if err := s.AddTrend(trendAt(t0, MaxPending)); err != nil {
		t.Errorf("after flush: %v", err)
	}
}
