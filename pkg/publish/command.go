package publish

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"time"
	"unicode/utf8"
)

// Command actions.
const (
	ActionAcknowledge = "acknowledge"
	ActionShelve      = "shelve"
	ActionUnshelve    = "unshelve"
	ActionStatus      = "status"
)

// Error codes of a command response.
const (
	CodeTooLarge      = "too_large"
	CodeMalformed     = "malformed"
	CodeSchema        = "unsupported_schema"
	CodeUnknownAction = "unknown_action"
	CodeBadField      = "bad_field"
	CodeStale         = "stale"
	CodeReplayed      = "replayed"
	CodeRefused       = "refused"
	CodeFailed        = "failed"
)

// Command is an operator's request, as received on the command topic.
type Command struct {
	Schema    int     `json:"schema"`
	RequestID string  `json:"request_id"`
	Action    string  `json:"action"`
	By        string  `json:"by,omitempty"`
	Reason    string  `json:"reason,omitempty"`
	DurationS float64 `json:"duration_s,omitempty"`
	Issued    string  `json:"issued"`

	issued time.Time
}

// CommandError is the error of a refused command, as the response carries
// it.
type CommandError struct {
	Code    string `json:"code"`
	Message string `json:"message"`
}

func (e *CommandError) Error() string { return e.Code + ": " + e.Message }

func cmdErr(code, format string, a ...any) *CommandError {
	return &CommandError{Code: code, Message: fmt.Sprintf(format, a...)}
}

// ParseCommand checks a command payload: at most MaxCommandBytes of UTF-8
// JSON, one object with known fields only, schema 1, a request id of 1 to
// 64 letters, digits and "._:-", a known action with the fields it needs,
// and an RFC 3339 "issued" time. It never panics; the error says what is
// wrong in words a bridge developer can act on. The request id is
// returned with the error when it could be read.
func ParseCommand(b []byte) (Command, *CommandError) {
	var c Command
	if len(b) > MaxCommandBytes {
		return c, cmdErr(CodeTooLarge, "payload is %d bytes, at most %d", len(b), MaxCommandBytes)
	}
	if !utf8.Valid(b) {
		return c, cmdErr(CodeMalformed, "payload is not UTF-8 text")
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&c); err != nil {
		var id struct {
			RequestID string `json:"request_id"`
		}
		_ = json.Unmarshal(b, &id)
		c = Command{}
		if validID(id.RequestID) {
			c.RequestID = id.RequestID
		}
		return c, cmdErr(CodeMalformed, "not a command object: %v", err)
	}
	if _, err := dec.Token(); !errors.Is(err, io.EOF) {
		return c, cmdErr(CodeMalformed, "data after the command object")
	}
	if !validID(c.RequestID) {
		id := c.RequestID
		c.RequestID = ""
		return c, cmdErr(CodeBadField, "request_id %q: want 1 to 64 letters, digits, '.', '_', ':' or '-'", clip(id))
	}
	if c.Schema != SchemaVersion {
		return c, cmdErr(CodeSchema, "schema %d: this agent reads schema %d", c.Schema, SchemaVersion)
	}
	t, err := time.Parse(time.RFC3339Nano, c.Issued)
	if err != nil {
		return c, cmdErr(CodeBadField, "issued %q: want an RFC 3339 time such as 2026-12-02T03:14:07.250Z", clip(c.Issued))
	}
	c.issued = t
	if len(c.By) > 64 || len(c.Reason) > 200 {
		return c, cmdErr(CodeBadField, "by is at most 64 bytes and reason at most 200")
	}
	switch c.Action {
	case ActionAcknowledge, ActionUnshelve:
		if c.By == "" {
			return c, cmdErr(CodeBadField, "%s needs \"by\": who asks", c.Action)
		}
	case ActionShelve:
		if c.By == "" || c.Reason == "" {
			return c, cmdErr(CodeBadField, "shelve needs \"by\" and \"reason\"")
		}
		if !(c.DurationS > 0) || c.DurationS > 7*24*3600 {
			return c, cmdErr(CodeBadField, "shelve needs duration_s above 0 (the agent's own limit applies too)")
		}
	case ActionStatus:
	default:
		return c, cmdErr(CodeUnknownAction, "action %q: want acknowledge, shelve, unshelve or status", clip(c.Action))
	}
	return c, nil
}

func validID(s string) bool {
	if s == "" || len(s) > 64 {
		return false
	}
	for _, r := range s {
		ok := r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '.' || r == '_' || r == ':' || r == '-'
		if !ok {
			return false
		}
	}
	return true
}

// clip shortens a string quoted in an error.
func clip(s string) string {
	if len(s) > 40 {
		s = s[:40] + "..."
	}
	return s
}

// Response answers one command on the response topic.
type Response struct {
	Envelope
	RequestID  string        `json:"request_id"`
	Action     string        `json:"action,omitempty"`
	OK         bool          `json:"ok"`
	Error      *CommandError `json:"error,omitempty"`
	AlarmState string        `json:"alarm_state,omitempty"`
}
