package capture

import "errors"

// Sentinel errors. Errors from this package wrap one of these (or an error
// from PortAudio) and say what to do about it.
var (
	// ErrNoLiveCapture is returned by New and Devices in a build without
	// cgo, which cannot use PortAudio.
	ErrNoLiveCapture = errors.New("capture: this build has no live capture (built without cgo); use a WAV file or stdin source")

	// ErrConfig is returned by New when a Config field is out of range;
	// the message names the field.
	ErrConfig = errors.New("capture: bad config")

	// ErrNoDevice is returned when no input device matches Config.Device,
	// or there is no default input device; the message lists the input
	// devices that exist.
	ErrNoDevice = errors.New("capture: no such input device")

	// ErrAmbiguousDevice is returned when Config.Device is a substring of
	// several input devices' names; the message lists them.
	ErrAmbiguousDevice = errors.New("capture: device name matches several inputs")

	// ErrNoInput is returned when the device Config.Device names has fewer
	// input channels than Config.Channels (often none: an output-only
	// device, or an input whose hardware is absent).
	ErrNoInput = errors.New("capture: device has too few input channels")

	// ErrInputOverflow is the Err of a KindInputOverflow diagnostic:
	// PortAudio reported that input samples were discarded before the
	// buffer it returned. It is never returned to the consumer.
	ErrInputOverflow = errors.New("capture: input overflowed: samples were lost before this buffer")
)
