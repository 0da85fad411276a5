package features

import (
	"errors"
	"strings"
	"testing"
)

// TestConfigValidate checks that every invalid field is reported by name.
func TestConfigValidate(t *testing.T) {
	if err := DefaultConfig().Validate(); err != nil {
		t.Fatalf("DefaultConfig invalid: %v", err)
	}
	for _, tc := range []struct {
		field string
		edit  func(*Config)
	}{
		{"Rate", func(c *Config) { c.Rate = 0 }},
		{"FrameLen", func(c *Config) { c.FrameLen = 1000 }},
		{"FrameLen", func(c *Config) { c.FrameLen = 2 }},
		{"Hop", func(c *Config) { c.Hop = 0 }},
		{"Mels", func(c *Config) { c.Mels = -1 }},
		{"FMin", func(c *Config) { c.FMin = -5 }},
		{"FMax", func(c *Config) { c.FMax = 9000 }},
		{"FMax", func(c *Config) { c.FMin, c.FMax = 4000, 3000 }},
		{"FloorDB", func(c *Config) { c.FloorDB = -1000 }},
	} {
		t.Run(tc.field, func(t *testing.T) {
			c := DefaultConfig()
			tc.edit(&c)
			err := c.Validate()
			if !errors.Is(err, ErrConfig) || !strings.Contains(err.Error(), tc.field) || !strings.HasPrefix(err.Error(), "features: ") {
				t.Errorf("Validate() = %v, want ErrConfig naming %s", err, tc.field)
			}
			if _, err := NewExtractor(c); !errors.Is(err, ErrConfig) {
				t.Errorf("NewExtractor error = %v, want ErrConfig", err)
			}
		})
	}
}
