package config

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const good = `# Obrinvale raw-water lift station, duty pump
site: obrinvale
asset: P-492B
baseline: /var/lib/auscult/P-492B.ausb
source:
  kind: device
  device: "USB"
  rate_hz: 48000
  channels: 2
  channel: 1
alarm:
  off_delay_s: 30
  latch: true
log:
  path: /var/lib/auscult/auscult.db
`

func TestParseGood(t *testing.T) {
	c, err := Parse([]byte(good), "agent.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if c.Asset != "P-492B" || c.Source.RateHz != 48000 || c.Source.Channel != 1 || !c.Alarm.Latch || c.Alarm.OffDelayS != 30 {
		t.Errorf("values not taken: %+v", c)
	}
	d := Default()
	if c.Alarm.ClearFraction != d.Alarm.ClearFraction || c.Log.MaxMB != d.Log.MaxMB || c.Source.Speed != 1 {
		t.Errorf("defaults not kept for keys left out: %+v", c)
	}
}

func TestParseErrors(t *testing.T) {
	cases := []struct {
		name, yaml string
		want       []string // each must appear in the message
	}{
		{"unknown top key", "asset: P-1\ncolour: red\n", []string{"agent.yaml:2: colour: unknown key", "known here:"}},
		{"unknown nested key", "asset: P-1\nsource:\n  rate: 8000\n", []string{"agent.yaml:3: source.rate: unknown key", "rate_hz"}},
		{"wrong type", "asset: P-1\nsource:\n  rate_hz: fast\n", []string{"agent.yaml:3: source.rate_hz: must be a whole number, got \"fast\""}},
		{"float for int", "asset: P-1\nsource:\n  rate_hz: 16000.5\n", []string{"source.rate_hz: must be a whole number"}},
		{"string for bool", "asset: P-1\nalarm:\n  latch: \"yes\"\n", []string{"alarm.latch: must be true or false"}},
		{"out of range", "asset: P-1\nsource:\n  rate_hz: 96000\n", []string{"agent.yaml:3: source.rate_hz: must be between 8000 and 48000, got 96000"}},
		{"missing asset", "site: obrinvale\n", []string{"asset: is required"}},
		{"bad asset", "asset: P 492/B\n", []string{"asset:", "only letters"}},
		{"section as value", "asset: P-1\nsource: usb\n", []string{"source: must be a section of keys"}},
		{"list as value", "asset: [a, b]\n", []string{"asset: must be a single value, got a list"}},
		{"duplicate key", "asset: P-1\nasset: P-2\n", []string{"asset"}},
		{"empty value", "asset: P-1\nbaseline:\n", []string{"baseline: has no value"}},
		{"wav needs path", "asset: P-1\nsource:\n  kind: wav\n", []string{"source.path: is required when source.kind is wav"}},
		{"bad kind", "asset: P-1\nsource:\n  kind: mic\n", []string{"source.kind: must be device, wav or stdin"}},
		{"channel past channels", "asset: P-1\nsource:\n  channel: 1\n", []string{"source.channel: must be -1 (mix) or from 0 to 0"}},
		{"k without n", "asset: P-1\nalarm:\n  debounce_k: 3\n", []string{"set debounce_k and debounce_n together"}},
		{"k over n", "asset: P-1\nalarm:\n  debounce_k: 6\n  debounce_n: 5\n", []string{"1 <= debounce_k <= debounce_n"}},
		{"summary not dividing a day", "asset: P-1\nlog:\n  summary_min: 7\n", []string{"log.summary_min: must divide a day"}},
		{"not yaml", "asset: [\n", []string{"agent.yaml: not valid YAML"}},
		{"bad broker url", "asset: P-1\nmqtt:\n  url: 10.0.0.5:1883\n", []string{"agent.yaml:3: mqtt.url:", "tcp"}},
		{"bad url in a fail-over list", "asset: P-1\nmqtt:\n  urls: [tcp://a:1883, b:1883]\n", []string{"mqtt.urls[1]", "b:1883"}},
		{"urls not a list", "asset: P-1\nmqtt:\n  urls: tcp://a:1883\n", []string{"mqtt.urls: must be a list"}},
		{"two password sources", "asset: P-1\nmqtt:\n  username: u\n  password_file: /p\n  password_env: P\n", []string{"password_file or password_env"}},
		{"password without user", "asset: P-1\nmqtt:\n  password_env: P\n", []string{"mqtt.username: is required"}},
		{"cert without key", "asset: P-1\nmqtt:\n  tls:\n    cert_file: /c\n", []string{"mqtt.tls.cert_file"}},
		{"wildcard prefix", "asset: P-1\nmqtt:\n  topic_prefix: plant/#\n", []string{"mqtt.topic_prefix"}},
		{"back-off upside down", "asset: P-1\nmqtt:\n  reconnect_min_s: 60\n  reconnect_max_s: 5\n", []string{"mqtt.reconnect_max_s"}},
		{"web without a token", "asset: P-1\nweb:\n  listen: 0.0.0.0:8440\n", []string{"web.token_file"}},
		{"web listen not host:port", "asset: P-1\nweb:\n  listen: 8440\n  token_env: T\n", []string{"web.listen"}},
		{"password in the file", "asset: P-1\nmqtt:\n  password: hunter2\n", []string{"mqtt.password: unknown key"}},
		{"two problems at once", "asset: P-1\nsource:\n  rate_hz: 1\nlog:\n  flush_s: 0\n", []string{"source.rate_hz", "log.flush_s"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Parse([]byte(tc.yaml), "agent.yaml")
			if err == nil {
				t.Fatal("accepted")
			}
			if !errors.Is(err, ErrInvalid) {
				t.Errorf("error %v is not ErrInvalid", err)
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q lacks %q", err, w)
				}
			}
		})
	}
}

// The example shipped in configs/ must parse, so the documented file never
// drifts from the parser.
func TestExampleFileParses(t *testing.T) {
	path := filepath.Join("..", "..", "configs", "agent.example.yaml")
	if _, err := os.Stat(path); err != nil {
		t.Fatal(err)
	}
	if _, err := Load(path); err != nil {
		t.Fatal(err)
	}
}

func TestLoadMissing(t *testing.T) {
	_, err := Load(filepath.Join(t.TempDir(), "none.yaml"))
	if err == nil || !strings.Contains(err.Error(), "none.yaml") {
		t.Fatalf("want an error naming the file, got %v", err)
	}
}
