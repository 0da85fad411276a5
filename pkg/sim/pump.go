package sim

// VanePassHz returns the blade (vane) passing frequency in Hz of an impeller
// with the given number of vanes turning at shaftHz: vanes x fr.
// Source: the usual blade-pass relation of rotating machinery (e.g. R. B.
// Randall, Vibration-based Condition Monitoring, 2011; from memory).
func VanePassHz(vanes int, shaftHz float64) float64 {
	return float64(vanes) * shaftHz
}
