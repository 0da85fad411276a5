package store

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"math"
	"strings"
	"testing"
	"time"
)

func TestBaselineHistory(t *testing.T) {
	s := mustOpen(t, testOptions())
	if _, err := s.Baseline(0); !errors.Is(err, ErrNotFound) {
		t.Errorf("newest of none: %v, want ErrNotFound", err)
	}
	file := []byte("baseline file bytes")
	steps := []struct {
		name string
		b    Baseline
		want error
	}{
		{"first", Baseline{Created: t0, FileID: "a1b2c3d4e5f6", Asset: "P-492B", Label: "commissioning", Threshold: 0.41, File: file}, nil},
		{"second without previous", Baseline{Created: t0.Add(time.Hour)}, ErrBaselineConflict},
		{"second after the first", Baseline{Created: t0.Add(time.Hour), Previous: 1, Distance: 0.031, Label: "after bearing change"}, nil},
		{"stale previous", Baseline{Created: t0.Add(2 * time.Hour), Previous: 1, Distance: 0.02}, ErrBaselineConflict},
		{"not comparable", Baseline{Created: t0.Add(3 * time.Hour), Previous: 2, Distance: math.NaN()}, nil},
	}
	for _, st := range steps {
		if _, err := s.AddBaseline(st.b); !errors.Is(err, st.want) {
			t.Fatalf("%s: %v, want %v", st.name, err, st.want)
		}
	}
	all, err := s.Baselines()
	if err != nil {
		t.Fatal(err)
	}
	if len(all) != 3 || all[0].ID != 1 || all[1].Previous != 1 || all[1].Distance != 0.031 ||
		!math.IsNaN(all[2].Distance) || all[0].Distance != 0 || all[0].File != nil {
		t.Errorf("history %+v", all)
	}
	first, err := s.Baseline(1)
	sum := sha256.Sum256(file)
	if err != nil || string(first.File) != string(file) || first.SHA256 != hex.EncodeToString(sum[:]) ||
		first.FileID != "a1b2c3d4e5f6" || first.Threshold != 0.41 || !first.Created.Equal(t0) {
		t.Errorf("baseline 1: %+v, %v", first, err)
	}
	if newest, err := s.Baseline(0); err != nil || newest.ID != 3 {
		t.Errorf("newest: %d, %v; want 3", newest.ID, err)
	}
}

func TestBaselineValidation(t *testing.T) {
	s := mustOpen(t, testOptions())
	cases := []struct {
		name string
		b    Baseline
		says string
	}{
		{"zero created", Baseline{}, "zero time"},
		{"distance without previous", Baseline{Created: t0, Distance: 0.1}, "without a previous"},
		{"negative distance", Baseline{Created: t0, Previous: 1, Distance: -0.1}, "not negative"},
		{"infinite distance", Baseline{Created: t0, Previous: 1, Distance: math.Inf(1)}, "finite"},
		{"label too long", Baseline{Created: t0, Label: strings.Repeat("l", 257)}, "label is 257 bytes"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := s.AddBaseline(c.b)
			if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.says) {
				t.Errorf("error %v, want ErrInvalid mentioning %q", err, c.says)
			}
		})
	}
}
