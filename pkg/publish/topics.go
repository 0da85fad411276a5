package publish

import (
	"fmt"
	"strings"
)

// Kinds of message, the last level of every topic.
const (
	KindStatus     = "status"     // retained: online, offline
	KindAlarm      = "alarm"      // alarm state changes
	KindSummary    = "summary"    // periodic summaries
	KindDiagnostic = "diagnostic" // sensor and capture faults
	KindState      = "state"      // machine running or stopped
	KindCommand    = "command"    // in: operator commands
	KindResponse   = "response"   // out: one per command
)

// Topics builds the topic names of one agent.
type Topics struct {
	base string
}

// NewTopics checks prefix, site and asset and returns the topic builder.
// Each must be non-empty, free of MQTT wildcards ('+', '#'), NUL and '/'
// (the prefix may contain '/' to nest under a plant's own tree).
func NewTopics(prefix, site, asset string) (Topics, error) {
	for _, f := range []struct{ name, v string }{{"prefix", prefix}, {"site", site}, {"asset", asset}} {
		bad := "+#\x00"
		if f.name != "prefix" {
			bad += "/"
		}
		if f.v == "" || strings.ContainsAny(f.v, bad) || strings.HasPrefix(f.v, "/") || strings.HasSuffix(f.v, "/") {
			return Topics{}, fmt.Errorf("%w: topic %s %q: must be non-empty without '+', '#' or a leading or trailing '/'%s",
				ErrConfig, f.name, f.v, map[bool]string{true: "", false: " (and no '/' inside)"}[f.name == "prefix"])
		}
	}
	return Topics{base: prefix + "/" + site + "/" + asset + "/"}, nil
}

// Topic returns the topic of one kind of message.
func (t Topics) Topic(kind string) string { return t.base + kind }
