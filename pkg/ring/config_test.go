package ring

import (
	"errors"
	"testing"
)

func TestNewSizes(t *testing.T) {
	cases := []struct {
		name     string
		cfg      Config
		wantCap  int
		wantGaps int
		wantErr  error
	}{
		{"one sample", Config{Samples: 1}, 1, DefaultGaps, nil},
		{"power of two kept", Config{Samples: 4096}, 4096, DefaultGaps, nil},
		{"rounded up", Config{Samples: 1000, Gaps: 5}, 1024, 8, nil},
		{"just above a power", Config{Samples: 1025}, 2048, DefaultGaps, nil},
		{"largest", Config{Samples: MaxSamples, Gaps: MaxGaps}, MaxSamples, MaxGaps, nil},
		{"zero samples", Config{}, 0, 0, ErrCapacity},
		{"negative samples", Config{Samples: -8}, 0, 0, ErrCapacity},
		{"too many samples", Config{Samples: MaxSamples + 1}, 0, 0, ErrCapacity},
		{"negative gaps", Config{Samples: 8, Gaps: -1}, 0, 0, ErrGapQueue},
		{"too many gaps", Config{Samples: 8, Gaps: MaxGaps + 1}, 0, 0, ErrGapQueue},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			// sizes, not New, so the largest case does not allocate 2 GiB.
			n, g, err := c.cfg.sizes()
			if !errors.Is(err, c.wantErr) {
				t.Fatalf("error %v, want %v", err, c.wantErr)
			}
			if n != c.wantCap || g != c.wantGaps {
				t.Errorf("sizes %d, %d; want %d, %d", n, g, c.wantCap, c.wantGaps)
			}
		})
	}
}

func TestNewErrorMessage(t *testing.T) {
	_, err := New(Config{Samples: 0})
	if err == nil || err.Error() != "ring: capacity out of range: Samples is 0, want 1..1073741824" {
		t.Errorf("error %q", err)
	}
}
