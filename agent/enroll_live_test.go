package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Live enrolment through the service's source path (a WAV folder replayed
// as fast as possible stands in for the microphone): it enrols, and a
// second enrolment keeps the first beside it and says how far healthy moved.
// Too short a listen is refused with the reason, and the old baseline stays.
func TestEnrollLive(t *testing.T) {
	s := simulateSkid(t)
	out := filepath.Join(t.TempDir(), "P-492B.ausb")
	cfg, _ := writeConfig(t, out, fmt.Sprintf("  kind: wav\n  path: %s\n  speed: 0", filepath.Join(s.dir, "train")))
	r := mustRun(t, "enroll", "--live", "--config", cfg, "--duration", "5m")
	if !strings.Contains(r.stdout, "written to "+out) || !strings.Contains(r.stderr, "of 5:00 heard") {
		t.Fatalf("first enrolment:\n%s\n%s", r.stdout, r.stderr)
	}
	first, _ := os.ReadFile(out)
	r = mustRun(t, "enroll", "--live", "--config", cfg, "--duration", "5m")
	for _, want := range []string{"previous ", "kept as " + out + ".", "moved ", "scores "} {
		if !strings.Contains(r.stdout, want) {
			t.Errorf("second enrolment output lacks %q:\n%s", want, r.stdout)
		}
	}
	if !strings.Contains(r.stderr, "running 100 %") {
		t.Errorf("second enrolment should report the running share from the previous baseline:\n%s", r.stderr)
	}
	kept, _ := filepath.Glob(out + ".*")
	if len(kept) != 1 {
		t.Fatalf("previous baseline not kept: %v", kept)
	}
	if b, _ := os.ReadFile(kept[0]); string(b) != string(first) {
		t.Error("the kept copy is not the first baseline")
	}
	before, _ := os.ReadFile(out)
	wantFail(t, cli(t, "enroll", "--live", "--config", cfg, "--duration", "1m"), 1, "too little healthy audio")
	if after, _ := os.ReadFile(out); string(after) != string(before) {
		t.Error("a refused enrolment changed the baseline")
	}
	wantFail(t, cli(t, "enroll", "--live", "--duration", "5m"), 2, "--live needs --config")
	wantFail(t, cli(t, "enroll", "--live", "--config", cfg, "somefile.wav"), 2, "leave out the files")
}

// Enrolling from files over an existing baseline keeps the old one beside
// it, as live enrolment does, and a file at --out that is not a baseline is
// never overwritten.
func TestEnrollFromFilesKeepsThePrevious(t *testing.T) {
	s := simulateSkid(t)
	dir := t.TempDir()
	out := filepath.Join(dir, "P-492B.ausb")
	train := filepath.Join(s.dir, "train")
	mustRun(t, "enroll", "--out", out, train)
	first, _ := os.ReadFile(out)
	r := mustRun(t, "enroll", "--centres", "1", "--out", out, train)
	for _, want := range []string{"previous ", "kept as " + out + ".", "moved "} {
		if !strings.Contains(r.stdout, want) {
			t.Errorf("second enrolment output lacks %q:\n%s", want, r.stdout)
		}
	}
	kept, _ := filepath.Glob(out + ".*")
	if len(kept) != 1 {
		t.Fatalf("previous baseline not kept: %v", kept)
	}
	if b, _ := os.ReadFile(kept[0]); string(b) != string(first) {
		t.Error("the kept copy is not the first baseline")
	}
	notes := filepath.Join(dir, "notes.txt")
	os.WriteFile(notes, []byte("commissioning notes, P-492B\n"), 0o644)
	wantFail(t, cli(t, "enroll", "--out", notes, train), 1, "is not a baseline this version reads", "move it away")
	if b, _ := os.ReadFile(notes); string(b) != "commissioning notes, P-492B\n" {
		t.Error("a file that is not a baseline was overwritten")
	}
}
