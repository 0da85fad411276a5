package capture

import (
	"errors"
	"strings"
	"testing"
	"time"
)

func TestConfigDefaults(t *testing.T) {
	got, err := Config{}.withDefaults()
	if err != nil {
		t.Fatal(err)
	}
	want := Config{Rate: 16000, Channels: 1, FramesPerRead: 1600, RingSeconds: 10,
		ReopenMin: time.Second, ReopenMax: 30 * time.Second, SlowRead: time.Second, DiagnosticBuffer: 64}
	if got != want {
		t.Errorf("defaults %+v\nwant %+v", got, want)
	}
	got, err = Config{Rate: 8000, FramesPerRead: 4000, ReopenMin: time.Minute}.withDefaults()
	if err != nil {
		t.Fatal(err)
	}
	if got.SlowRead != 2*time.Second || got.ReopenMax != time.Minute {
		t.Errorf("SlowRead %v (want 4 x 500 ms), ReopenMax %v (want ReopenMin)", got.SlowRead, got.ReopenMax)
	}
}

func TestConfigErrors(t *testing.T) {
	cases := []struct {
		name string
		cfg  Config
		text string
	}{
		{"rate too low", Config{Rate: 999}, "Rate is 999 Hz"},
		{"negative channels", Config{Channels: -1}, "Channels is -1"},
		{"channel beyond channels", Config{Channels: 2, Channel: 2}, "Channel is 2 but Channels is 2: use 0..1, or -1 to mix"},
		{"channel below -1", Config{Channel: -2}, "Channel is -2"},
		{"negative frames", Config{FramesPerRead: -5}, "FramesPerRead is -5"},
		{"ring smaller than a read", Config{RingSeconds: 0.01}, "fewer samples than one read"},
		{"ring too large", Config{RingSeconds: 1e6}, "RingSeconds is 1e+06"},
		{"negative ring", Config{RingSeconds: -1}, "RingSeconds is -1"},
		{"reopen max below min", Config{ReopenMin: time.Second, ReopenMax: time.Millisecond}, "ReopenMin 1s and ReopenMax 1ms"},
		{"negative slow read", Config{SlowRead: -time.Second}, "SlowRead is -1s"},
		{"negative diagnostic buffer", Config{DiagnosticBuffer: -1}, "DiagnosticBuffer is -1"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := c.cfg.withDefaults()
			if !errors.Is(err, ErrConfig) || !strings.Contains(err.Error(), c.text) {
				t.Errorf("error %v, want ErrConfig mentioning %q", err, c.text)
			}
		})
	}
}

func TestBackoff(t *testing.T) {
	b := backoff{min: time.Second, max: 30 * time.Second}
	var got []time.Duration
	for range 8 {
		got = append(got, b.delay())
	}
	b.reset()
	got = append(got, b.delay())
	want := []time.Duration{1, 2, 4, 8, 16, 30, 30, 30, 1}
	for i := range want {
		if got[i] != want[i]*time.Second {
			t.Fatalf("delays %v, want %v seconds", got, want)
		}
	}
}
