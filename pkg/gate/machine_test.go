package gate

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
)

// synthRef is a reference with three line bands, one template, healthy
// level -30 +- 1 dBFS (so the healthy range is +-6 dB).
func synthRef() Reference {
	return Reference{
		Level:  baseline.LevelStats{MeanDBFS: -30, StdDB: 1},
		Layout: testLayout(8, 40),
		Lines:  Lines{Bands: []int{18, 22, 30}, Hz: []float64{1, 2, 3}, Templates: [][]float32{{10, 10, 10}}, MatchP10: 0.9},
	}
}

// win describes a run of synthetic windows: n windows at levelDB (relative
// to the healthy mean) with lines of the given height (dB) at the line
// bands.
type win struct {
	n       int
	levelDB float64
	lineDB  float32
}

// step is the synthetic window step, in samples.
const step = 32768

func feedMachine(g *Machine, ref Reference, runs []win) []MachineEvent {
	r := rand.New(rand.NewPCG(1, 2))
	var ev []MachineEvent
	var idx int64
	for _, run := range runs {
		for range run.n {
			v := lineVec(ref.Layout, r, 0.3, run.lineDB, ref.Lines.Bands...)
			w := embed.Window{Index: idx, Start: idx * step, End: idx*step + 5*step/2, Vec: v,
				LevelDBFS: ref.Level.MeanDBFS + run.levelDB}
			ev = g.Update(&w, ev)
			idx++
		}
	}
	return ev
}

type change struct {
	to     State
	window int64
}

func TestMachineDecisions(t *testing.T) {
	const on, off float32 = 10, 0 // line heights: present, gone
	tests := []struct {
		name    string
		noLines bool
		runs    []win
		want    []change
	}{
		{"starts unknown, then running", false, []win{{2, 0, on}}, nil},
		{"running after three windows", false, []win{{5, 0, on}}, []change{{Running, 2}}},
		{"stopped from the start", false, []win{{5, -2, off}}, []change{{Stopped, 2}}},
		{"stop after three windows", false, []win{{5, 0, on}, {5, -3, off}}, []change{{Running, 2}, {Stopped, 7}}},
		{"stop at low SNR: level unchanged", false, []win{{5, 0, on}, {5, 0, off}}, []change{{Running, 2}, {Stopped, 7}}},
		{"restart after three windows", false, []win{{5, 0, on}, {5, -3, off}, {4, 0, on}},
			[]change{{Running, 2}, {Stopped, 7}, {Running, 12}}},
		{"two windows of lines do not restart", false, []win{{5, 0, on}, {5, -3, off}, {2, 0, on}, {3, -3, off}},
			[]change{{Running, 2}, {Stopped, 7}}},
		{"two-window dropout does not stop", false, []win{{5, 0, on}, {2, -3, off}, {5, 0, on}}, []change{{Running, 2}}},
		{"gain +3 dB", false, []win{{5, 0, on}, {10, 3, on}}, []change{{Running, 2}}},
		{"gain -3 dB", false, []win{{5, 0, on}, {10, -3, on}}, []change{{Running, 2}}},
		{"microphone 12 dB less sensitive, lines there", false, []win{{5, 0, on}, {10, -12, on}}, []change{{Running, 2}}},
		{"lines masked by a louder sound", false, []win{{5, 0, on}, {10, 8, off}}, []change{{Running, 2}}},
		// Lines of 6 dB match 0.6, between the thresholds (0.55*0.9 and
		// 0.8*0.9): such a window says nothing, unless the level is far below healthy.
		{"weak lines say nothing", false, []win{{5, 0, on}, {10, -3, 6}}, []change{{Running, 2}}},
		{"weak lines and a deep drop", false, []win{{5, 0, on}, {5, -10, 6}}, []change{{Running, 2}, {Stopped, 7}}},
		// Unsure windows neither count nor reset the dwell.
		{"unsure windows inside a stop", false, []win{{5, 0, on}, {2, 0, off}, {3, 0, 6}, {1, 0, off}},
			[]change{{Running, 2}, {Stopped, 10}}},
		{"level only: running", true, []win{{5, -3, off}}, []change{{Running, 2}}},
		{"level only: stop needs a deep drop", true, []win{{5, 0, off}, {5, -5, off}, {5, -7, off}},
			[]change{{Running, 2}, {Stopped, 12}}},
		// Back to running needs the level 2 dB above the bottom of the range.
		{"level only: hysteresis", true, []win{{5, 0, off}, {3, -7, off}, {5, -5, off}, {3, -3.5, off}},
			[]change{{Running, 2}, {Stopped, 7}, {Running, 15}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			ref := synthRef()
			if tc.noLines {
				ref.Lines = Lines{}
			}
			g, err := NewMachine(DefaultMachineConfig(), ref)
			if err != nil {
				t.Fatal(err)
			}
			ev := feedMachine(g, ref, tc.runs)
			if len(ev) != len(tc.want) {
				t.Fatalf("events %+v, want %+v", ev, tc.want)
			}
			from := Unknown
			for i, e := range ev {
				w := tc.want[i]
				if e.From != from || e.To != w.to || e.Window != w.window || e.SamplePos != w.window*step+5*step/2 {
					t.Errorf("event %d = %+v, want %s -> %s at window %d", i, e, from, w.to, w.window)
				}
				from = e.To
			}
			if g.State() != from {
				t.Errorf("State() = %s, want %s", g.State(), from)
			}
		})
	}
}

// The onset of a change is the start of the first window of its evidence,
// and the event carries the confirming window's measurements.
func TestMachineEventValues(t *testing.T) {
	ref := synthRef()
	g, err := NewMachine(DefaultMachineConfig(), ref)
	if err != nil {
		t.Fatal(err)
	}
	ev := feedMachine(g, ref, []win{{5, 0, 10}, {3, -4, 0}})
	if len(ev) != 2 {
		t.Fatalf("events %+v", ev)
	}
	e := ev[1]
	if e.OnsetPos != 5*step || e.DropDB != 4 || e.LevelDBFS != -34 || e.Match > 0.2 {
		t.Errorf("stop event %+v, want onset %d, drop 4 dB, level -34 dBFS, match near 0", e, 5*step)
	}
	if d := g.Last(); d.Window != 7 || d.Evidence != Stopped || d.State != Stopped {
		t.Errorf("Last() = %+v", d)
	}
	ev = g.Reset(9*step, ev[:0])
	if len(ev) != 1 || ev[0].From != Stopped || ev[0].To != Unknown || ev[0].SamplePos != 9*step || g.State() != Unknown {
		t.Errorf("Reset: %+v, state %s", ev, g.State())
	}
	if ev = g.Reset(10*step, ev[:0]); len(ev) != 0 {
		t.Errorf("second Reset made events %+v", ev)
	}
}

func TestNewMachineRejects(t *testing.T) {
	tests := []struct {
		name string
		edit func(*MachineConfig, *Reference)
		want error
	}{
		{"span", func(c *MachineConfig, _ *Reference) { c.LevelSpanDB = 0 }, ErrConfig},
		{"thresholds crossed", func(c *MachineConfig, _ *Reference) { c.StopMatch = 0.9 }, ErrConfig},
		{"hysteresis beyond span", func(c *MachineConfig, _ *Reference) { c.LevelHysteresisDB = 7 }, ErrConfig},
		{"dwell", func(c *MachineConfig, _ *Reference) { c.RunWindows = 0 }, ErrConfig},
		{"level NaN", func(_ *MachineConfig, r *Reference) { r.Level.MeanDBFS = math.NaN() }, ErrReference},
		{"no layout", func(_ *MachineConfig, r *Reference) { r.Layout = nil }, ErrReference},
		{"band in the mel part", func(_ *MachineConfig, r *Reference) { r.Lines.Bands[0] = 4 }, ErrReference},
		{"band at the fine view's edge", func(_ *MachineConfig, r *Reference) { r.Lines.Bands[2] = 46 }, ErrReference},
		{"template length", func(_ *MachineConfig, r *Reference) { r.Lines.Templates[0] = []float32{1} }, ErrReference},
		{"negative template", func(_ *MachineConfig, r *Reference) { r.Lines.Templates[0][1] = -1 }, ErrReference},
		{"zero template", func(_ *MachineConfig, r *Reference) { r.Lines.Templates[0] = []float32{0, 0, 0} }, ErrReference},
		{"no templates", func(_ *MachineConfig, r *Reference) { r.Lines.Templates = nil }, ErrReference},
		{"match p10", func(_ *MachineConfig, r *Reference) { r.Lines.MatchP10 = 0 }, ErrReference},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c, r := DefaultMachineConfig(), synthRef()
			tc.edit(&c, &r)
			if _, err := NewMachine(c, r); !errors.Is(err, tc.want) {
				t.Errorf("err %v, want %v", err, tc.want)
			}
		})
	}
}

func TestStateString(t *testing.T) {
	for s, want := range map[State]string{Unknown: "unknown", Running: "running", Stopped: "stopped", 9: "invalid"} {
		if s.String() != want {
			t.Errorf("State(%d) = %q, want %q", s, s.String(), want)
		}
	}
}
