package gate

import (
	"fmt"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/auscult/auscult/pkg/sim"
)

// TestMachineSweep runs the scenario of TestMachineOnSimulator, followed by
// 60 s of severe faults, on pumps 1 to 8 at every SNR of the simulator. It
// takes minutes, so it runs only with GATE_SWEEP=1. It requires what must
// hold at any SNR: the gate never reads stopped while the machine runs,
// healthy or faulty (a false stop would hide a fault); the detection
// delays are logged as a table.
func TestMachineSweep(t *testing.T) {
	env := os.Getenv("GATE_SWEEP")
	if env == "" {
		t.Skip("set GATE_SWEEP=1 (or a list of SNRs in dB, e.g. GATE_SWEEP=0,3) to run the sweep over pumps and SNRs (minutes)")
	}
	snrs := sim.SNRSet()
	if env != "1" {
		snrs = nil
		for _, f := range strings.Split(env, ",") {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil {
				t.Fatalf("GATE_SWEEP=%q: want 1 or a comma-separated list of SNRs in dB", env)
			}
			snrs = append(snrs, v)
		}
	}
	faults := []string{sim.FaultCavitation, sim.FaultBearingOuter, sim.FaultDryRunning, sim.FaultImpellerDamage,
		sim.FaultLooseness, sim.FaultLeak}
	var table strings.Builder
	fmt.Fprintf(&table, "%-5s %-5s %-6s %-9s %-8s %-9s %-12s %s\n", "seed", "snr", "lines", "stop win", "run win", "spurious",
		"false stops", "stopped over threshold")
	for seed := int64(1); seed <= 8; seed++ {
		for _, snr := range snrs {
			m := sim.NewMachine(seed)
			b, ref := enrolSim(t, m, snr, 240)
			base := scenario(m)
			plan := func(k int) chunkPlan {
				if k < totalChunks {
					return base(k)
				}
				c := chunkPlan{setpoint: m.Setpoints[len(m.Setpoints)-1]}
				c.fault, c.severity = faults[(k-totalChunks)%len(faults)], "severe"
				return c
			}
			out, events := runGate(t, m, b, ref, snr, totalChunks+6, plan)
			step := int64(b.Embed.Step * b.Embed.SubHops * b.Features.Hop)
			o := judge(out, events, step, b.Calib.Threshold)
			falseStops := 0
			for _, e := range events {
				running := e.SamplePos < stopChunk*simChunk || e.SamplePos > restartChunk*simChunk+8*step
				if e.To == Stopped && running {
					falseStops++
					t.Errorf("seed %d, %g dB: read stopped at %.1f s while the machine ran", seed, snr, float64(e.SamplePos)/simRate)
				}
			}
			fmt.Fprintf(&table, "%-5d %-5g %-6d %-9d %-8d %-9d %-12d %.0f %%\n", seed, snr, len(ref.Lines.Bands), o.stopDelay,
				o.runDelay, o.spurious, falseStops, 100*o.stopOver)
		}
	}
	t.Logf("delays in windows after the switch (-1: not detected)\n%s", table.String())
}
