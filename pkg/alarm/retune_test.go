package alarm

import (
	"errors"
	"testing"
	"time"
)

func TestRetuneKeepsStateAndRefusesUnsafeChanges(t *testing.T) {
	cfg := DefaultConfig()
	cfg.AlarmThreshold, cfg.WarnThreshold = 0.8, 0
	tr, err := NewTracker(cfg)
	if err != nil {
		t.Fatal(err)
	}
	now := time.Date(2026, 12, 1, 3, 0, 0, 0, time.UTC)
	var ev []Event
	for i := range 3 {
		ev = tr.Observe(ev[:0], now.Add(time.Duration(i)*2*time.Second), Window{Score: 0.9, Running: true})
	}
	if tr.State() != StateUnacked {
		t.Fatalf("state %v after three windows over, want UNACK", tr.State())
	}
	longer := cfg
	longer.OffDelay = time.Minute
	if err := tr.Retune(longer); err != nil {
		t.Fatal(err)
	}
	if tr.State() != StateUnacked {
		t.Error("retune changed the state")
	}
	// With the 60 s off-delay now in force, 40 s below the clear level must
	// not clear (the old 20 s would have).
	for i := range 20 {
		ev = tr.Observe(ev[:0], now.Add(time.Duration(10+2*i)*time.Second), Window{Score: 0.1, Running: true})
	}
	if tr.State() != StateUnacked {
		t.Errorf("cleared after 40 s with a 60 s off-delay: state %v", tr.State())
	}
	for _, bad := range []func(*Config){
		func(c *Config) { c.K, c.N = 2, 5 },
		func(c *Config) { c.AlarmThreshold = 0.7 },
	} {
		c := longer
		bad(&c)
		if err := tr.Retune(c); !errors.Is(err, ErrConfig) {
			t.Errorf("unsafe retune %+v: err %v, want ErrConfig", c, err)
		}
	}
}
