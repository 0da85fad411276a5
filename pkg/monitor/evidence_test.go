package monitor

import "testing"

func TestEvidenceClipHoldsSoundAroundTheTrigger(t *testing.T) {
	e := newEvidence(5, 3)
	var done []pendingClip
	ramp := func(from, n int) []int16 {
		b := make([]int16, n)
		for i := range b {
			b[i] = int16(from + i)
		}
		return b
	}
	done = e.push(ramp(0, 4), done)
	done = e.push(ramp(4, 4), done) // 8 samples seen; the last 5 are 3..7
	if !e.trigger(42, 0) {
		t.Fatal("trigger refused")
	}
	done = e.push(ramp(8, 2), done)
	if len(done) != 0 {
		t.Fatal("clip complete too early")
	}
	done = e.push(ramp(10, 4), done)
	if len(done) != 1 {
		t.Fatalf("got %d clips", len(done))
	}
	c := done[0]
	if c.eventSeq != 42 || c.start != 3 || len(c.samples) != 8 {
		t.Fatalf("clip %+v", c)
	}
	for i, v := range c.samples {
		if int(v) != 3+i {
			t.Fatalf("sample %d = %d, want %d", i, v, 3+i)
		}
	}
	// Before the ring has filled, the clip starts at the stream's start.
	e2 := newEvidence(100, 0)
	e2.push(ramp(0, 10), nil)
	e2.trigger(1, 0)
	if got := e2.push(nil, nil); len(got) != 1 || len(got[0].samples) != 10 || got[0].start != 0 {
		t.Fatalf("short clip %+v", got)
	}
	if a := testing.AllocsPerRun(100, func() { done = e.push(ramp(0, 0), done) }); a != 0 {
		t.Errorf("push allocates %v times", a)
	}
}
