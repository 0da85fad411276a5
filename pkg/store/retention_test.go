package store

import (
	"strings"
	"testing"
	"time"
)

func TestRetentionByAge(t *testing.T) {
	clk := newClock(t0)
	opt := Options{FlushInterval: -1, Now: clk.Now, MaxAge: Ages{Summaries: -1}} // summaries forever
	s := mustOpen(t, opt)
	ago := func(d time.Duration) time.Time { return t0.Add(-d) }
	wav := makeWAV(8000, 800)
	cases := []struct {
		name string
		at   time.Time
		keep bool
		add  func(at time.Time) error
	}{
		{"event older than 5 years", ago(5*365*day + time.Hour), false, func(at time.Time) error { _, err := s.AppendEvent(eventAt(at, 0)); return err }},
		{"event of yesterday", ago(day), true, func(at time.Time) error { _, err := s.AppendEvent(eventAt(at, 0)); return err }},
		{"trend of 401 days ago", ago(401 * day), false, func(at time.Time) error { return s.AddTrend(trendAt(at, 0)) }},
		{"trend of 399 days ago", ago(399 * day), true, func(at time.Time) error { return s.AddTrend(trendAt(at, 0)) }},
		{"clip of 91 days ago", ago(91 * day), false, func(at time.Time) error { _, err := s.PutClip(Clip{Start: at, WAV: wav}); return err }},
		{"clip of 89 days ago", ago(89 * day), true, func(at time.Time) error { _, err := s.PutClip(Clip{Start: at, WAV: wav}); return err }},
		{"summary of 10 years ago, kept forever", ago(10 * 365 * day), true, func(at time.Time) error { return s.AddSummary(summaryAt(at, 0)) }},
	}
	for _, c := range cases {
		if err := c.add(c.at); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
	}
	mustFlush(t, s)
	evs, _ := s.Events(EventQuery{})
	trend, _ := s.Trend(Range{})
	clips, _ := s.Clips(Range{})
	sums, _ := s.Summaries(Range{})
	has := map[time.Time]bool{}
	for _, e := range evs {
		has[e.Time] = true
	}
	for _, p := range trend {
		has[p.Start] = true
	}
	for _, c := range clips {
		has[c.Start] = true
	}
	for _, m := range sums {
		has[m.Start] = true
	}
	for _, c := range cases {
		if has[c.at] != c.keep {
			t.Errorf("%s: kept %v, want %v", c.name, has[c.at], c.keep)
		}
	}
	if st := mustStats(t, s); st.Pruned != 3 {
		t.Errorf("Pruned %d, want 3", st.Pruned)
	}
}

// TestRetentionBudget checks one pass deletes at most pruneBudget records
// and the next flush continues although PruneInterval has not passed.
func TestRetentionBudget(t *testing.T) {
	clk := newClock(t0)
	s := mustOpen(t, Options{FlushInterval: -1, Now: clk.Now})
	old := t0.Add(-500 * day)
	const n = pruneBudget + 500
	for i := 0; i < n; i++ {
		if err := s.AddTrend(trendAt(old, i)); err != nil {
			t.Fatal(err)
		}
	}
	// A flush prunes by age at once, so write them with the clock set back
	// to their own time, then bring it forward.
	clk.Set(old)
	mustFlush(t, s)
	clk.Set(t0)
	want := []struct{ trend, pruned int }{{500, pruneBudget}, {0, n}, {0, n}}
	for i, w := range want {
		// Pass 2 runs because pass 1 ran out of budget, not because an hour
		// passed; pass 3 finds nothing due and writes nothing.
		clk.Set(t0.Add(time.Duration(i) * time.Minute))
		before := mustStats(t, s).Commits
		mustFlush(t, s)
		st := mustStats(t, s)
		if st.Trend != w.trend || st.Pruned != int64(w.pruned) {
			t.Errorf("pass %d: %d trend points, %d pruned; want %d, %d", i+1, st.Trend, st.Pruned, w.trend, w.pruned)
		}
		if i == 2 && st.Commits != before {
			t.Errorf("pass 3 committed although nothing was due")
		}
	}
}

func TestRetentionBySize(t *testing.T) {
	const capBytes = 1 << 20
	forever := Ages{Events: -1, Trend: -1, Summaries: -1, Clips: -1}
	type fill struct{ events, trend, clips, summaries int }
	cases := []struct {
		name string
		fill fill
		// keepEvents and keepSummaries: that kind must survive whole.
		keepEvents, keepSummaries bool
	}{
		{"trend and clips go first", fill{events: 100, trend: 20000, clips: 20, summaries: 300}, true, true},
		{"summaries go before events", fill{events: 300, summaries: 12000}, true, false},
		{"events go last", fill{events: 1200}, false, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := mustOpen(t, Options{FlushInterval: -1, Now: newClock(t0).Now, MaxBytes: capBytes, MaxAge: forever})
			start := t0.Add(-30 * day)
			// Clips spread over the trend's time span, one per 1000 minutes.
			for i := 0; i < c.fill.trend; i++ {
				if err := s.AddTrend(trendAt(start, i)); err != nil {
					t.Fatal(err)
				}
				if i%1000 == 999 && i/1000 < c.fill.clips {
					if _, err := s.PutClip(Clip{Start: start.Add(time.Duration(i) * time.Minute), WAV: makeWAV(16000, 32000)}); err != nil {
						t.Fatal(err)
					}
				}
				if i%1000 == 999 {
					mustFlush(t, s) // as the agent would; retention already acts
				}
			}
			for i := 0; i < c.fill.summaries; i++ {
				if err := s.AddSummary(summaryAt(start, i)); err != nil {
					t.Fatal(err)
				}
				if i%1000 == 999 {
					mustFlush(t, s)
				}
			}
			// Events are synced one by one, so make them large and few.
			long := strings.Repeat("Obrinvale raw-water lift station, P-492B: score over threshold. ", 15)
			for i := 0; i < c.fill.events; i++ {
				e := eventAt(start, i)
				e.Message = long
				if _, err := s.AppendEvent(e); err != nil {
					t.Fatal(err)
				}
			}
			passes := 0
			for ; passes < 100; passes++ {
				mustFlush(t, s)
				st := mustStats(t, s)
				if st.LiveBytes <= capBytes && st.Pending == 0 && !s.morePrune {
					break
				}
			}
			st := mustStats(t, s)
			t.Logf("%d passes; live %d, data %d, file %d bytes; events %d, trend %d, clips %d, summaries %d; pruned %d",
				passes+1, st.LiveBytes, st.DataBytes, st.FileBytes, st.Events, st.Trend, st.Clips, st.Summaries, st.Pruned)
			if st.LiveBytes > capBytes {
				t.Fatalf("live bytes %d still over the cap %d after %d flushes", st.LiveBytes, capBytes, passes)
			}
			if st.Pruned == 0 {
				t.Fatal("nothing was pruned: the fill did not exceed the cap")
			}
			if c.keepEvents && st.Events != c.fill.events {
				t.Errorf("%d of %d events left", st.Events, c.fill.events)
			}
			if c.keepSummaries && st.Summaries != c.fill.summaries {
				t.Errorf("%d of %d summaries left", st.Summaries, c.fill.summaries)
			}
			if !c.keepSummaries && c.fill.summaries > 0 && st.Events != c.fill.events && st.Summaries > 0 {
				t.Errorf("events were pruned while %d summaries remain", st.Summaries)
			}
			checkSuffix(t, s, c.fill.trend, c.fill.clips, c.fill.events, start)
		})
	}
}

// checkSuffix checks that what is left of each kind is its newest records,
// and that every trend point and clip left is newer than every one deleted
// (clip k was stored at minute 1000k-1 of the fill).
func checkSuffix(t *testing.T, s *Store, nTrend, nClips, nEvents int, start time.Time) {
	t.Helper()
	trend, _ := s.Trend(Range{Limit: 1 << 30})
	for i, p := range trend {
		if want := nTrend - len(trend) + i; !p.Start.Equal(trendAt(start, want).Start) {
			t.Fatalf("trend left is not the newest %d points: point %d starts %v", len(trend), i, p.Start)
		}
	}
	clips, _ := s.Clips(Range{})
	for i, c := range clips {
		if want := uint64(nClips - len(clips) + i + 1); c.ID != want {
			t.Fatalf("clips left are not the newest %d: clip %d has id %d", len(clips), i, c.ID)
		}
	}
	evs, _ := s.Events(EventQuery{Limit: 1 << 30})
	if len(evs) > 0 && evs[len(evs)-1].Seq != uint64(nEvents) {
		t.Errorf("newest event %d was pruned", nEvents)
	}
	// Trend and clips go in age order: the newest deleted of the pair is
	// older than the oldest kept of the pair.
	var newestDeleted, oldestKept time.Time
	if d := nTrend - len(trend); d > 0 {
		newestDeleted = trendAt(start, d-1).Start
	}
	if d := nClips - len(clips); d > 0 {
		if ct := start.Add(time.Duration(d*1000-1) * time.Minute); ct.After(newestDeleted) {
			newestDeleted = ct
		}
	}
	if len(trend) > 0 {
		oldestKept = trend[0].Start
	}
	if len(clips) > 0 && (oldestKept.IsZero() || clips[0].Start.Before(oldestKept)) {
		oldestKept = clips[0].Start
	}
	if !newestDeleted.IsZero() && !oldestKept.IsZero() && !newestDeleted.Before(oldestKept) {
		t.Errorf("a trend point or clip from %v was deleted while one from %v is kept", newestDeleted, oldestKept)
	}
}
