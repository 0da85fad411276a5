//go:build !cgo

package capture

import (
	"errors"
	"testing"
)

func TestWithoutCgo(t *testing.T) {
	cases := []struct {
		name string
		call func() error
		want error
	}{
		{"New", func() error { _, err := New(Config{Device: "testmic"}); return err }, ErrNoLiveCapture},
		{"New with a bad config reports the config", func() error { _, err := New(Config{Channel: 3}); return err }, ErrConfig},
		{"Devices", func() error { _, err := Devices(); return err }, ErrNoLiveCapture},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if err := c.call(); !errors.Is(err, c.want) {
				t.Errorf("error %v, want %v", err, c.want)
			}
		})
	}
	if got := ErrNoLiveCapture.Error(); got != "capture: this build has no live capture (built without cgo); use a WAV file or stdin source" {
		t.Errorf("message %q", got)
	}
}
