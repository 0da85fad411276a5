package monitor

import (
	"context"
	"io"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/enrol"
	"github.com/auscult/auscult/pkg/gate"
	"github.com/auscult/auscult/pkg/sim"
	"github.com/auscult/auscult/pkg/store"
)

const (
	simRate  = 16000
	simChunk = 10 * simRate // sim.Stream renders 10 s chunks
)

// act is what the machine does during one 10 s chunk.
type act struct {
	stopped  bool
	setpoint int // index into the machine's set-points
	fault    string
}

// script is an audio source reading a sim.Stream chunk by chunk, setting the
// conditions of each chunk from plan before it is rendered.
type script struct {
	m    sim.Machine
	s    *sim.Stream
	plan []act
	at   int64
}

func newScript(m sim.Machine, snr float64, seed uint64, plan []act) *script {
	return &script{m: m, s: sim.NewStream(m, sim.Clip{SNRdB: snr, SetpointHz: m.Setpoints[0], Seed: seed}, simRate), plan: plan}
}

func (s *script) Rate() int { return simRate }

func (s *script) Read(p []int16) (int, error) {
	end := int64(len(s.plan)) * simChunk
	if s.at >= end {
		return 0, io.EOF
	}
	p = p[:min(int64(len(p)), end-s.at)]
	if k := (s.at + simChunk - 1) / simChunk; k*simChunk < s.at+int64(len(p)) && k < int64(len(s.plan)) {
		a := s.plan[k]
		sev := ""
		if a.fault != "" {
			sev = "severe"
		}
		s.s.SetStopped(a.stopped)
		s.s.SetCondition(s.m.Setpoints[a.setpoint%len(s.m.Setpoints)], a.fault, sev)
	}
	n, _ := s.s.Read(p)
	s.at += int64(n)
	return n, nil
}

func repeat(a act, chunks int) []act {
	out := make([]act, chunks)
	for i := range out {
		out[i] = a
		if !a.stopped && a.fault == "" {
			out[i].setpoint = i / 3 // healthy running visits every set-point
		}
	}
	return out
}

// enrolled learns a baseline from six minutes of the simulated pump through
// the same enrolment code as the enroll command.
func enrolled(t *testing.T, m sim.Machine, snr float64) (*baseline.Baseline, gate.Lines) {
	t.Helper()
	e, err := enrol.New(enrol.DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	if err := e.Add("healthy", newScript(m, snr, 5, repeat(act{}, 36)), nil); err != nil {
		t.Fatal(err)
	}
	b, err := e.Finish()
	if err != nil {
		t.Fatal(err)
	}
	lines, err := enrol.Lines(b)
	if err != nil {
		t.Fatal(err)
	}
	return b, lines
}

// The live loop end to end on simulated audio with a real bbolt log: healthy
// running raises nothing, a severe fault raises an alarm within a bounded
// delay of its onset and clears after it goes, a stopped pump is an event
// and raises nothing, and the raise carries bands and an evidence clip.
func TestHealthyFaultStopped(t *testing.T) {
	if testing.Short() {
		t.Skip("renders about 15 minutes of simulated sound")
	}
	m := sim.NewMachine(3)
	b, lines := enrolled(t, m, 10)
	st, err := store.Open(filepath.Join(t.TempDir(), "log.db"), store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	start := time.Date(2026, 12, 1, 3, 0, 0, 0, time.UTC)
	mon, err := New(Config{Baseline: b, Asset: "P-492B", Lines: lines,
		Clock: func(pos int64) time.Time { return start.Add(time.Duration(pos) * time.Second / simRate) }}, st)
	if err != nil {
		t.Fatal(err)
	}
	var plan []act
	plan = append(plan, repeat(act{}, 18)...)                            // 0-3 min healthy
	faultAt := len(plan) * 10                                            // seconds
	plan = append(plan, repeat(act{fault: sim.FaultBearingOuter}, 6)...) // 3-4 min fault
	faultEnd := len(plan) * 10
	plan = append(plan, repeat(act{}, 12)...) // 4-6 min healthy again
	stopAt := len(plan) * 10
	plan = append(plan, repeat(act{stopped: true}, 9)...) // 6-7.5 min stopped
	restartAt := len(plan) * 10
	plan = append(plan, repeat(act{}, 9)...) // running again
	if err := mon.Run(context.Background(), newScript(m, 10, 77, plan)); err != nil {
		t.Fatal(err)
	}
	if err := st.Flush(); err != nil {
		t.Fatal(err)
	}
	evs, err := st.Events(store.EventQuery{})
	if err != nil {
		t.Fatal(err)
	}
	var raised []store.Event
	var cleared, stopped, running []time.Time
	for _, e := range evs {
		t.Logf("%s %-22s %s", e.Time.Format("15:04:05"), e.Code, e.Message)
		switch {
		case strings.HasSuffix(e.Code, ".raised"):
			raised = append(raised, e)
		case e.Code == "alarm.cleared" || e.Code == "warning.cleared":
			cleared = append(cleared, e.Time)
		case e.Code == "machine.stopped":
			stopped = append(stopped, e.Time)
		case e.Code == "machine.running":
			running = append(running, e.Time)
		}
	}
	sec := func(tm time.Time) float64 { return tm.Sub(start).Seconds() }
	if len(raised) != 1 {
		t.Fatalf("want exactly one raise (the fault), got %d", len(raised))
	}
	r := raised[0]
	delay := sec(r.Time) - float64(faultAt)
	t.Logf("alarm raised %.1f s after the fault's onset (%s)", delay, r.Code)
	// Goal from the issue: under 10 s at default settings. The window is
	// 5.1 s long and the debounce needs 3 of 5 windows 2 s apart.
	if r.Code != "alarm.raised" || delay < 0 || delay > 10 {
		t.Errorf("raise %s %.1f s after onset, want alarm.raised within 10 s", r.Code, delay)
	}
	if r.Values["band1_hi_hz"] <= 0 {
		t.Errorf("raise carries no deviating band: %v", r.Values)
	}
	if len(cleared) == 0 || sec(cleared[0]) < float64(faultEnd) || sec(cleared[0]) > float64(faultEnd)+60 {
		t.Errorf("clear times %v, want one within a minute after the fault ended at %d s", cleared, faultEnd)
	}
	if len(stopped) != 1 || sec(stopped[0]) < float64(stopAt) || sec(stopped[0]) > float64(stopAt)+20 {
		t.Errorf("stop events %v, want one within 20 s of %d s", stopped, stopAt)
	}
	if len(running) < 2 || sec(running[len(running)-1]) < float64(restartAt) {
		t.Errorf("running events %v, want the restart after %d s", running, restartAt)
	}
	clips, err := st.Clips(store.Range{})
	if err != nil {
		t.Fatal(err)
	}
	if len(clips) != 1 || clips[0].EventSeq != r.Seq || clips[0].Duration < 19*time.Second || clips[0].ID != r.ClipID {
		t.Errorf("clips %+v, want one of about 20 s for event %d under the id it names, %d", clips, r.Seq, r.ClipID)
	}
	if r.Labels["state"] != "UNACK" || r.Labels["severity"] != "alarm" || r.Labels["machine"] != "running" ||
		r.Labels["change"] != "raised" {
		t.Errorf("raise labels %v", r.Labels)
	}
	trend, err := st.Trend(store.Range{})
	if err != nil {
		t.Fatal(err)
	}
	if want := len(plan) / 6; len(trend) < want || len(trend) > want+1 {
		t.Errorf("%d trend points, want %d (one a minute)", len(trend), want)
	}
}
