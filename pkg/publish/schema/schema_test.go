package schema

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"go/ast"
	"go/parser"
	"go/token"
	"io/fs"
	"os"
	"reflect"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
	"github.com/auscult/auscult/pkg/gate"
	"github.com/auscult/auscult/pkg/publish"
)

var t0 = time.Date(2026, 12, 2, 3, 14, 7, 250e6, time.UTC)

func env(kind string, seq uint64, t time.Time) publish.Envelope {
	return publish.Envelope{Schema: publish.SchemaVersion, Kind: kind, Site: "obrinvale", Asset: "P-492B", Seq: seq, Time: publish.Stamp(t)}
}

func ptr[T any](v T) *T { return &v }

// examples returns realistic payloads of every kind, built from package
// publish's own types, by kind and name.
func examples() map[string]map[string]any {
	started := t0.Add(-26 * time.Hour)
	status := publish.Status{Envelope: env(publish.KindStatus, 1207, t0), State: "online", AgentVersion: "0.9.2",
		ClientID: "auscult-edge07-P-492B", Started: publish.Stamp(started),
		Baseline:     publish.StatusBaseline{ID: "3f9c20a1b7e4", Enrolled: publish.Stamp(t0.Add(-30 * 24 * time.Hour)), EnrolledS: 5400},
		Thresholds:   publish.StatusThresholds{Alarm: 0.318, Warning: 0.262},
		ConfigSHA256: "9b2d4c61a0f83e5577c1d2e0b4a6f8193c5e7d9a1b3c5e7f90a2b4c6d8e0f1a3",
		Machine:      "running", AlarmState: "UNACK", Severity: "alarm", Score: ptr(0.3412),
		LastWindow: publish.Stamp(t0.Add(-500 * time.Millisecond)), SensorFaults: []string{"clipping"},
		Outbox: &publish.StatusOutbox{Depth: 3, Bytes: 2210, Oldest: publish.Stamp(t0.Add(-2 * time.Minute)), DroppedTotal: 5,
			DroppedBy: map[string]uint64{"summary": 5, "state": 0, "diagnostic": 0, "alarm": 0}}}
	will := publish.Status{Envelope: env(publish.KindStatus, 1190, started.Add(time.Second)), State: "offline",
		Reason: publish.ReasonLost, AgentVersion: status.AgentVersion, ClientID: status.ClientID, Started: status.Started,
		Baseline: status.Baseline, Thresholds: status.Thresholds, ConfigSHA256: status.ConfigSHA256}
	stopped := will
	stopped.Seq, stopped.Time, stopped.Reason = 1311, publish.Stamp(t0.Add(time.Hour)), publish.ReasonStopped
	fresh := status // just connected, before the first window: no severity, score or last window yet
	fresh.Severity, fresh.Score, fresh.LastWindow, fresh.SensorFaults, fresh.AlarmState, fresh.Machine = "", nil, "", nil, "NORM", "unknown"
	fresh.Outbox = &publish.StatusOutbox{DroppedBy: map[string]uint64{"summary": 0, "state": 0, "diagnostic": 0, "alarm": 0}}

	raised := publish.Alarm{Envelope: env(publish.KindAlarm, 1204, t0), EventSeq: 88311, Code: "alarm.raised", Change: "raised",
		State: "UNACK", Severity: "alarm", Occurrence: 4, Score: 0.3412, Threshold: 0.318, WindowsOver: 3, WindowsOf: 5,
		Bands:   []publish.Band{{LowHz: 3150, HighHz: 3550, DeviationSD: 5.8}, {LowHz: 95, HighHz: 105, DeviationSD: 2.1}},
		Machine: "running", EvidenceClipID: 212, BaselineID: "3f9c20a1b7e4",
		Message: "alarm raised (state UNACK): 3 of the last 5 windows at or over 0.3180; most deviating 3.15 kHz to 3.55 kHz louder (+5.8 sd)"}
	acked := publish.Alarm{Envelope: env(publish.KindAlarm, 1209, t0.Add(4*time.Minute)), EventSeq: 88320, Code: "alarm.acknowledged",
		Change: "acknowledged", State: "ACKED", Severity: "alarm", Occurrence: 4, Score: 0.3377, Threshold: 0.318, Bands: []publish.Band{},
		Machine: "running", BaselineID: "3f9c20a1b7e4", By: "shift-b.lead", Message: "alarm acknowledged (state ACKED) by shift-b.lead"}
	shelved := publish.Alarm{Envelope: env(publish.KindAlarm, 1212, t0.Add(5*time.Minute)), EventSeq: 88324, Code: "alarm.shelved",
		Change: "shelved", State: "SHLVD", Severity: "alarm", Occurrence: 4, Score: 0.33, Threshold: 0.318, Bands: []publish.Band{},
		Machine: "running", By: "shift-b.lead", Reason: "seal flush in progress", ShelvedUntil: publish.Stamp(t0.Add(65 * time.Minute)),
		Message: "alarm shelved (state SHLVD) by shift-b.lead until 2026-12-02T04:19:07Z: seal flush in progress"}
	escalated := publish.Alarm{Envelope: env(publish.KindAlarm, 1199, t0.Add(-time.Minute)), EventSeq: 88290, Code: "alarm.severity_changed",
		Change: "severity_changed", State: "UNACK", Severity: "alarm", FromSeverity: "warning", Occurrence: 4, Score: 0.325,
		Threshold: 0.318, WindowsOver: 3, WindowsOf: 5, Bands: []publish.Band{{LowHz: 3150, HighHz: 3550, DeviationSD: 5.1}},
		Machine: "running", EvidenceClipID: 211, Message: "warning escalated to alarm (state UNACK)"}

	summary := publish.Summary{Envelope: env(publish.KindSummary, 1201, t0.Truncate(time.Hour)),
		PeriodStart: publish.Stamp(t0.Truncate(time.Hour).Add(-time.Hour)), PeriodEnd: publish.Stamp(t0.Truncate(time.Hour)),
		PeriodS: 3600, RunningFraction: 0.9731, WindowsScored: 6921, ScoreMin: 0.0412, ScoreMean: 0.1187, ScoreP95: 0.2034,
		ScoreMax: 0.2911, WarningsRaised: 1, AlarmActiveS: 0, WorstState: "RTNUN", RMSMeanDBFS: -31.42, RMSMaxDBFS: -24.87,
		CaptureOverruns: 1, Sensor: publish.SensorHealth{Healthy: true, Active: []string{}, FaultsRaised: 1},
		MessagesDropped: 0, MessagesDroppedTotal: 5}

	diag := publish.Event{Envelope: env(publish.KindDiagnostic, 1205, t0.Add(2*time.Second)), EventSeq: 88312, Code: "sensor.clipping.active",
		Source: "sensor", Active: ptr(true), Values: map[string]float64{"value": 0.0214, "limit": 0.01, "sample_pos": 1.6771e9},
		Message: "microphone clipping active: measured 0.0214, limit 0.01"}
	capture := publish.Event{Envelope: env(publish.KindDiagnostic, 1206, t0.Add(3*time.Second)), EventSeq: 88313,
		Code: "capture.input_overflow", Source: "capture",
		Values:  map[string]float64{"sample_pos": 1.6772e9, "lost_samples": 512, "duration_s": 0, "attempt": 0},
		Message: "input overflow: 512 samples lost"}
	state := publish.Event{Envelope: env(publish.KindState, 1210, t0.Add(4*time.Minute)), EventSeq: 88321, Code: "machine.stopped",
		Source: "machine", Values: map[string]float64{"level_dbfs": -58.2, "drop_db": 27.4, "line_match": 0.08, "sample_pos": 1.6809e9},
		Message: "machine stopped (was running); level -58.2 dBFS, 27.4 dB below healthy, line match 0.08"}

	issued := publish.Stamp(t0.Add(4 * time.Minute))
	ack := publish.Command{Schema: 1, RequestID: "scada-7731", Action: publish.ActionAcknowledge, By: "shift-b.lead", Issued: issued}
	shelve := publish.Command{Schema: 1, RequestID: "scada-7732", Action: publish.ActionShelve, By: "shift-b.lead",
		Reason: "seal flush in progress", DurationS: 3600, Issued: "2026-12-02T04:18:07+01:00"}
	ask := publish.Command{Schema: 1, RequestID: "hmi:P-492B:0042", Action: publish.ActionStatus, Issued: "2026-12-02T03:18:07.25Z"}

	okResp := publish.Response{Envelope: env(publish.KindResponse, 1208, t0.Add(4*time.Minute)), RequestID: "scada-7731",
		Action: publish.ActionAcknowledge, OK: true, AlarmState: "ACKED"}
	badResp := publish.Response{Envelope: env(publish.KindResponse, 1213, t0.Add(6*time.Minute)), RequestID: "scada-7731",
		Action: publish.ActionAcknowledge, Error: &publish.CommandError{Code: publish.CodeReplayed,
			Message: `request_id "scada-7731" was already handled; send a new id for a new request`}, AlarmState: "SHLVD"}
	unread := publish.Response{Envelope: env(publish.KindResponse, 1214, t0.Add(6*time.Minute)),
		Error: &publish.CommandError{Code: publish.CodeMalformed, Message: "not a command object"}, AlarmState: "SHLVD"}

	return map[string]map[string]any{
		"status":     {"online": status, "will": will, "stopped": stopped, "before first window": fresh},
		"alarm":      {"raised": raised, "acknowledged": acked, "shelved": shelved, "escalated": escalated},
		"summary":    {"hourly": summary},
		"diagnostic": {"sensor": diag, "capture": capture},
		"state":      {"stopped": state},
		"command":    {"acknowledge": ack, "shelve": shelve, "status": ask},
		"response":   {"ok": okResp, "refused": badResp, "unreadable": unread},
	}
}

func TestExamplesValidate(t *testing.T) {
	ex := examples()
	for _, kind := range Kinds {
		if len(ex[kind]) == 0 {
			t.Errorf("%s: no example", kind)
		}
		for name, v := range ex[kind] {
			b, err := json.Marshal(v)
			if err != nil {
				t.Fatal(err)
			}
			if err := Validate(kind, b); err != nil {
				t.Errorf("%s %s: %v\n%s", kind, name, err, b)
			}
		}
	}
}

// Every command ParseCommand refuses can be answered with a response the
// schema accepts, the request id and action as the agent would echo them.
func TestRefusalsValidate(t *testing.T) {
	for _, p := range []string{
		`{"schema":1,"request_id":"r-1","action":"reboot","issued":"2026-12-02T03:14:07.250Z"}`,
		`{"schema":2,"request_id":"r-2","action":"status","issued":"2026-12-02T03:14:07.250Z"}`,
		`{"schema":1,"request_id":"r 3","action":"status","issued":"2026-12-02T03:14:07.250Z"}`,
		`{"schema":1,"request_id":"r-4","action":"shelve","by":"a","issued":"2026-12-02T03:14:07.250Z"}`,
		`{"schema":1,"request_id":"r-5","action":"status","issued":"soon"}`,
		`{"schema":1,"request_id":"r-6","action":"status","colour":"red","issued":"2026-12-02T03:14:07.250Z"}`,
		`[1,2]`,
		`{"pad":"` + strings.Repeat("x", publish.MaxCommandBytes) + `"}`,
	} {
		cmd, cerr := publish.ParseCommand([]byte(p))
		if cerr == nil {
			t.Fatalf("%.60s: accepted", p)
		}
		r := publish.Response{Envelope: env(publish.KindResponse, 31, t0), RequestID: cmd.RequestID, Action: cmd.Action,
			Error: cerr, AlarmState: "NORM"}
		b, _ := json.Marshal(r)
		if err := Validate("response", b); err != nil {
			t.Errorf("%.60s: %v\n%s", p, err, b)
		}
	}
}

// mutate decodes payload, applies f and encodes it again.
func mutate(t *testing.T, v any, f func(m map[string]any)) []byte {
	t.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	d := json.NewDecoder(bytes.NewReader(b))
	d.UseNumber()
	var m map[string]any
	if err := d.Decode(&m); err != nil {
		t.Fatal(err)
	}
	f(m)
	b, err = json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// parent walks to the object holding the last key of a dotted path
// (numbers index arrays).
func parent(m map[string]any, path string) (map[string]any, string) {
	keys := strings.Split(path, ".")
	var cur any = m
	for _, k := range keys[:len(keys)-1] {
		switch c := cur.(type) {
		case map[string]any:
			cur = c[k]
		case []any:
			i, _ := strconv.Atoi(k)
			cur = c[i]
		}
	}
	return cur.(map[string]any), keys[len(keys)-1]
}

func set(path string, v any) func(map[string]any) {
	return func(m map[string]any) {
		o, k := parent(m, path)
		o[k] = v
	}
}

func del(path string) func(map[string]any) {
	return func(m map[string]any) {
		o, k := parent(m, path)
		if _, ok := o[k]; !ok {
			panic("nothing to delete at " + path)
		}
		delete(o, k)
	}
}

// The envelope's rules hold for every outgoing kind: the error names the
// kind and the field.
func TestEnvelopeViolations(t *testing.T) {
	ex := examples()
	cases := []struct {
		name, field string
		f           func(map[string]any)
	}{
		{"missing seq", "/seq", del("seq")},
		{"seq zero", "/seq", set("seq", 0)},
		{"negative seq", "/seq", set("seq", -1)},
		{"fractional seq", "/seq", set("seq", 2.5)},
		{"seq as string", "/seq", set("seq", "1204")},
		{"schema 2", "/schema", set("schema", 2)},
		{"missing schema", "/schema", del("schema")},
		{"time without milliseconds", "/time", set("time", "2026-12-02T03:14:07Z")},
		{"time with microseconds", "/time", set("time", "2026-12-02T03:14:07.250000Z")},
		{"time not UTC", "/time", set("time", "2026-12-02T04:14:07.250+01:00")},
		{"time as a number", "/time", set("time", 1796181247250)},
		{"impossible date", "/time", set("time", "2026-02-30T03:14:07.250Z")},
		{"missing time", "/time", del("time")},
		{"extra top-level field", "/colour", set("colour", "blue")},
		{"empty asset", "/asset", set("asset", "")},
		{"wildcard in site", "/site", set("site", "obrin+vale")},
	}
	for _, kind := range Kinds {
		if kind == "command" {
			continue
		}
		var names []string
		for name := range ex[kind] {
			names = append(names, name)
		}
		sort.Strings(names)
		first := ex[kind][names[0]]
		for _, c := range cases {
			err := Validate(kind, mutate(t, first, c.f))
			if err == nil {
				t.Errorf("%s, %s: accepted", kind, c.name)
				continue
			}
			if msg := err.Error(); !strings.HasPrefix(msg, kind+" payload: ") || !strings.Contains(msg, c.field+":") {
				t.Errorf("%s, %s: error %q does not name the kind and %s", kind, c.name, msg, c.field)
			}
		}
		if err := Validate(kind, mutate(t, first, set("kind", "other"))); err == nil || !strings.Contains(err.Error(), "/kind:") {
			t.Errorf("%s with another kind: %v", kind, err)
		}
	}
}

// Each kind's own rules.
func TestKindViolations(t *testing.T) {
	ex := examples()
	cases := []struct {
		kind, example, name, field string
		f                          func(map[string]any)
	}{
		{"alarm", "raised", "unknown state name", "/state", set("state", "ACTIVE")},
		{"alarm", "raised", "lower-case state name", "/state", set("state", "unack")},
		{"alarm", "raised", "unknown change", "/change", set("change", "escalated")},
		{"alarm", "raised", "code not matching change", "/code", set("code", "alarm.cleared")},
		{"alarm", "raised", "unknown severity", "/severity", set("severity", "critical")},
		{"alarm", "raised", "unknown machine state", "/machine", set("machine", "idle")},
		{"alarm", "raised", "four bands", "/bands", set("bands", []any{
			map[string]any{"low_hz": 1, "high_hz": 2, "deviation_sd": 3}, map[string]any{"low_hz": 1, "high_hz": 2, "deviation_sd": 3},
			map[string]any{"low_hz": 1, "high_hz": 2, "deviation_sd": 3}, map[string]any{"low_hz": 1, "high_hz": 2, "deviation_sd": 3}})},
		{"alarm", "raised", "band without deviation", "/bands/0/deviation_sd", del("bands.0.deviation_sd")},
		{"alarm", "raised", "missing bands", "/bands", del("bands")},
		{"alarm", "raised", "score above 2", "/score", set("score", 2.5)},
		{"alarm", "raised", "clip id 0", "/evidence_clip_id", set("evidence_clip_id", 0)},
		{"alarm", "shelved", "shelve without its end", "/shelved_until", del("shelved_until")},
		{"alarm", "escalated", "escalation without its old severity", "/from_severity", del("from_severity")},
		{"alarm", "escalated", "from severity none", "/from_severity", set("from_severity", "none")},
		{"summary", "hourly", "unknown worst state", "/worst_state", set("worst_state", "ALARM")},
		{"summary", "hourly", "running fraction above 1", "/running_fraction", set("running_fraction", 1.2)},
		{"summary", "hourly", "period end without milliseconds", "/period_end", set("period_end", "2026-12-02T03:00:00Z")},
		{"summary", "hourly", "unknown sensor fault", "/sensor/active/0", set("sensor.active", []any{"hum"})},
		{"summary", "hourly", "extra sensor field", "/sensor/score", set("sensor.score", 1)},
		{"summary", "hourly", "negative drops", "/messages_dropped", set("messages_dropped", -1)},
		{"diagnostic", "sensor", "active fault without active", "/active", del("active")},
		{"diagnostic", "sensor", "active fault said cleared", "/active", set("active", false)},
		{"diagnostic", "capture", "capture with active", "/active", set("active", true)},
		{"diagnostic", "sensor", "unknown code", "/code", set("code", "sensor.hum.active")},
		{"diagnostic", "sensor", "source not matching code", "/source", set("source", "capture")},
		{"diagnostic", "sensor", "value not a number", "/values/limit", set("values.limit", "0.01")},
		{"diagnostic", "sensor", "value name with capitals", "/values/Limit_dBFS", set("values.Limit_dBFS", 1)},
		{"diagnostic", "sensor", "missing values", "/values", del("values")},
		{"state", "stopped", "unknown machine code", "/code", set("code", "machine.idle")},
		{"state", "stopped", "active on a state message", "/active", set("active", true)},
		{"status", "online", "unknown state", "/state", set("state", "starting")},
		{"status", "online", "unknown alarm state name", "/alarm_state", set("alarm_state", "UNACKED")},
		{"status", "online", "online with a reason", "/reason", set("reason", "stopped")},
		{"status", "online", "online without outbox", "/outbox", del("outbox")},
		{"status", "online", "score without last window", "/last_window", del("last_window")},
		{"status", "online", "drops of an unknown kind", "/outbox/dropped_by_kind/status", set("outbox.dropped_by_kind.status", 1)},
		{"status", "online", "short config hash", "/config_sha256", set("config_sha256", "9b2d")},
		{"status", "online", "baseline enrolled not UTC", "/baseline/enrolled", set("baseline.enrolled", "2026-11-02T04:14:07.250+01:00")},
		{"status", "will", "unknown offline reason", "/reason", set("reason", "crashed")},
		{"status", "will", "offline without reason", "/reason", del("reason")},
		{"status", "will", "offline with live state", "/machine", set("machine", "running")},
		{"response", "ok", "ok with an error", "/error", set("error", map[string]any{"code": "failed", "message": "x"})},
		{"response", "ok", "ok without request id", "/request_id", set("request_id", "")},
		{"response", "ok", "ok with an unknown action", "/action", set("action", "reboot")},
		{"response", "refused", "refused without error", "/error", del("error")},
		{"response", "refused", "unknown error code", "/error/code", set("error.code", "timeout")},
		{"response", "refused", "unknown alarm state", "/alarm_state", set("alarm_state", "OK")},
		{"command", "acknowledge", "schema 2", "/schema", set("schema", 2)},
		{"command", "acknowledge", "extra field", "/colour", set("colour", "red")},
		{"command", "acknowledge", "acknowledge without by", "/by", del("by")},
		{"command", "acknowledge", "unknown action", "/action", set("action", "reboot")},
		{"command", "acknowledge", "request id with a space", "/request_id", set("request_id", "scada 7731")},
		{"command", "acknowledge", "request id too long", "/request_id", set("request_id", strings.Repeat("r", 65))},
		{"command", "acknowledge", "issued not a time", "/issued", set("issued", "2026-12-02 03:14")},
		{"command", "acknowledge", "missing issued", "/issued", del("issued")},
		{"command", "shelve", "shelve without duration", "/duration_s", del("duration_s")},
		{"command", "shelve", "shelve for 8 days", "/duration_s", set("duration_s", 8*86400)},
		{"command", "shelve", "shelve without reason", "/reason", del("reason")},
	}
	for _, c := range cases {
		v, ok := ex[c.kind][c.example]
		if !ok {
			t.Fatalf("no example %s %s", c.kind, c.example)
		}
		err := Validate(c.kind, mutate(t, v, c.f))
		if err == nil {
			t.Errorf("%s, %s: accepted", c.kind, c.name)
			continue
		}
		if msg := err.Error(); !strings.HasPrefix(msg, c.kind+" payload: ") || !strings.Contains(msg, c.field+":") {
			t.Errorf("%s, %s: error %q does not name the kind and %s", c.kind, c.name, msg, c.field)
		}
	}
}

// The command schema and ParseCommand agree on what a bridge may send.
func TestCommandSchemaAgreesWithParser(t *testing.T) {
	const issued = `"issued":"2026-12-02T03:14:07.250Z"`
	for _, p := range []string{
		`{"schema":1,"request_id":"a.b_c:d-9","action":"acknowledge","by":"shift-b.lead",` + issued + `}`,
		`{"schema":1,"request_id":"r-2","action":"shelve","by":"x","reason":"y","duration_s":0.5,"issued":"2026-12-02T03:14:07Z"}`,
		`{"schema":1,"request_id":"r-3","action":"shelve","by":"x","reason":"y","duration_s":604800,"issued":"2026-12-02T04:14:07.1+01:00"}`,
		`{"schema":1,"request_id":"r-4","action":"status",` + issued + `}`,
		`{"schema":1,"request_id":"r-5","action":"unshelve","by":"x",` + issued + `}`,
		`{"schema":1,"request_id":"r-6","action":"shelve","by":"x","reason":"y","duration_s":604801,` + issued + `}`,
		`{"schema":1,"request_id":"r-7","action":"shelve","by":"x","reason":"y","duration_s":0,` + issued + `}`,
		`{"schema":1,"request_id":"r-8","action":"shelve","by":"x","duration_s":60,` + issued + `}`,
		`{"schema":1,"request_id":"r-9","action":"unshelve",` + issued + `}`,
		`{"schema":1,"request_id":"r-10","action":"reboot",` + issued + `}`,
		`{"schema":1,"request_id":"` + strings.Repeat("7", 64) + `","action":"status",` + issued + `}`,
		`{"schema":1,"request_id":"` + strings.Repeat("7", 65) + `","action":"status",` + issued + `}`,
		`{"schema":1,"request_id":"r/11","action":"status",` + issued + `}`,
		`{"schema":1,"request_id":"","action":"status",` + issued + `}`,
		`{"schema":2,"request_id":"r-12","action":"status",` + issued + `}`,
		`{"schema":1,"request_id":"r-13","action":"status"}`,
		`{"schema":1,"request_id":"r-14","action":"status","issued":"yesterday"}`,
		`{"schema":1,"request_id":"r-15","action":"status","extra":1,` + issued + `}`,
		`{"schema":1,"request_id":"r-16","action":"acknowledge","by":"` + strings.Repeat("b", 65) + `",` + issued + `}`,
		`{"schema":1,"request_id":"r-17","action":"shelve","by":"x","reason":"` + strings.Repeat("y", 201) + `","duration_s":60,` + issued + `}`,
		`{"schema":1,"request_id":"r-18","action":"shelve","by":"x","reason":"` + strings.Repeat("y", 200) + `","duration_s":60,` + issued + `}`,
		`[]`,
	} {
		_, cerr := publish.ParseCommand([]byte(p))
		err := Validate("command", []byte(p))
		if (cerr == nil) != (err == nil) {
			t.Errorf("%.70s: parser says %v, schema says %v", p, cerr, err)
		}
	}
}

// Validate from many goroutines at once, first use included (run with
// -race to make this count).
func TestValidateConcurrently(t *testing.T) {
	b, _ := json.Marshal(examples()["alarm"]["raised"])
	var wg sync.WaitGroup
	errs := make(chan error, 64)
	for range 16 {
		wg.Go(func() {
			for range 4 {
				if err := Validate("alarm", b); err != nil {
					errs <- err
				}
				if err := Validate("alarm", b[:len(b)-1]); err == nil {
					errs <- fmt.Errorf("truncated payload accepted")
				}
			}
		})
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	if err := Validate("telemetry", b); err == nil || !strings.Contains(err.Error(), "telemetry") {
		t.Errorf("unknown kind: %v", err)
	}
}

// loadSchema returns the parsed schema file of kind.
func loadSchema(t *testing.T, kind string) map[string]any {
	t.Helper()
	b, err := FS.ReadFile(kind + ".schema.json")
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatalf("%s: %v", kind, err)
	}
	return m
}

// The embedded files are exactly one per kind, each names itself and its
// draft, and every field has a description.
func TestSchemaFiles(t *testing.T) {
	names, err := fs.Glob(FS, "*")
	if err != nil {
		t.Fatal(err)
	}
	var want []string
	for _, k := range Kinds {
		want = append(want, k+".schema.json")
	}
	sort.Strings(want)
	if !slices.Equal(names, want) {
		t.Errorf("files %v, want %v", names, want)
	}
	for _, kind := range Kinds {
		s := loadSchema(t, kind)
		if s["$id"] != "https://auscult.invalid/schema/"+kind+".schema.json" || s["$id"] != URL(kind) {
			t.Errorf("%s: $id %v", kind, s["$id"])
		}
		if s["$schema"] != "https://json-schema.org/draft/2020-12/schema" {
			t.Errorf("%s: $schema %v", kind, s["$schema"])
		}
		if s["additionalProperties"] != false {
			t.Errorf("%s: open at the top", kind)
		}
		props := s["properties"].(map[string]any)
		if kind != "command" {
			if k := props["kind"].(map[string]any)["const"]; k != kind {
				t.Errorf("%s: kind const %v", kind, k)
			}
		}
		if v := props["schema"].(map[string]any)["const"]; v != float64(publish.SchemaVersion) {
			t.Errorf("%s: schema const %v, the code says %d", kind, v, publish.SchemaVersion)
		}
		described(t, kind, "", s)
	}
}

// Every schema's time pattern is StampPattern, and publish.Stamp's output
// matches it whatever the time's zone; other layouts do not.
func TestStampPattern(t *testing.T) {
	for _, kind := range Kinds {
		if kind == "command" {
			continue // "issued" is the bridge's time: any RFC 3339
		}
		stamp := loadSchema(t, kind)["$defs"].(map[string]any)["stamp"].(map[string]any)
		if stamp["pattern"] != StampPattern || stamp["format"] != "date-time" || stamp["type"] != "string" {
			t.Errorf("%s: stamp %v", kind, stamp)
		}
	}
	re := regexp.MustCompile(StampPattern)
	east := time.FixedZone("east", 5*3600+30*60)
	for _, tm := range []time.Time{t0, t0.In(east), time.Date(2027, 1, 1, 0, 0, 0, 0, east), time.Date(2028, 2, 29, 23, 59, 59, 999999999, time.UTC),
		time.Unix(0, 0), t0.Add(7 * time.Millisecond)} {
		if s := publish.Stamp(tm); !re.MatchString(s) {
			t.Errorf("Stamp(%v) = %s does not match", tm, s)
		}
	}
	for _, s := range []string{t0.Format(time.RFC3339), t0.Format(time.RFC3339Nano), t0.In(east).Format("2006-01-02T15:04:05.000Z07:00"),
		"2026-12-02T03:14:07.250z", "2026-12-02 03:14:07.250Z", "2026-13-02T03:14:07.250Z", "2026-12-02T24:14:07.250Z"} {
		if re.MatchString(s) {
			t.Errorf("%s matches", s)
		}
	}
}

// described checks that every property below s, through nested objects
// and array items, has a description.
func described(t *testing.T, kind, at string, s map[string]any) {
	props, _ := s["properties"].(map[string]any)
	for name, p := range props {
		ps, ok := p.(map[string]any)
		if !ok {
			t.Errorf("%s: %s/%s is not an object schema", kind, at, name)
			continue
		}
		if d, _ := ps["description"].(string); len(d) < 8 {
			t.Errorf("%s: %s/%s has no description", kind, at, name)
		}
		described(t, kind, at+"/"+name, ps)
		if items, ok := ps["items"].(map[string]any); ok {
			described(t, kind, at+"/"+name+"/items", items)
		}
	}
}

// enum returns the string enum (or const) of a property.
func enum(t *testing.T, kind, path string) []string {
	t.Helper()
	s := loadSchema(t, kind)
	for _, k := range strings.Split(path, ".") {
		if k == "[]" {
			s = s["items"].(map[string]any)
			continue
		}
		s = s["properties"].(map[string]any)[k].(map[string]any)
	}
	var out []string
	for _, v := range s["enum"].([]any) {
		out = append(out, v.(string))
	}
	sort.Strings(out)
	return out
}

func sorted(s ...string) []string {
	s = slices.Clone(s)
	sort.Strings(s)
	return s
}

// stringConsts returns the values of the string constants of a file of
// package publish whose names start with prefix.
func stringConsts(t *testing.T, file, prefix string) []string {
	t.Helper()
	f, err := parser.ParseFile(token.NewFileSet(), "../"+file, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	ast.Inspect(f, func(n ast.Node) bool {
		vs, ok := n.(*ast.ValueSpec)
		if !ok {
			return true
		}
		for i, name := range vs.Names {
			if !strings.HasPrefix(name.Name, prefix) || i >= len(vs.Values) {
				continue
			}
			if lit, ok := vs.Values[i].(*ast.BasicLit); ok && lit.Kind == token.STRING {
				v, _ := strconv.Unquote(lit.Value)
				out = append(out, v)
			}
		}
		return true
	})
	if len(out) == 0 {
		t.Fatalf("no %s constants in %s", prefix, file)
	}
	sort.Strings(out)
	return out
}

// The enums are the names the code uses: ISA-18.2 states, change kinds and
// severities of package alarm, machine states and sensor faults of package
// gate, and the constants of package publish.
func TestEnumsMatchCode(t *testing.T) {
	var states, changes, severities, machine, faults []string
	for s := alarm.State(0); !strings.HasPrefix(s.String(), "State("); s++ {
		states = append(states, s.String())
	}
	for k := alarm.Kind(1); !strings.HasPrefix(k.String(), "Kind("); k++ {
		changes = append(changes, k.String())
	}
	for s := alarm.Severity(0); !strings.HasPrefix(s.String(), "Severity("); s++ {
		severities = append(severities, s.String())
	}
	for s := gate.State(0); s.String() != "invalid"; s++ {
		machine = append(machine, s.String())
	}
	for k := gate.Kind(0); k < gate.NumKinds; k++ {
		faults = append(faults, k.String())
	}
	if len(states) != 5 || len(changes) != 6 || len(severities) != 3 || len(machine) != 3 || len(faults) < 5 {
		t.Fatalf("names from the code: %v %v %v %v %v", states, changes, severities, machine, faults)
	}
	states, changes, severities, machine, faults = sorted(states...), sorted(changes...), sorted(severities...), sorted(machine...), sorted(faults...)
	legacy := func(s []string) []string { return sorted(append(slices.Clone(s), "unknown")...) }
	checks := []struct {
		kind, path string
		want       []string
	}{
		{"alarm", "state", legacy(states)}, // "unknown": events recorded before labels were stored
		{"alarm", "change", changes},
		{"alarm", "severity", legacy(severities)},
		{"alarm", "from_severity", sorted("warning", "alarm")},
		{"alarm", "machine", machine},
		{"summary", "worst_state", states},
		{"summary", "sensor.active.[]", faults},
		{"status", "alarm_state", states},
		{"status", "severity", severities},
		{"status", "machine", machine},
		{"status", "sensor_faults.[]", faults},
		{"status", "reason", stringConsts(t, "status.go", "Reason")},
		{"status", "state", sorted("online", "offline")},
		{"response", "alarm_state", states},
		{"response", "error.code", stringConsts(t, "command.go", "Code")},
		{"command", "action", stringConsts(t, "command.go", "Action")},
	}
	for _, c := range checks {
		if got := enum(t, c.kind, c.path); !slices.Equal(got, c.want) {
			t.Errorf("%s %s: schema %v, code %v", c.kind, c.path, got, c.want)
		}
	}
	if got := sorted(Kinds...); !slices.Equal(got, stringConsts(t, "topics.go", "Kind")) {
		t.Errorf("kinds %v, topics.go has %v", got, stringConsts(t, "topics.go", "Kind"))
	}
}

// Every exported field of the payload structs is in its kind's schema
// under its JSON name, with a matching type, required exactly when it is
// always sent (no omitempty); and the schema has no property the structs
// lack. Every struct with JSON fields in payload.go, status.go and
// command.go is covered.
func TestSchemasMatchStructs(t *testing.T) {
	roots := map[string]reflect.Type{
		"status": reflect.TypeFor[publish.Status](), "alarm": reflect.TypeFor[publish.Alarm](),
		"summary": reflect.TypeFor[publish.Summary](), "diagnostic": reflect.TypeFor[publish.Event](),
		"state": reflect.TypeFor[publish.Event](), "command": reflect.TypeFor[publish.Command](),
		"response": reflect.TypeFor[publish.Response](),
	}
	seen := map[string]bool{}
	for _, kind := range Kinds {
		root := loadSchema(t, kind)
		matchStruct(t, kind, "", roots[kind], root, root, seen)
	}
	var declared []string
	for _, file := range []string{"payload.go", "status.go", "command.go"} {
		declared = append(declared, jsonStructs(t, file)...)
	}
	sort.Strings(declared)
	var covered []string
	for name := range seen {
		covered = append(covered, name)
	}
	sort.Strings(covered)
	if !slices.Equal(declared, covered) {
		t.Errorf("structs with JSON fields %v, covered by the schemas %v", declared, covered)
	}
}

// jsonStructs names the struct types of a file that have json tags.
func jsonStructs(t *testing.T, file string) []string {
	f, err := parser.ParseFile(token.NewFileSet(), "../"+file, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	ast.Inspect(f, func(n ast.Node) bool {
		ts, ok := n.(*ast.TypeSpec)
		if !ok {
			return true
		}
		if st, ok := ts.Type.(*ast.StructType); ok {
			for _, fl := range st.Fields.List {
				if fl.Tag != nil && strings.Contains(fl.Tag.Value, `json:"`) {
					out = append(out, ts.Name.Name)
					break
				}
			}
		}
		return true
	})
	return out
}

type field struct {
	name      string
	omitempty bool
	typ       reflect.Type
}

// jsonFields lists the JSON fields of a struct type, embedded structs
// flattened, unexported fields skipped.
func jsonFields(t reflect.Type, seen map[string]bool) []field {
	seen[t.Name()] = true
	var out []field
	for f := range t.Fields() {
		if f.Anonymous && f.Type.Kind() == reflect.Struct {
			out = append(out, jsonFields(f.Type, seen)...)
			continue
		}
		if !f.IsExported() {
			continue
		}
		tag := f.Tag.Get("json")
		name, opts, _ := strings.Cut(tag, ",")
		if name == "-" {
			continue
		}
		if name == "" {
			name = f.Name
		}
		out = append(out, field{name: name, omitempty: strings.Contains(opts, "omitempty"), typ: f.Type})
	}
	return out
}

func matchStruct(t *testing.T, kind, at string, typ reflect.Type, s, root map[string]any, seen map[string]bool) {
	t.Helper()
	if s["additionalProperties"] != false {
		t.Errorf("%s %s: the object of %s is not closed", kind, at, typ.Name())
	}
	props, _ := s["properties"].(map[string]any)
	required := map[string]bool{}
	if r, ok := s["required"].([]any); ok {
		for _, n := range r {
			required[n.(string)] = true
		}
	}
	fields := jsonFields(typ, seen)
	names := map[string]bool{}
	for _, f := range fields {
		names[f.name] = true
		path := at + "/" + f.name
		p, ok := props[f.name].(map[string]any)
		if !ok {
			t.Errorf("%s: field %s (%s.%s) is not in the schema", kind, path, typ.Name(), f.name)
			continue
		}
		if !f.omitempty && !required[f.name] {
			t.Errorf("%s: %s is always sent but not required", kind, path)
		}
		if f.omitempty && required[f.name] {
			t.Errorf("%s: %s may be left out (omitempty) but is required", kind, path)
		}
		ft := f.typ
		if ft.Kind() == reflect.Pointer {
			ft = ft.Elem()
		}
		if _, forbidden := p["not"]; forbidden && len(p) == 2 {
			continue // a field of the shared struct this kind never sends
		}
		if got, want := jsonType(t, p, root), wantType(ft); got != want {
			t.Errorf("%s: %s is %s in the schema, %s (%v) in the code", kind, path, got, want, ft)
		}
		if k := ft.Kind(); k >= reflect.Uint && k <= reflect.Uint64 {
			if m, ok := p["minimum"].(float64); !ok || m < 0 {
				t.Errorf("%s: %s is unsigned in the code, the schema lets it go negative", kind, path)
			}
		}
		switch {
		case ft.Kind() == reflect.Struct:
			matchStruct(t, kind, path, ft, p, root, seen)
		case ft.Kind() == reflect.Slice && ft.Elem().Kind() == reflect.Struct:
			matchStruct(t, kind, path+"/items", ft.Elem(), p["items"].(map[string]any), root, seen)
		}
	}
	for name := range props {
		if !names[name] {
			t.Errorf("%s: schema property %s/%s has no field in %s", kind, at, name, typ.Name())
		}
	}
}

func wantType(t reflect.Type) string {
	switch t.Kind() {
	case reflect.String:
		return "string"
	case reflect.Bool:
		return "boolean"
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		return "integer"
	case reflect.Float32, reflect.Float64:
		return "number"
	case reflect.Slice, reflect.Array:
		return "array"
	case reflect.Map, reflect.Struct:
		return "object"
	}
	return t.Kind().String()
}

// jsonType is the JSON type a property schema allows: its "type", else
// that of its enum or const values, else that of its $ref.
func jsonType(t *testing.T, p, root map[string]any) string {
	if ty, ok := p["type"].(string); ok {
		return ty
	}
	if ref, ok := p["$ref"].(string); ok {
		name, ok := strings.CutPrefix(ref, "#/$defs/")
		if !ok {
			t.Fatalf("reference %s outside the file", ref)
		}
		return jsonType(t, root["$defs"].(map[string]any)[name].(map[string]any), root)
	}
	vals, _ := p["enum"].([]any)
	if c, ok := p["const"]; ok {
		vals = append(vals, c)
	}
	types := map[string]bool{}
	for _, v := range vals {
		switch v := v.(type) {
		case string:
			types["string"] = true
		case bool:
			types["boolean"] = true
		case float64:
			if v == float64(int64(v)) {
				types["integer"] = true
			} else {
				types["number"] = true
			}
		default:
			types[fmt.Sprintf("%T", v)] = true
		}
	}
	if len(types) != 1 {
		return fmt.Sprintf("unclear (%v)", p)
	}
	for ty := range types {
		return ty
	}
	return ""
}

var kindHeading = regexp.MustCompile("^## `(" + strings.Join(Kinds, "|") + ")`")

// docSections reads docs/messages.md: the ```json blocks and the text of
// each "## `kind`" section, by kind.
func docSections(t *testing.T) (blocks map[string][]string, text map[string]string) {
	t.Helper()
	f, err := os.Open("../../../docs/messages.md")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	blocks, text = map[string][]string{}, map[string]string{}
	section, line := "", 0
	var block *strings.Builder
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		l := sc.Text()
		line++
		switch {
		case block != nil && strings.HasPrefix(l, "```"):
			if section == "" {
				t.Errorf("messages.md:%d: a json block outside a kind's section", line)
			} else {
				blocks[section] = append(blocks[section], block.String())
			}
			block = nil
		case block != nil:
			block.WriteString(l + "\n")
		case strings.HasPrefix(l, "```json"):
			block = &strings.Builder{}
		case strings.HasPrefix(l, "## "):
			section = ""
			if m := kindHeading.FindStringSubmatch(l); m != nil {
				section = m[1]
			}
		case strings.HasPrefix(l, "# "):
			section = ""
		}
		if section != "" {
			text[section] += l + "\n"
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if block != nil {
		t.Error("messages.md: a json block is not closed")
	}
	return blocks, text
}

// The examples in docs/messages.md are valid, each kind has at least one,
// and each kind's field table names every field of its schema.
func TestDocExamples(t *testing.T) {
	blocks, text := docSections(t)
	doc, err := os.ReadFile("../../../docs/messages.md")
	if err != nil {
		t.Fatal(err)
	}
	all := string(doc)
	envelope := map[string]bool{"schema": true, "kind": true, "site": true, "asset": true, "seq": true, "time": true}
	for _, kind := range Kinds {
		if len(blocks[kind]) == 0 {
			t.Errorf("messages.md: no example under a \"## `%s`\" heading", kind)
		}
		for i, b := range blocks[kind] {
			if err := Validate(kind, []byte(b)); err != nil {
				t.Errorf("messages.md: %s example %d: %v", kind, i+1, err)
			}
		}
		var names []string
		var walk func(prefix string, s map[string]any)
		walk = func(prefix string, s map[string]any) {
			props, _ := s["properties"].(map[string]any)
			for name, p := range props {
				ps := p.(map[string]any)
				if _, parent := ps["properties"]; !parent {
					names = append(names, prefix+name) // an object is named through its fields
				}
				walk(prefix+name+".", ps)
				if items, ok := ps["items"].(map[string]any); ok {
					walk(prefix+name+"[].", items)
				}
			}
		}
		walk("", loadSchema(t, kind))
		for _, n := range names {
			if kind == "state" && n == "active" {
				continue // never sent on state messages
			}
			if envelope[n] && kind != "command" {
				if !strings.Contains(all, "`"+n+"`") {
					t.Errorf("messages.md does not name the envelope's `%s`", n)
				}
				continue // described once, for every kind
			}
			if !strings.Contains(text[kind], "`"+n+"`") {
				t.Errorf("messages.md: the %s section does not name `%s`", kind, n)
			}
		}
	}
}
