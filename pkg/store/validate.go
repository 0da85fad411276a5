package store

import (
	"fmt"
	"math"
	"unicode"
	"unicode/utf8"
)

// checkToken requires 1..max bytes of a-z, 0-9 or the extra characters.
func checkToken(kind, field, s string, max int, extra string) error {
	if s == "" || len(s) > max {
		return fmt.Errorf("%w: %s: %s %q must be 1 to %d bytes", ErrInvalid, kind, field, s, max)
	}
	for _, r := range s {
		ok := (r >= 'a' && r <= 'z') || (r >= '0' && r <= '9')
		for _, x := range extra {
			ok = ok || r == x
		}
		if !ok {
			return fmt.Errorf("%w: %s: %s %q may hold only a-z, 0-9 and %q", ErrInvalid, kind, field, s, extra)
		}
	}
	return nil
}

// checkText requires valid UTF-8 without control characters other than
// newline and tab, at most max bytes; empty is allowed.
func checkText(kind, field, s string, max int) error {
	if len(s) > max {
		return fmt.Errorf("%w: %s: %s is %d bytes, at most %d", ErrInvalid, kind, field, len(s), max)
	}
	if !utf8.ValidString(s) {
		return fmt.Errorf("%w: %s: %s is not valid UTF-8", ErrInvalid, kind, field)
	}
	for _, r := range s {
		if unicode.IsControl(r) && r != '\n' && r != '\t' {
			return fmt.Errorf("%w: %s: %s holds control character %U", ErrInvalid, kind, field, r)
		}
	}
	return nil
}

// checkFinite refuses NaN and infinities, which JSON cannot hold and
// which no plot can draw.
func checkFinite(kind, field string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("%w: %s: %s is %v, must be finite", ErrInvalid, kind, field, v)
	}
	return nil
}

// checkUnit requires a finite value in [0, 1].
func checkUnit(kind, field string, v float64) error {
	if err := checkFinite(kind, field, v); err != nil {
		return err
	}
	if v < 0 || v > 1 {
		return fmt.Errorf("%w: %s: %s %v is outside [0, 1]", ErrInvalid, kind, field, v)
	}
	return nil
}
