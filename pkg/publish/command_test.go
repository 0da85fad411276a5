package publish

import (
	"strings"
	"testing"
)

// Every malformed, unknown or oversized command gets a specific error
// code; good ones parse.
func TestParseCommand(t *testing.T) {
	const issued = `"issued":"2026-12-02T03:14:07.250Z"`
	cases := []struct {
		name, payload, code, id string
	}{
		{"acknowledge", `{"schema":1,"request_id":"r-1","action":"acknowledge","by":"m.okafor",` + issued + `}`, "", "r-1"},
		{"shelve", `{"schema":1,"request_id":"r-2","action":"shelve","by":"m.okafor","reason":"bearing swap","duration_s":3600,` + issued + `}`, "", "r-2"},
		{"status", `{"schema":1,"request_id":"r-3","action":"status",` + issued + `}`, "", "r-3"},
		{"too large", `{"pad":"` + strings.Repeat("x", MaxCommandBytes) + `"}`, CodeTooLarge, ""},
		{"not utf-8", "{\"request_id\":\"\xff\"}", CodeMalformed, ""},
		{"not json", `ack please`, CodeMalformed, ""},
		{"unknown field keeps the id", `{"schema":1,"request_id":"r-4","action":"status","colour":"red",` + issued + `}`, CodeMalformed, "r-4"},
		{"two objects", `{"schema":1,"request_id":"r-5","action":"status",` + issued + `}{}`, CodeMalformed, "r-5"},
		{"array", `[1,2]`, CodeMalformed, ""},
		{"bad id", `{"schema":1,"request_id":"r 6","action":"status",` + issued + `}`, CodeBadField, ""},
		{"no id", `{"schema":1,"action":"status",` + issued + `}`, CodeBadField, ""},
		{"schema 2", `{"schema":2,"request_id":"r-7","action":"status",` + issued + `}`, CodeSchema, "r-7"},
		{"no issued", `{"schema":1,"request_id":"r-8","action":"status"}`, CodeBadField, "r-8"},
		{"unknown action", `{"schema":1,"request_id":"r-9","action":"reboot",` + issued + `}`, CodeUnknownAction, "r-9"},
		{"ack without by", `{"schema":1,"request_id":"r-10","action":"acknowledge",` + issued + `}`, CodeBadField, "r-10"},
		{"shelve without reason", `{"schema":1,"request_id":"r-11","action":"shelve","by":"a","duration_s":60,` + issued + `}`, CodeBadField, "r-11"},
		{"shelve forever", `{"schema":1,"request_id":"r-12","action":"shelve","by":"a","reason":"x","duration_s":1e12,` + issued + `}`, CodeBadField, "r-12"},
		{"shelve NaN-ish", `{"schema":1,"request_id":"r-13","action":"shelve","by":"a","reason":"x","duration_s":-5,` + issued + `}`, CodeBadField, "r-13"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			cmd, err := ParseCommand([]byte(c.payload))
			switch {
			case c.code == "" && err != nil:
				t.Fatalf("refused: %v", err)
			case c.code != "" && (err == nil || err.Code != c.code):
				t.Fatalf("error %v, want code %s", err, c.code)
			}
			if cmd.RequestID != c.id {
				t.Errorf("request id %q, want %q", cmd.RequestID, c.id)
			}
			if err != nil && err.Message == "" {
				t.Error("an error without a message")
			}
		})
	}
}

// FuzzParseCommand: no input panics, and whatever is accepted is
// well-formed.
func FuzzParseCommand(f *testing.F) {
	f.Add([]byte(`{"schema":1,"request_id":"r-1","action":"acknowledge","by":"m.okafor","issued":"2026-12-02T03:14:07.250Z"}`))
	f.Add([]byte(`{"schema":1,"request_id":"r-2","action":"shelve","by":"a","reason":"b","duration_s":60,"issued":"2026-12-02T03:14:07Z"}`))
	f.Add([]byte(`{}`))
	f.Add([]byte(`{"request_id":`))
	f.Fuzz(func(t *testing.T, b []byte) {
		cmd, err := ParseCommand(b)
		if err != nil {
			if err.Code == "" || err.Message == "" {
				t.Fatalf("error without code or message: %+v", err)
			}
			if cmd.RequestID != "" && !validID(cmd.RequestID) {
				t.Fatalf("invalid request id returned with an error: %q", cmd.RequestID)
			}
			return
		}
		if !validID(cmd.RequestID) || cmd.Schema != SchemaVersion || cmd.issued.IsZero() {
			t.Fatalf("accepted a bad command: %+v", cmd)
		}
		switch cmd.Action {
		case ActionAcknowledge, ActionShelve, ActionUnshelve, ActionStatus:
		default:
			t.Fatalf("accepted action %q", cmd.Action)
		}
	})
}
