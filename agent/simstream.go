package main

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"
	"time"

	"github.com/auscult/auscult/pkg/sim"
)

// phase is one stretch of a streamed simulation.
type phase struct {
	what     string // "healthy", "stopped" or a fault name
	severity string
	length   time.Duration
}

// parseScript reads a stream script: comma-separated phases WHAT@DURATION,
// WHAT being healthy, stopped or FAULT/SEVERITY (e.g. bearing_outer/mild).
func parseScript(s string) ([]phase, error) {
	var out []phase
	for _, part := range strings.Split(s, ",") {
		what, dur, ok := strings.Cut(strings.TrimSpace(part), "@")
		d, err := time.ParseDuration(dur)
		if !ok || err != nil || d < 10*time.Second {
			return nil, usagef("--script phase %q: want WHAT@DURATION with a duration of 10s or more, e.g. healthy@3h", part)
		}
		p := phase{what: what, length: d}
		if fault, sev, isFault := strings.Cut(what, "/"); isFault {
			if !slices.Contains(sim.Faults(), fault) || !slices.Contains(sim.Severities(), sev) {
				return nil, usagef("--script phase %q: unknown fault or severity; faults: %s; severities: %s",
					part, strings.Join(sim.Faults(), ", "), strings.Join(sim.Severities(), ", "))
			}
			p.what, p.severity = fault, sev
		} else if what != "healthy" && what != "stopped" {
			return nil, usagef("--script phase %q: want healthy, stopped or FAULT/SEVERITY", part)
		}
		out = append(out, p)
	}
	return out, nil
}

// streamSim writes the scripted simulation as raw s16le mono PCM to w.
// Healthy running moves to the next drive set-point every ten minutes.
// take picks another recording of the same machine.
func streamSim(w io.Writer, seed int64, take int, snr float64, rate int, phases []phase) error {
	m := sim.NewMachine(seed)
	s := sim.NewStream(m, sim.Clip{SNRdB: snr, SetpointHz: m.Setpoints[0], Seed: uint64(seed)*7919 + 1 + uint64(take)*104729}, rate)
	bw := bufio.NewWriterSize(w, 1<<16)
	chunk := 10 * rate // sim.Stream renders 10 s chunks; conditions change between them
	buf := make([]int16, chunk)
	var elapsed time.Duration
	for _, p := range phases {
		for t := time.Duration(0); t < p.length; t += 10 * time.Second {
			sp := m.Setpoints[int((elapsed+t)/(10*time.Minute))%len(m.Setpoints)]
			s.SetStopped(p.what == "stopped")
			fault := ""
			if p.what != "healthy" && p.what != "stopped" {
				fault = p.what
			}
			s.SetCondition(sp, fault, p.severity)
			s.Read(buf)
			if err := binary.Write(bw, binary.LittleEndian, buf); err != nil {
				return err
			}
		}
		elapsed += p.length
	}
	return bw.Flush()
}

func snrAllowed(snr float64) bool {
	return slices.ContainsFunc(sim.SNRSet(), func(x float64) bool { return math.Abs(x-snr) < 1e-9 })
}

func describeScript(phases []phase) string {
	var parts []string
	for _, p := range phases {
		w := p.what
		if p.severity != "" {
			w += " (" + p.severity + ")"
		}
		parts = append(parts, fmt.Sprintf("%s for %v", w, p.length))
	}
	return strings.Join(parts, ", then ")
}
