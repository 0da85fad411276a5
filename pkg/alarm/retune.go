package alarm

import "fmt"

// Retune changes the settings that are safe to change while alarms are
// live: ClearFraction, OffDelay, Latch and MaxShelve. The state, the history
// of over windows and any shelve are kept. Thresholds, K and N shape the
// history itself and cannot change in place: a cfg that differs in them is
// refused with an error wrapping ErrConfig, and nothing changes.
func (t *Tracker) Retune(cfg Config) error {
	if err := cfg.Validate(); err != nil {
		return err
	}
	old := t.cfg
	if cfg.AlarmThreshold != old.AlarmThreshold || cfg.WarnThreshold != old.WarnThreshold || cfg.K != old.K || cfg.N != old.N {
		return fmt.Errorf("%w: thresholds and the k-of-n debounce cannot change while running (restart to apply them)", ErrConfig)
	}
	t.cfg = cfg
	for i := range t.levels {
		t.levels[i].clear = cfg.ClearFraction * t.levels[i].threshold
	}
	return nil
}
