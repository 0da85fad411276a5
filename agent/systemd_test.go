package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// The shipped unit passes systemd's own checker (systemd-analyze verify, from
// Debian's systemd package) with ExecStart pointing at a real build, and
// keeps the properties the service relies on.
func TestSystemdUnit(t *testing.T) {
	unit, err := os.ReadFile(filepath.Join("..", "systemd", "auscult.service"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"Type=notify", "WatchdogSec=", "Restart=on-failure", "NoNewPrivileges=yes",
		"ProtectSystem=strict", "PrivateTmp=yes", "SupplementaryGroups=audio", "User=auscult",
		"ExecStart=/usr/bin/auscult run --config /etc/auscult/agent.yaml"} {
		if !strings.Contains(string(unit), want) {
			t.Errorf("unit lacks %q", want)
		}
	}
	tool, err := exec.LookPath("systemd-analyze")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("systemd-analyze not found (CI=true: scripts/test.sh installs systemd)")
		}
		t.Skip("systemd-analyze not found")
	}
	path := filepath.Join(t.TempDir(), "auscult.service")
	text := strings.ReplaceAll(string(unit), "/usr/bin/auscult", agentBinary(t))
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(tool, "verify", path).CombinedOutput()
	if err != nil || len(strings.TrimSpace(string(out))) > 0 {
		t.Errorf("systemd-analyze verify: %v\n%s", err, out)
	}
}
