package sim

// SyncSpeedRPM returns the synchronous speed in rpm of an induction motor with
// the given number of poles fed at supplyHz: 120 f / poles.
// Source: the standard synchronous-speed relation (e.g. S. J. Chapman,
// Electric Machinery Fundamentals, ch. on induction machines; from memory).
func SyncSpeedRPM(supplyHz float64, poles int) float64 {
	return 120 * supplyHz / float64(poles)
}

// ShaftHz returns the shaft rotation rate in Hz of an induction motor with the
// given number of poles fed at supplyHz and running at the given slip (a
// fraction, typically 0.01 to 0.03): fr = f (2 / poles) (1 - slip).
// Source: as SyncSpeedRPM, with slip s = (ns - n) / ns.
func ShaftHz(supplyHz float64, poles int, slip float64) float64 {
	return supplyHz * 2 / float64(poles) * (1 - slip)
}
