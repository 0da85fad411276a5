//go:build cgo

package main

import (
	"os"
	"strings"
	"testing"
	"time"
)

// missingMic is a device source naming an input no machine has (real
// PortAudio looks for it and fails to open it, again and again).
const missingMic = "  kind: device\n  device: \"no-such-microphone-7f3a\""

// check on a microphone that cannot be opened ends after its listening
// deadline with the device's own complaint, instead of waiting for sound
// that never comes (it used to hang until killed).
func TestCheckEndsWhenTheMicrophoneIsMissing(t *testing.T) {
	s := simulateSkid(t)
	cfg, _ := writeConfig(t, s.baseline, missingMic)
	done := make(chan result, 1)
	go func() { done <- cli(t, "check", "--config", cfg) }()
	select {
	case r := <-done:
		wantFail(t, r, 1, "1 check(s) failed: [microphone]")
		if !strings.Contains(r.stdout, "delivered no sound in") || !strings.Contains(r.stdout, "no such input device") {
			t.Errorf("the microphone line should say no sound came and why:\n%s", r.stdout)
		}
	case <-time.After(60 * time.Second): // a hang detector, not a speed goal: the deadline is 10 s
		t.Fatal("check still waiting for a missing microphone after 60 s")
	}
}

// SIGTERM stops the service while it is waiting to reopen a microphone
// (systemctl stop must not wait for the back-off or end in SIGKILL).
func TestRunStopsOnSIGTERMWhileTheMicrophoneIsMissing(t *testing.T) {
	agentBinary(t)
	s := simulateSkid(t)
	cfg, logPath := writeConfig(t, s.baseline, missingMic)
	p := start(t, nil, "run", "--config", cfg)
	p.waitFor(t, "open failed (attempt 2)", 20*time.Second)
	p.terminate(t, 15*time.Second) // the unit's stop timeout is 20 s
	if !strings.Contains(p.log(), "reason=signal") {
		t.Errorf("no clean stop logged:\n%s", p.log())
	}
	if _, err := os.Stat(logPath); err != nil {
		t.Errorf("log not kept: %v", err)
	}
}
