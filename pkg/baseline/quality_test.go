package baseline

import (
	"errors"
	"strings"
	"testing"
)

func levels(n int, v float64) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = v + float64(i%3)*0.5
	}
	return out
}

func TestCheckQuality(t *testing.T) {
	good := Recording{Name: "train/a.wav", Seconds: 600, LevelsDBFS: levels(300, -30)}
	cases := []struct {
		name string
		recs []Recording
		want error
		says string
	}{
		{"good", []Recording{good}, nil, ""},
		{"too short", []Recording{{Name: "x.wav", Seconds: 20, LevelsDBFS: levels(8, -30)}}, ErrTooShort, "20 s"},
		{"silent", []Recording{good, {Name: "dead.wav", Seconds: 60, LevelsDBFS: levels(30, -95)}}, ErrSilent, "dead.wav"},
		{"clipped", []Recording{good, {Name: "hot.wav", Seconds: 60, LevelsDBFS: levels(30, -3), ClipFraction: 0.02}}, ErrClipped, "hot.wav"},
		{"pump stopped midway", []Recording{{Name: "stop.wav", Seconds: 600,
			LevelsDBFS: append(levels(150, -30), levels(150, -58)...)}}, ErrNonStationary, "stop.wav"},
		{"two gain settings", []Recording{good, {Name: "b.wav", Seconds: 600, LevelsDBFS: levels(300, -60)}}, ErrNonStationary, "differ"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := CheckQuality(c.recs, DefaultQualityLimits())
			if c.want == nil {
				if err != nil {
					t.Fatal(err)
				}
				return
			}
			if !errors.Is(err, c.want) || !strings.Contains(err.Error(), c.says) {
				t.Fatalf("got %v, want %v mentioning %q", err, c.want, c.says)
			}
		})
	}
}
