package sim

// Options sizes a data set. The zero value of a field means "use the default".
type Options struct {
	// Seed picks the machine and every clip; equal seeds give equal data.
	Seed int64
	// Rate is the sample rate in Hz (default 16000).
	Rate int
	// ClipSeconds is the length of each clip in seconds (default 10).
	ClipSeconds float64
	// TrainClips is the number of healthy training clips (default 60).
	TrainClips int
	// TestNormal is the number of healthy test clips (default 100).
	TestNormal int
	// TestPerFaultSeverity is the number of test clips for every pair of
	// fault and severity (default 5).
	TestPerFaultSeverity int
}

// DefaultOptions returns the default sizes for the given seed: 16000 Hz,
// 10 s clips, 60 training clips, 100 healthy test clips and 5 test clips per
// fault and severity (9 faults x 3 severities x 5 = 135 anomalous clips).
func DefaultOptions(seed int64) Options {
	return Options{Seed: seed, Rate: 16000, ClipSeconds: 10, TrainClips: 60, TestNormal: 100, TestPerFaultSeverity: 5}
}

// withDefaults fills the zero fields with the defaults.
func (o Options) withDefaults() Options {
	d := DefaultOptions(o.Seed)
	if o.Rate <= 0 {
		o.Rate = d.Rate
	}
	if o.ClipSeconds <= 0 {
		o.ClipSeconds = d.ClipSeconds
	}
	if o.TrainClips <= 0 {
		o.TrainClips = d.TrainClips
	}
	if o.TestNormal <= 0 {
		o.TestNormal = d.TestNormal
	}
	if o.TestPerFaultSeverity <= 0 {
		o.TestPerFaultSeverity = d.TestPerFaultSeverity
	}
	return o
}
