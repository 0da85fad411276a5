// Package capture listens to a live input device through PortAudio and
// hands the sound to the analysis pipeline as an audio.Source, keeping the
// device read loop apart from the consumer by a ring buffer and reporting
// every sample it could not deliver.
//
// # Structure
//
// New opens the configured device (Config.Device: a name substring, an
// index as listed by Devices, or empty for the default input) and starts
// one goroutine that does nothing but blocking PortAudio reads of
// Config.FramesPerRead frames, keeps one channel or mixes them (Channel
// -1: the mean rounded half up, the rule pkg/audio uses), and writes the
// mono int16 block into a ring.Buffer. It never waits on the consumer: when
// the consumer falls behind, the ring drops the newest samples and counts
// them. The consumer side, Read and ReadContext, implements audio.Source.
// Close stops the goroutine and waits for it; the consumer then drains what
// was captured and gets io.EOF.
//
// # Faults
//
// Nothing is lost silently. Each of these becomes a Diagnostic on the
// Diagnostics channel and a counter in Stats:
//
//   - Input overflow: PortAudio's blocking read says samples were lost
//     before the buffer it has just filled (paInputOverflowed, reported
//     after filling the buffer). The buffer is kept; the gap is counted.
//   - Ring overrun: the consumer fell behind; reported with the exact
//     number of samples dropped once the gap ends.
//   - Slow read: a read took much longer than its buffer lasts
//     (Config.SlowRead).
//   - Device error: a read failed for another reason (device unplugged,
//     driver error). The stream is closed and reopened with exponential
//     back-off (Config.ReopenMin doubling up to Config.ReopenMax); each
//     failed attempt and the eventual reopen are reported. Reopening ends
//     this package's PortAudio reference first, so PortAudio enumerates
//     the devices again and finds a microphone plugged back in, provided
//     nothing else in the process holds PortAudio open at that moment.
//
// A read that never returns (a wedged driver) cannot be interrupted safely
// from outside; LastReadAge tells a supervisor how long ago the last read
// completed, so it can restart the process (systemd's watchdog).
//
// # Positions
//
// SamplePos in a Diagnostic counts mono samples read from the device since
// New, across reopens, including those the ring dropped: the device's
// sample clock. StreamPos counts the samples that went into the stream the
// consumer reads: the consumer's read position at which the event lies.
//
// # PortAudio and cgo
//
// The PortAudio binding needs cgo. In a build without cgo, New and Devices
// return ErrNoLiveCapture and the agent falls back to WAV files or stdin.
// PortAudio's initialisation is process-wide and reference-counted: each
// Capture holds one reference from New to the end of its goroutine, and
// Devices takes one for the duration of the call. The one package-level
// variable is a mutex that serialises every call into PortAudio's shared
// state (initialisation, device lists, opening and closing streams),
// because the Go binding keeps those in unsynchronised package variables;
// blocking reads run outside it.
//
// Tests run against a real PortAudio device without sound hardware: ALSA's
// file plugin, set up as described in PLATFORM-NOTES.md.
package capture
