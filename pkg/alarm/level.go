package alarm

import (
	"math/bits"
	"time"
)

// level is the debounced condition of one severity: K of the last N
// running windows over the threshold to become present, and an unbroken
// run below the clear level lasting OffDelay to clear.
type level struct {
	threshold  float64   // a running window is over when Score >= threshold
	clear      float64   // ClearFraction × threshold
	mask       uint64    // the low N bits
	hist       uint64    // bit i set when the running window i steps back was over
	present    bool      // the condition is present
	below      bool      // inside an unbroken run of running windows below clear
	belowSince time.Time // time of the first window of that run
}

func newLevel(threshold, clearFraction float64, n int) level {
	mask := ^uint64(0)
	if n < 64 {
		mask = 1<<uint(n) - 1
	}
	return level{threshold: threshold, clear: clearFraction * threshold, mask: mask}
}

// over returns how many of the last N running windows were over.
func (l *level) over() int { return bits.OnesCount64(l.hist) }

// step feeds one running window scored score at time now.
func (l *level) step(now time.Time, score float64, k int, offDelay time.Duration) {
	var bit uint64
	if score >= l.threshold {
		bit = 1
	}
	l.hist = (l.hist<<1 | bit) & l.mask
	if !l.present {
		if l.over() >= k {
			l.present, l.below = true, false
		}
		return
	}
	if score >= l.clear {
		l.below = false
		return
	}
	if !l.below {
		l.below, l.belowSince = true, now
	}
	if now.Sub(l.belowSince) >= offDelay {
		l.present, l.below, l.hist = false, false, 0
	}
}

// force makes the condition present without a history, used to keep the
// alarm level's condition implying the warning level's.
func (l *level) force() { l.present, l.below = true, false }

// pause handles a skipped window: it interrupts the off-delay run.
func (l *level) pause() { l.below = false }
