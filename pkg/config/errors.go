package config

import (
	"errors"
	"fmt"
)

// ErrInvalid is returned (wrapped in a *FieldError or joined list of them)
// when the file parses but a value is unknown, of the wrong type or out of
// range.
var ErrInvalid = errors.New("config: invalid")

// FieldError is one problem with one field: File and Line say where (Line is
// 0 when the field was left out), Path is the dotted key path.
type FieldError struct {
	File string
	Line int
	Path string
	Msg  string
}

func (e *FieldError) Error() string {
	switch {
	case e.Line > 0:
		return fmt.Sprintf("%s:%d: %s: %s", e.File, e.Line, e.Path, e.Msg)
	case e.Path != "":
		return fmt.Sprintf("%s: %s: %s", e.File, e.Path, e.Msg)
	}
	return fmt.Sprintf("%s: %s", e.File, e.Msg)
}

// Unwrap lets errors.Is(err, ErrInvalid) hold for every field error.
func (e *FieldError) Unwrap() error { return ErrInvalid }
