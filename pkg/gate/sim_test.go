package gate

import (
	"fmt"
	"strings"
	"testing"

	"github.com/auscult/auscult/pkg/sim"
)

// The scenario every SNR runs, in 10 s chunks of the simulator's stream.
const (
	stopChunk    = 5  // machine switched off at 50 s
	restartChunk = 10 // and on again at 100 s
	gainUpChunk  = 15 // +3 dB gain drift from 150 s
	gainDnChunk  = 19 // -3 dB gain drift from 190 s
	slowChunk    = 23 // lowest set-point from 230 s
	totalChunks  = 27
)

func scenario(m sim.Machine) func(int) chunkPlan {
	top, low := m.Setpoints[len(m.Setpoints)-1], m.Setpoints[0]
	return func(k int) chunkPlan {
		c := chunkPlan{setpoint: top}
		switch {
		case k >= stopChunk && k < restartChunk:
			c.stopped = true
		case k >= gainUpChunk && k < gainDnChunk:
			c.gainDB = 3
		case k >= gainDnChunk && k < slowChunk:
			c.gainDB = -3
		case k >= slowChunk:
			c.setpoint = low
		}
		return c
	}
}

// outcome summarises one run of the scenario.
type outcome struct {
	startS              float64 // when the gate first left Unknown, s
	stopDelay, runDelay int     // windows from switch-off/on to the event; -1: never
	spurious            int     // state changes not asked for by the scenario
	runScore, stopScore float64 // mean anomaly distance while running / once stopped
	stopOver            float64 // share of stopped windows above the alarm threshold
	events              []MachineEvent
}

func judge(out []gated, events []MachineEvent, stepSamples int64, threshold float64) outcome {
	o := outcome{startS: -1, stopDelay: -1, runDelay: -1, events: events}
	stopAt, runAt := int64(stopChunk*simChunk), int64(restartChunk*simChunk)
	for _, e := range events {
		switch {
		case e.From == Unknown && o.startS < 0:
			o.startS = float64(e.SamplePos) / simRate
			if e.To != Running {
				o.spurious++
			}
		case e.To == Stopped && e.SamplePos >= stopAt && e.SamplePos < runAt && o.stopDelay < 0:
			o.stopDelay = int((e.SamplePos - stopAt + stepSamples - 1) / stepSamples)
		case e.To == Running && e.SamplePos >= runAt && o.stopDelay >= 0 && o.runDelay < 0:
			o.runDelay = int((e.SamplePos - runAt + stepSamples - 1) / stepSamples)
		default:
			o.spurious++
		}
	}
	var nr, ns int
	for _, w := range out {
		switch {
		case w.end <= stopAt || w.start >= runAt:
			o.runScore += w.score
			nr++
		case w.start >= stopAt:
			o.stopScore += w.score
			ns++
			if w.score > threshold {
				o.stopOver++
			}
		}
	}
	o.runScore /= float64(max(nr, 1))
	o.stopScore /= float64(max(ns, 1))
	o.stopOver /= float64(max(ns, 1))
	return o
}

// TestMachineOnSimulator enrols a simulated pump at each SNR (three minutes
// cycling through its set-points), then streams a fresh recording of it:
// running, switched off for 50 s, running again, a +3 dB and a -3 dB gain
// drift, and a change to its lowest set-point. The gate must read running
// while it runs, stopped soon after switch-off and running soon after
// restart, and nothing else. Lower SNRs, where this no longer holds, and
// more pumps are measured by TestMachineSweep.
func TestMachineOnSimulator(t *testing.T) {
	const maxDelay = 8 // windows, about 16 s, of which the 10 s window itself takes 5
	tests := []struct {
		name string
		seed int64
		snr  float64
	}{
		{"seed1/+10dB", 1, 10},
		{"seed1/+3dB", 1, 3},
		{"seed1/0dB", 1, 0},
		{"seed2/0dB", 2, 0},
	}
	if testing.Short() {
		tests = tests[2:3]
	}
	var table strings.Builder
	fmt.Fprintf(&table, "%-12s %-8s %-9s %-8s %-9s %-15s %s\n", "case", "start s", "stop win", "run win", "spurious",
		"score run/stop", "stopped over threshold")
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			m := sim.NewMachine(tc.seed)
			b, ref := enrolSim(t, m, tc.snr, 180)
			if ref.Lines.Empty() {
				t.Fatalf("no lines learnt for seed %d at %g dB", tc.seed, tc.snr)
			}
			out, events := runGate(t, m, b, ref, tc.snr, totalChunks, scenario(m))
			step := int64(b.Embed.Step * b.Embed.SubHops * b.Features.Hop)
			o := judge(out, events, step, b.Calib.Threshold)
			fmt.Fprintf(&table, "%-12s %-8.1f %-9d %-8d %-9d %.3f/%.3f     %.0f %%\n", tc.name, o.startS, o.stopDelay, o.runDelay,
				o.spurious, o.runScore, o.stopScore, 100*o.stopOver)
			for _, e := range events {
				t.Logf("%s -> %s at %.1f s (onset %.1f s): level %.1f dBFS, drop %.1f dB, match %.2f",
					e.From, e.To, float64(e.SamplePos)/simRate, float64(e.OnsetPos)/simRate, e.LevelDBFS, e.DropDB, e.Match)
			}
			if o.startS < 0 || o.startS > 20 {
				t.Errorf("left Unknown at %.1f s, want running by 20 s", o.startS)
			}
			if o.stopDelay < 0 || o.stopDelay > maxDelay {
				t.Errorf("stop detected after %d windows, want 0 to %d", o.stopDelay, maxDelay)
			}
			if o.runDelay < 0 || o.runDelay > maxDelay {
				t.Errorf("restart detected after %d windows, want 0 to %d", o.runDelay, maxDelay)
			}
			if o.spurious != 0 {
				t.Errorf("%d state changes the scenario did not ask for (gain drift, set-point change or flicker)", o.spurious)
			}
		})
	}
	t.Logf("windows every 2.048 s; delays count windows after the switch\n%s", table.String())
}
