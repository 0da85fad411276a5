package store

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

func TestLockedByAnotherProcess(t *testing.T) {
	path := filepath.Join(t.TempDir(), "obrinvale.db")
	c := startChild(t, "hold", path, 0)
	cases := []struct {
		name string
		opt  Options
	}{
		{"read-only open", Options{ReadOnly: true, Timeout: 300 * time.Millisecond}},
		{"second writer", Options{Timeout: 300 * time.Millisecond, FlushInterval: -1}},
		{"no wait", Options{ReadOnly: true, Timeout: -1}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			begin := time.Now()
			s, err := Open(path, tc.opt)
			waited := time.Since(begin)
			if err == nil {
				s.Close()
				t.Fatal("opened a file another process holds")
			}
			if !errors.Is(err, ErrLocked) || !strings.Contains(err.Error(), path) || !strings.Contains(err.Error(), "another agent") {
				t.Errorf("error %q, want ErrLocked naming %s and the other agent", err, path)
			}
			// bbolt gives up after Timeout less its 50 ms retry step; the
			// check is that the option reached bbolt, not a speed.
			if tc.opt.Timeout > 0 && waited < tc.opt.Timeout-100*time.Millisecond {
				t.Errorf("gave up after %v, before the %v timeout", waited, tc.opt.Timeout)
			}
		})
	}
	c.kill()
	s := mustOpenAt(t, path, Options{ReadOnly: true, Timeout: 5 * time.Second})
	if _, err := s.Stats(); err != nil {
		t.Errorf("after the holder died: %v", err)
	}
}
