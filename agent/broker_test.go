package main

import (
	"fmt"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/config"
)

// startBroker runs Mosquitto (Debian's mosquitto package) on a free loopback
// port with a generated configuration and returns its URL. Without the
// binary the test skips, or fails under CI=true.
func startBroker(t *testing.T) string {
	t.Helper()
	bin, err := exec.LookPath("mosquitto")
	if err != nil {
		for _, p := range []string{"/usr/sbin/mosquitto", "/sbin/mosquitto"} {
			if _, e := os.Stat(p); e == nil {
				bin, err = p, nil
			}
		}
	}
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("mosquitto not installed (CI=true: scripts/test.sh installs it)")
		}
		t.Skip("mosquitto not installed")
	}
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	port := l.Addr().(*net.TCPAddr).Port
	l.Close()
	conf := filepath.Join(t.TempDir(), "mosquitto.conf")
	text := fmt.Sprintf("listener %d 127.0.0.1\nallow_anonymous true\npersistence false\n", port)
	if err := os.WriteFile(conf, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(bin, "-c", conf)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { cmd.Process.Kill(); cmd.Wait() })
	addr := fmt.Sprintf("127.0.0.1:%d", port)
	for end := time.Now().Add(5 * time.Second); time.Now().Before(end); time.Sleep(50 * time.Millisecond) {
		if c, err := net.Dial("tcp", addr); err == nil {
			c.Close()
			return "tcp://" + addr
		}
	}
	t.Fatalf("mosquitto did not listen on %s", addr)
	return ""
}

// check's broker line against a real Mosquitto, and against a port where
// nothing listens.
func TestCheckBrokerLink(t *testing.T) {
	url := startBroker(t)
	cfg := config.Default()
	cfg.Asset, cfg.MQTT.URL = "P-492B", url
	lines, err := checkBroker(cfg)
	if err != nil || len(lines) != 1 || !lines[0].ok || !strings.Contains(lines[0].text, "connected in") {
		t.Fatalf("broker %s: %+v, %v", url, lines, err)
	}
	l, _ := net.Listen("tcp", "127.0.0.1:0")
	dead := "tcp://" + l.Addr().String()
	l.Close()
	cfg.MQTT.URL = dead
	lines, err = checkBroker(cfg)
	if err != nil || len(lines) != 1 || lines[0].ok || !strings.Contains(lines[0].text, dead+": FAIL") {
		t.Errorf("a dead broker gave %+v, %v; want a failed line naming %s", lines, err, dead)
	}
	// Fail-over: one live broker of two passes, and both are reported.
	cfg.MQTT.URL, cfg.MQTT.URLs = dead, []string{url}
	lines, _ = checkBroker(cfg)
	if len(lines) != 2 || !lines[0].ok || !strings.Contains(lines[1].text, "connected in") {
		t.Errorf("fail-over pair gave %+v", lines)
	}
}

// `auscult check` reports the broker link among its checks.
func TestCheckCommandReportsBroker(t *testing.T) {
	url := startBroker(t)
	cfg, _ := writeConfig(t, filepath.Join(t.TempDir(), "none.bl"), "  kind: stdin")
	text, _ := os.ReadFile(cfg)
	os.WriteFile(cfg, append(text, []byte("mqtt:\n  url: "+url+"\n")...), 0o644)
	r := cli(t, "check", "--config", cfg)
	if !strings.Contains(r.stdout, "broker      "+url+": connected in") {
		t.Errorf("check output lacks the broker link:\n%s", r.stdout)
	}
	if r.code != 1 || !strings.Contains(r.stdout, "baseline    FAIL") {
		t.Errorf("a missing baseline must fail check (exit %d):\n%s", r.code, r.stdout)
	}
}
