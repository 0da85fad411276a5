package main

import (
	"net"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/auscult/auscult/pkg/config"
	"github.com/auscult/auscult/pkg/publish/brokertest"
)

// The broker password comes from the first line of a file or from an
// environment variable, and a missing one is a clear error.
func TestBrokerPassword(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "pw")
	os.WriteFile(file, []byte("kettle-7-granite\r\nsecond line\n"), 0o600)
	if pw, err := brokerPassword(config.MQTT{PasswordFile: file}); pw != "kettle-7-granite" || err != nil {
		t.Errorf("from a file: %q, %v", pw, err)
	}
	empty := filepath.Join(dir, "empty")
	os.WriteFile(empty, []byte("\n"), 0o600)
	if _, err := brokerPassword(config.MQTT{PasswordFile: empty}); err == nil || !strings.Contains(err.Error(), "first line is empty") {
		t.Errorf("empty file: %v", err)
	}
	if _, err := brokerPassword(config.MQTT{PasswordFile: filepath.Join(dir, "none")}); err == nil || !strings.Contains(err.Error(), "mqtt.password_file") {
		t.Errorf("missing file: %v", err)
	}
	t.Setenv("AUSCULT_TEST_PW", "from-env")
	if pw, err := brokerPassword(config.MQTT{PasswordEnv: "AUSCULT_TEST_PW"}); pw != "from-env" || err != nil {
		t.Errorf("from the environment: %q, %v", pw, err)
	}
	if _, err := brokerPassword(config.MQTT{PasswordEnv: "AUSCULT_TEST_UNSET"}); err == nil || !strings.Contains(err.Error(), "AUSCULT_TEST_UNSET is not set") {
		t.Errorf("unset variable: %v", err)
	}
}

// startBroker runs Mosquitto on a free loopback port (pkg/publish/brokertest)
// and returns its URL.
func startBroker(t *testing.T) string {
	t.Helper()
	return brokertest.Start(t, brokertest.Options{}).URL
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
	defer func() { cfg.MQTT.URLs = nil }()
	cfg.MQTT.URL, cfg.MQTT.URLs = dead, []string{url}
	lines, _ = checkBroker(cfg)
	if len(lines) != 2 || !lines[0].ok || !strings.Contains(lines[1].text, "connected in") {
		t.Errorf("fail-over pair gave %+v", lines)
	}

	// Credentials and TLS as configured: a password from a file, the
	// broker's CA; a wrong password fails with the broker's reason.
	tb := brokertest.Start(t, brokertest.Options{TLS: true, Users: map[string]string{"agent-p492b": "kettle-7-granite"}})
	pwFile := filepath.Join(t.TempDir(), "mqtt-password")
	os.WriteFile(pwFile, []byte("kettle-7-granite\n"), 0o600)
	cfg.MQTT.URL, cfg.MQTT.URLs, cfg.MQTT.Username, cfg.MQTT.PasswordFile = tb.URL, nil, "agent-p492b", pwFile
	cfg.MQTT.TLS.CAFile = tb.CAFile
	if lines, err = checkBroker(cfg); err != nil || !lines[0].ok {
		t.Errorf("TLS with a password: %+v, %v\n%s", lines, err, tb.Log())
	}
	os.WriteFile(pwFile, []byte("wrong\n"), 0o600)
	if lines, _ = checkBroker(cfg); lines[0].ok || !strings.Contains(lines[0].text, "not Authorized") {
		t.Errorf("a wrong password gave %+v", lines)
	}
	for _, l := range lines {
		if strings.Contains(l.text, "wrong") {
			t.Errorf("the password appears in check's output: %s", l.text)
		}
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

// check's web line: off, a short token, a taken port, and ready.
func TestCheckWeb(t *testing.T) {
	if line, err := checkWeb(config.Web{}); err != nil || !strings.Contains(line, "off") {
		t.Errorf("off: %q %v", line, err)
	}
	dir := t.TempDir()
	short := filepath.Join(dir, "short")
	os.WriteFile(short, []byte("tooshort\n"), 0o600)
	if _, err := checkWeb(config.Web{Listen: "127.0.0.1:0", TokenFile: short}); err == nil || !strings.Contains(err.Error(), "at least 16") {
		t.Errorf("short token: %v", err)
	}
	good := filepath.Join(dir, "good")
	os.WriteFile(good, []byte("obrinvale-skid7-visit-9c41e2\n"), 0o600)
	l, _ := net.Listen("tcp", "127.0.0.1:0")
	defer l.Close()
	if _, err := checkWeb(config.Web{Listen: l.Addr().String(), TokenFile: good}); err == nil || !strings.Contains(err.Error(), "already running") {
		t.Errorf("taken port: %v", err)
	}
	if line, err := checkWeb(config.Web{Listen: "127.0.0.1:0", TokenFile: good}); err != nil || !strings.Contains(line, "can be served") {
		t.Errorf("ready: %q %v", line, err)
	}
}
