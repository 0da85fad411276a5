package gate

// debounce holds one diagnostic's state: raised only after the raw fault
// has lasted raise samples, cleared only after it has been gone for clear
// samples. Positions are stream sample positions; -1 means "not since".
type debounce struct {
	active       bool
	faultSince   int64
	okSince      int64
	raise, clear int64
}

func newDebounce(raise, clear int64) debounce {
	return debounce{faultSince: -1, okSince: -1, raise: raise, clear: clear}
}

// step records one interval [start, end) that was faulty or not and reports
// whether the debounced state changed.
func (d *debounce) step(faulty bool, start, end int64) (changed bool) {
	if faulty {
		d.okSince = -1
		if d.faultSince < 0 {
			d.faultSince = start
		}
		if !d.active && end-d.faultSince >= d.raise {
			d.active = true
			return true
		}
		return false
	}
	d.faultSince = -1
	if d.okSince < 0 {
		d.okSince = start
	}
	if d.active && end-d.okSince >= d.clear {
		d.active = false
		return true
	}
	return false
}
