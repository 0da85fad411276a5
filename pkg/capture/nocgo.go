//go:build !cgo

package capture

// Devices returns ErrNoLiveCapture: this build has no PortAudio.
func Devices() ([]Device, error) { return nil, ErrNoLiveCapture }

// New returns ErrNoLiveCapture (after checking cfg, so a bad config is
// still reported as such): this build has no PortAudio.
func New(cfg Config) (*Capture, error) {
	if _, err := cfg.withDefaults(); err != nil {
		return nil, err
	}
	return nil, ErrNoLiveCapture
}
