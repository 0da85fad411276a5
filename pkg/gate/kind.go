package gate

// Kind names one sensor diagnostic. Each Kind has its own state (ok or
// fault) and its own debouncing.
type Kind uint8

// The sensor diagnostics. Sensor raises all but KindNoData.
const (
	// KindNoData means the capture layer delivered no samples (device lost,
	// stream stalled). Sensor never raises it: the capture layer detects it
	// and reports it as a SensorEvent of this Kind, so every diagnostic
	// reaches the agent through the same path. Value and Limit are seconds
	// without data and the allowed gap.
	KindNoData Kind = iota
	// KindSilence is digital silence or a dead input: the largest |sample|
	// of an interval is at most SensorConfig.SilencePeak. Value and Limit
	// are in LSB (1 LSB = 1/32768 of full scale).
	KindSilence
	// KindClipping is the share of samples at full scale (x >= 32767 or
	// x <= -32767) above SensorConfig.ClipFraction. Value and Limit are
	// fractions of the interval's samples.
	KindClipping
	// KindDCOffset is a mean sample value beyond SensorConfig.DCFraction of
	// full scale. Value is the signed mean as a fraction of full scale
	// (32768), Limit the allowed magnitude.
	KindDCOffset
	// KindStuck is one sample value repeated for at least
	// SensorConfig.StuckSeconds: a converter or driver stuck on a value.
	// Value and Limit are seconds.
	KindStuck
	// KindFewLevels is an interval that uses at most SensorConfig.FewLevels
	// distinct sample values: a square pattern, stuck bits, a converter
	// that toggles between a few codes. Value and Limit are counts.
	KindFewLevels
	// NumKinds is the number of Kinds; Kind values are below it.
	NumKinds
)

var kindNames = [NumKinds]string{"no_data", "silence", "clipping", "dc_offset", "stuck", "few_levels"}

// String returns the Kind's snake_case name, as used in published messages
// ("no_data", "silence", "clipping", "dc_offset", "stuck", "few_levels").
func (k Kind) String() string {
	if k < NumKinds {
		return kindNames[k]
	}
	return "unknown"
}

// SensorEvent is a change of one diagnostic's state.
type SensorEvent struct {
	// Kind is the diagnostic.
	Kind Kind
	// Active is true when the fault was raised, false when it cleared.
	Active bool
	// SamplePos is the stream position, in samples, of the end of the
	// interval that raised or cleared the fault.
	SamplePos int64
	// Value is what that interval measured, in the Kind's unit.
	Value float64
	// Limit is the configured limit, in the same unit.
	Limit float64
}
