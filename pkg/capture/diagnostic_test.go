package capture

import (
	"errors"
	"testing"
	"time"
)

func TestDiagnosticString(t *testing.T) {
	at := time.Date(2031, 3, 14, 2, 0, 0, 0, time.UTC)
	cases := []struct {
		name string
		d    Diagnostic
		want string
	}{
		{"opened", Diagnostic{Kind: KindOpened, Device: `"testmic" (index 0, ALSA)`, Time: at},
			`opened: "testmic" (index 0, ALSA) at sample 0`},
		{"reopened", Diagnostic{Kind: KindOpened, Device: "mic", SamplePos: 48000, Attempt: 3, Duration: 15 * time.Second, Samples: 240000},
			"opened: mic at sample 48000 after 3 failed attempts; input was down 15s (about 240000 samples)"},
		{"open failed", Diagnostic{Kind: KindOpenFailed, Attempt: 2, Duration: 4 * time.Second, Err: errNotThere},
			"open failed (attempt 2), retrying in 4s: fake: no such device"},
		{"device error", Diagnostic{Kind: KindDeviceError, SamplePos: 10, StreamPos: 8, Duration: time.Second, Err: errUnplugged},
			"device error at sample 10 (stream sample 8), reopening in 1s: fake: device unplugged"},
		{"overflow", Diagnostic{Kind: KindInputOverflow, SamplePos: 1600, StreamPos: 1500, Err: ErrInputOverflow},
			"input overflow: gap of unknown length before sample 1600 (stream sample 1500): capture: input overflowed: samples were lost before this buffer"},
		{"slow read with dropped", Diagnostic{Kind: KindSlowRead, SamplePos: 3200, Duration: 2500 * time.Millisecond, Dropped: 4},
			"slow read: a read took 2.5s, ending at sample 3200 [4 earlier diagnostics dropped: channel full]"},
		{"unknown kind", Diagnostic{Kind: 99, Err: errors.New("x")}, "kind(99): x"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.d.String(); got != c.want {
				t.Errorf("got  %q\nwant %q", got, c.want)
			}
		})
	}
}
