package alarm_test

import (
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
)

// The on-delay: a condition is raised when K of the last N running windows
// are over the threshold (Score >= threshold), never before.
func TestOnDelayKOfN(t *testing.T) {
	tests := []struct {
		name    string
		k, n    int
		pattern string
		want    int // index of the window that raises, -1 for none
	}{
		{"single spike never raises", 3, 5, "uuauuuuuu", -1},
		{"two spikes in five do not raise", 3, 5, "auuua", -1},
		{"three in a row raise on the third", 3, 5, "uuaaa", 4},
		{"three spread over five raise", 3, 5, "auaua", 4},
		{"three spread over six do not raise", 3, 5, "auuaua", -1},
		{"hovering below the threshold never raises", 3, 5, rep("h", 50), -1},
		{"exactly at the threshold counts as over", 3, 5, "AAA", 2},
		{"just below the clear level is not over", 3, 5, "ccccc", -1},
		{"stopped windows are skipped, not under", 3, 5, "aa----a", 6},
		{"a long stop keeps the history", 3, 5, "aa" + rep("-", 200) + "a", 202},
		{"high scores while stopped do not count", 3, 5, rep("-", 10), -1},
		{"NaN scores are skipped", 3, 5, "aanna", 4},
		{"under windows push old overs out", 3, 5, "aauuuua", -1},
		{"1 of 1 raises on the first over", 1, 1, "uua", 2},
		{"5 of 5 needs five in a row", 5, 5, "aaaauaaaaa", 9},
		{"5 of 10 counts across gaps", 5, 10, "auauauauau" + "a", 8},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			cfg := testConfig(false)
			cfg.K, cfg.N = tc.k, tc.n
			d := newDriver(t, cfg)
			steps := d.feed(tc.pattern)
			if got := firstIndex(steps, alarm.Raised); got != tc.want {
				t.Errorf("raised at window %d, want %d (pattern %q)", got, tc.want, tc.pattern)
			}
			if tc.want >= 0 {
				e := steps[tc.want][0]
				if e.Over < tc.k || e.N != tc.n || e.Threshold != alarmAt {
					t.Errorf("raise event says %d of %d over %g, want >= %d of %d over %g", e.Over, e.N, e.Threshold, tc.k, tc.n, alarmAt)
				}
			}
		})
	}
}

// Hysteresis and off-delay: once raised, a condition clears only after
// OffDelay of unbroken running windows below ClearFraction × threshold.
// Windows are 2 s apart and OffDelay is 20 s, so offWindows = 11 windows
// below the clear level clear it (the first starts the run at t, the 11th
// comes at t+20 s).
func TestClearHysteresisOffDelay(t *testing.T) {
	const raise = "aaa" // raises at window 2
	tests := []struct {
		name     string
		offDelay int // in steps; -1 for the default
		after    string
		want     int // index within after of the window that clears, -1 for none
	}{
		{"below the clear level for OffDelay clears", -1, rep("u", 30), offWindows - 1},
		{"one window short of OffDelay keeps it", -1, rep("u", offWindows-1), -1},
		{"hovering between clear level and threshold keeps it", -1, rep("h", 500), -1},
		{"exactly at the clear level is not below", -1, rep("c", 500), -1},
		{"one hover restarts the off-delay", -1, rep("u", 9) + "h" + rep("u", 30), 9 + 1 + offWindows - 1},
		{"one over window restarts the off-delay", -1, rep("u", 9) + "a" + rep("u", 30), 9 + 1 + offWindows - 1},
		{"stopped windows interrupt the off-delay", -1, rep("u", 9) + rep("-", 5) + rep("u", 30), 9 + 5 + offWindows - 1},
		{"a long stop neither clears nor counts", -1, rep("-", 1000), -1},
		{"NaN windows interrupt the off-delay", -1, rep("u", 9) + "n" + rep("u", 30), 9 + 1 + offWindows - 1},
		{"zero OffDelay clears at the first window below", 0, "hhu", 2},
		{"one-step OffDelay needs two windows below", 1, "hhuhuu", 5},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			cfg := testConfig(false)
			if tc.offDelay >= 0 {
				cfg.OffDelay = step * time.Duration(tc.offDelay)
			}
			d := newDriver(t, cfg)
			if got := firstIndex(d.feed(raise), alarm.Raised); got != 2 {
				t.Fatalf("setup: raised at %d, want 2", got)
			}
			steps := d.feed(tc.after)
			if got := firstIndex(steps, alarm.Cleared); got != tc.want {
				t.Errorf("cleared at window %d after the raise, want %d", got, tc.want)
			}
			if got := firstIndex(steps, alarm.Raised); got != -1 {
				t.Errorf("raised again at window %d after the raise", got)
			}
			wantState := alarm.StateUnacked
			if tc.want >= 0 {
				wantState = alarm.StateReturnedUnacked
			}
			if s := d.tr.State(); s != wantState {
				t.Errorf("state %s, want %s", s, wantState)
			}
		})
	}
}

// A cleared condition needs K fresh over windows to return: the history is
// emptied at the clear, so old over windows cannot re-raise at once.
func TestClearEmptiesHistory(t *testing.T) {
	cfg := testConfig(false)
	cfg.OffDelay = 0
	d := newDriver(t, cfg)
	steps := d.feed("aaauaaa")
	if got := firstIndex(steps, alarm.Cleared); got != 3 {
		t.Fatalf("cleared at %d, want 3", got)
	}
	// Without emptying, window 4 would see 4 of the last 5 over.
	if got := firstIndex(steps[4:], alarm.Raised); got != 2 {
		t.Errorf("raised again %d windows after the clear, want 3rd window (index 2)", got)
	}
}
