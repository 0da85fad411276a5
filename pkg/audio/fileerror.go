package audio

import (
	"fmt"
	"strings"
)

// fileError is a bad-input error that names the file (or stream) and the
// byte offset where the problem was found. It wraps one sentinel from
// errors.go so that errors.Is works.
type fileError struct {
	name   string // file name; empty for an anonymous stream
	offset int64  // byte offset from the start of the file; -1 if unknown
	kind   error  // sentinel
	detail string // what exactly was wrong
}

// Error formats as "audio: NAME: KIND at byte OFFSET: DETAIL".
func (e *fileError) Error() string {
	var b strings.Builder
	b.WriteString("audio: ")
	if e.name != "" {
		b.WriteString(e.name)
		b.WriteString(": ")
	}
	b.WriteString(strings.TrimPrefix(e.kind.Error(), "audio: "))
	if e.offset >= 0 {
		fmt.Fprintf(&b, " at byte %d", e.offset)
	}
	if e.detail != "" {
		b.WriteString(": ")
		b.WriteString(e.detail)
	}
	return b.String()
}

// Unwrap returns the sentinel.
func (e *fileError) Unwrap() error { return e.kind }

// failf builds a fileError; format and args describe the detail.
func failf(name string, offset int64, kind error, format string, args ...any) error {
	return &fileError{name: name, offset: offset, kind: kind, detail: fmt.Sprintf(format, args...)}
}
