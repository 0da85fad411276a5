package alarm_test

import (
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
)

func TestConfigValidate(t *testing.T) {
	tests := []struct {
		name  string
		edit  func(c *alarm.Config)
		field string // the field the error must name; "" for valid
	}{
		{"test config is valid", func(c *alarm.Config) {}, ""},
		{"warning level off is valid", func(c *alarm.Config) { c.WarnThreshold = 0 }, ""},
		{"no hysteresis is valid", func(c *alarm.Config) { c.ClearFraction = 1 }, ""},
		{"zero off-delay is valid", func(c *alarm.Config) { c.OffDelay = 0 }, ""},
		{"64 windows is valid", func(c *alarm.Config) { c.K, c.N = 64, alarm.MaxN }, ""},
		{"defaults lack the alarm threshold", func(c *alarm.Config) { *c = alarm.DefaultConfig() }, "AlarmThreshold"},
		{"alarm threshold above 1", func(c *alarm.Config) { c.AlarmThreshold = 1.2 }, "AlarmThreshold"},
		{"alarm threshold NaN", func(c *alarm.Config) { c.AlarmThreshold = math.NaN() }, "AlarmThreshold"},
		{"warning equal to alarm", func(c *alarm.Config) { c.WarnThreshold = c.AlarmThreshold }, "WarnThreshold"},
		{"warning negative", func(c *alarm.Config) { c.WarnThreshold = -0.1 }, "WarnThreshold"},
		{"clear fraction zero", func(c *alarm.Config) { c.ClearFraction = 0 }, "ClearFraction"},
		{"clear fraction above 1", func(c *alarm.Config) { c.ClearFraction = 1.1 }, "ClearFraction"},
		{"clear fraction NaN", func(c *alarm.Config) { c.ClearFraction = math.NaN() }, "ClearFraction"},
		{"N zero", func(c *alarm.Config) { c.N = 0 }, "N ="},
		{"N too large", func(c *alarm.Config) { c.N = alarm.MaxN + 1 }, "N ="},
		{"K zero", func(c *alarm.Config) { c.K = 0 }, "K ="},
		{"K above N", func(c *alarm.Config) { c.K = c.N + 1 }, "K ="},
		{"negative off-delay", func(c *alarm.Config) { c.OffDelay = -time.Second }, "OffDelay"},
		{"zero shelve limit", func(c *alarm.Config) { c.MaxShelve = 0 }, "MaxShelve"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c := testConfig(true)
			tc.edit(&c)
			err := c.Validate()
			_, nerr := alarm.NewTracker(c)
			if tc.field == "" {
				if err != nil || nerr != nil {
					t.Fatalf("Validate: %v, NewTracker: %v; want both nil", err, nerr)
				}
				return
			}
			if !errors.Is(err, alarm.ErrConfig) || !errors.Is(nerr, alarm.ErrConfig) {
				t.Fatalf("Validate: %v, NewTracker: %v; want both to wrap ErrConfig", err, nerr)
			}
			if !strings.Contains(err.Error(), tc.field) {
				t.Errorf("error %q does not name %s", err, tc.field)
			}
		})
	}
}

func TestStrings(t *testing.T) {
	tests := []struct {
		name      string
		got, want string
	}{
		{"NORM", alarm.StateNormal.String(), "NORM"},
		{"UNACK", alarm.StateUnacked.String(), "UNACK"},
		{"ACKED", alarm.StateAcked.String(), "ACKED"},
		{"RTNUN", alarm.StateReturnedUnacked.String(), "RTNUN"},
		{"SHLVD", alarm.StateShelved.String(), "SHLVD"},
		{"unknown state", alarm.State(9).String(), "State(9)"},
		{"none", alarm.SeverityNone.String(), "none"},
		{"warning", alarm.SeverityWarning.String(), "warning"},
		{"alarm", alarm.SeverityAlarm.String(), "alarm"},
		{"unknown severity", alarm.Severity(7).String(), "Severity(7)"},
		{"raised", alarm.Raised.String(), "raised"},
		{"cleared", alarm.Cleared.String(), "cleared"},
		{"acknowledged", alarm.Acknowledged.String(), "acknowledged"},
		{"shelved", alarm.Shelved.String(), "shelved"},
		{"unshelved", alarm.Unshelved.String(), "unshelved"},
		{"severity changed", alarm.SeverityChanged.String(), "severity_changed"},
		{"zero kind", alarm.Kind(0).String(), "Kind(0)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.got != tc.want {
				t.Errorf("got %q, want %q", tc.got, tc.want)
			}
		})
	}
}
