package main

import (
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

// crashKills is how many times TestRunSurvivesSIGKILL kills the agent.
const crashKills = 24

// crashRepeats is how many times the crash test replays the simulated test
// recordings in one run, so that a run at speed 0 lasts long enough (about
// 2 s here; one pass of the 33 recordings takes about 0.25 s) for most
// kills to land while it is scoring and writing.
const crashRepeats = 8

// crashMaxDelay bounds the random wait between "listening" and SIGKILL.
const crashMaxDelay = 1500 * time.Millisecond

// slogAttrs parses one line of log/slog's text format (key=value pairs
// separated by spaces, values quoted with strconv.Quote when they need it)
// into its keys and values. It stops at the first part that is not a pair,
// so a line that is not slog output gives few or no keys.
func slogAttrs(line string) map[string]string {
	out := make(map[string]string)
	s := line
	for {
		s = strings.TrimLeft(s, " ")
		eq := strings.IndexByte(s, '=')
		if eq <= 0 || strings.ContainsAny(s[:eq], " \"") {
			return out
		}
		key := s[:eq]
		s = s[eq+1:]
		var val string
		if strings.HasPrefix(s, `"`) {
			q, err := strconv.QuotedPrefix(s)
			if err != nil {
				return out
			}
			val, _ = strconv.Unquote(q)
			s = s[len(q):]
		} else {
			end := strings.IndexByte(s, ' ')
			if end < 0 {
				end = len(s)
			}
			val, s = s[:end], s[end:]
		}
		out[key] = val
	}
}

func TestSlogAttrs(t *testing.T) {
	for _, c := range []struct {
		name, line string
		want       map[string]string
	}{
		{"event", `time=2026-05-11T03:04:03.723Z level=INFO msg="warning raised (state UNACK): 3 of 5 at \"0.78\"" asset=P-492B event=warning.raised seq=2 score=0.8559722327828992`,
			map[string]string{"time": "2026-05-11T03:04:03.723Z", "level": "INFO", "msg": `warning raised (state UNACK): 3 of 5 at "0.78"`,
				"asset": "P-492B", "event": "warning.raised", "seq": "2", "score": "0.8559722327828992"}},
		{"clip", `time=x level=INFO msg="evidence clip stored" asset=P-492B clip=1 event_seq=2 seconds=20`,
			map[string]string{"time": "x", "level": "INFO", "msg": "evidence clip stored", "asset": "P-492B",
				"clip": "1", "event_seq": "2", "seconds": "20"}},
		{"not slog", "panic: runtime error: index out of range [3] with length 3", map[string]string{}},
		{"cut quote", `time=x msg="unterminated seq=3`, map[string]string{"time": "x"}},
		{"empty", "", map[string]string{}},
	} {
		t.Run(c.name, func(t *testing.T) {
			got := slogAttrs(c.line)
			if fmt.Sprint(got) != fmt.Sprint(c.want) {
				t.Errorf("slogAttrs(%q)\n got %v\nwant %v", c.line, got, c.want)
			}
		})
	}
}

// reportedEvent is an event the agent said it stored: one stderr line with
// event= and seq=, logged after AppendEvent returned.
type reportedEvent struct {
	code, msg, asset string
	score            float64
	line             string
}

// reportedClip is an evidence clip the agent said it stored.
type reportedClip struct {
	eventSeq uint64
	seconds  float64
	line     string
}

// crashLedger collects what every agent process reported stored, across
// all runs on one log.
type crashLedger struct {
	events map[uint64]reportedEvent
	clips  map[uint64]reportedClip
}

// add reads one process's stderr lines into the ledger and returns how
// many events it reported. A seq or clip id reported twice (by this run or
// an earlier one) is an error: the store promises never to reuse them.
func (l *crashLedger) add(t *testing.T, run string, lines []string) (events int) {
	t.Helper()
	for _, line := range lines {
		a := slogAttrs(line)
		if code, ok := a["event"]; ok {
			seq, err := strconv.ParseUint(a["seq"], 10, 64)
			if err != nil {
				t.Errorf("%s: event line without a numeric seq: %s", run, line)
				continue
			}
			if seq == 0 {
				t.Errorf("%s: the agent failed to store an event (seq=0): %s", run, line)
				continue
			}
			score, err := strconv.ParseFloat(a["score"], 64)
			if err != nil {
				t.Errorf("%s: event line without a numeric score: %s", run, line)
			}
			if old, dup := l.events[seq]; dup {
				t.Errorf("%s: seq %d reported again:\n%s\nearlier:\n%s", run, seq, line, old.line)
			}
			l.events[seq] = reportedEvent{code: code, msg: a["msg"], asset: a["asset"], score: score, line: line}
			events++
		}
		if a["msg"] == "evidence clip stored" {
			id, err1 := strconv.ParseUint(a["clip"], 10, 64)
			ev, err2 := strconv.ParseUint(a["event_seq"], 10, 64)
			sec, err3 := strconv.ParseFloat(a["seconds"], 64)
			if err := errors.Join(err1, err2, err3); err != nil || id == 0 {
				t.Errorf("%s: clip line unreadable or clip not stored (%v): %s", run, err, line)
				continue
			}
			if old, dup := l.clips[id]; dup {
				t.Errorf("%s: clip %d reported again:\n%s\nearlier:\n%s", run, id, line, old.line)
			}
			l.clips[id] = reportedClip{eventSeq: ev, seconds: sec, line: line}
		}
	}
	return events
}

// check opens the log read-only and checks it against the ledger and
// against what the previous check saw (prev, nil at first): every reported
// event and clip is there and the same, sequence numbers run 1..n without
// a gap, every event seen before is still there unchanged, and every clip
// names a stored event. It returns the events stored.
func (l *crashLedger) check(t *testing.T, run, logPath string, prev []store.Event) []store.Event {
	t.Helper()
	st, err := store.Open(logPath, store.Options{ReadOnly: true, Timeout: 5 * time.Second})
	if err != nil {
		t.Fatalf("%s: the log does not open after the kill: %v", run, err)
	}
	defer st.Close()
	evs, err := st.Events(store.EventQuery{Limit: 1 << 30})
	if err != nil {
		t.Fatalf("%s: reading events: %v", run, err)
	}
	bySeq := make(map[uint64]store.Event, len(evs))
	for i, e := range evs {
		if e.Seq != uint64(i+1) {
			t.Fatalf("%s: stored event %d of %d has seq %d: want 1..%d without gaps", run, i+1, len(evs), e.Seq, len(evs))
		}
		bySeq[e.Seq] = e
	}
	for seq, r := range l.events {
		e, ok := bySeq[seq]
		switch {
		case !ok:
			t.Errorf("%s: event seq %d was reported stored but is not in the log (%d events):\n%s", run, seq, len(evs), r.line)
		case e.Code != r.code || e.Message != r.msg || e.Asset != r.asset || e.Score != r.score:
			t.Errorf("%s: event seq %d stored as code %q asset %q score %v message %q\nbut reported as:\n%s",
				run, seq, e.Code, e.Asset, e.Score, e.Message, r.line)
		}
	}
	if len(evs) < len(prev) {
		t.Errorf("%s: %d events stored, %d at the previous check", run, len(evs), len(prev))
	}
	for i := range min(len(prev), len(evs)) {
		p, e := prev[i], evs[i]
		if p.Seq != e.Seq || p.Code != e.Code || p.Message != e.Message || !p.Time.Equal(e.Time) || p.Score != e.Score {
			t.Errorf("%s: event seq %d changed since the previous check: %+v, was %+v", run, e.Seq, e, p)
		}
	}
	clips, err := st.Clips(store.Range{Limit: 1 << 30})
	if err != nil {
		t.Fatalf("%s: reading clips: %v", run, err)
	}
	for _, c := range clips {
		if _, ok := bySeq[c.EventSeq]; c.EventSeq != 0 && !ok {
			t.Errorf("%s: clip %d is evidence for event %d, which is not stored", run, c.ID, c.EventSeq)
		}
	}
	for id, r := range l.clips {
		c, err := st.Clip(id)
		if err != nil {
			t.Errorf("%s: clip %d was reported stored but does not read back: %v\n%s", run, id, err, r.line)
			continue
		}
		if c.EventSeq != r.eventSeq || len(c.WAV) == 0 || c.Duration != time.Duration(r.seconds*float64(time.Second)).Round(time.Millisecond) {
			t.Errorf("%s: clip %d stored for event %d, %v, %d WAV bytes\nbut reported as:\n%s",
				run, id, c.EventSeq, c.Duration, len(c.WAV), r.line)
		}
	}
	return evs
}

// stderrLines returns a copy of the stderr lines collected so far.
func (p *process) stderrLines() []string {
	p.mu.Lock()
	defer p.mu.Unlock()
	return append([]string(nil), p.lines...)
}

// A crash must never cost the log: the real agent, replaying a folder of
// mostly faulty recordings as fast as it can into one bbolt log, is killed
// with SIGKILL at random moments, again and again. After each kill the log
// opens, every event (and evidence clip) the killed process reported stored
// is there as reported, sequence numbers have no gaps, and nothing stored
// earlier has changed. At the end a normal run on the same log still
// completes. SIGKILL tests what a dying process leaves behind; power loss
// also depends on the disk honouring fdatasync, which no test here can cut.
func TestRunSurvivesSIGKILL(t *testing.T) {
	if testing.Short() {
		t.Skip("kills the agent 24 times; skipped in -short mode")
	}
	began := time.Now()
	s := simulateSkid(t)
	// The test recordings, crashRepeats times over, as symbolic links:
	// the agent plays a folder's *.wav files in name order.
	recs, err := filepath.Glob(filepath.Join(s.dir, "test", "*.wav"))
	if err != nil || len(recs) == 0 {
		t.Fatalf("no test recordings in %s: %v", s.dir, err)
	}
	replay := filepath.Join(t.TempDir(), "replay")
	if err := os.Mkdir(replay, 0o755); err != nil {
		t.Fatal(err)
	}
	for k := range crashRepeats {
		for _, r := range recs {
			if err := os.Symlink(r, filepath.Join(replay, fmt.Sprintf("pass%d-%s", k, filepath.Base(r)))); err != nil {
				t.Fatal(err)
			}
		}
	}
	cfg, logPath := writeConfig(t, s.baseline, fmt.Sprintf("  kind: wav\n  path: %s\n  speed: 0", replay))
	agentBinary(t) // build before timing the kills
	t.Logf("set-up (simulate, enrol, build) %v", time.Since(began).Round(time.Millisecond))

	rng := rand.New(rand.NewPCG(20260511, 492))
	ledger := &crashLedger{events: map[uint64]reportedEvent{}, clips: map[uint64]reportedClip{}}
	var stored []store.Event
	// unreported counts events a killed process stored but did not live
	// to report: the kill fell between the commit and the log line.
	midRun, reportedByKilled, unreported := 0, 0, 0
	killsBegan := time.Now()
	for k := range crashKills {
		run := fmt.Sprintf("kill %d", k+1)
		p := start(t, nil, "run", "--config", cfg)
		p.waitFor(t, "listening", 20*time.Second)
		delay := time.Duration(rng.Int64N(int64(crashMaxDelay)))
		time.Sleep(delay)
		// ErrProcessDone: the run ended and was reaped before the signal.
		if err := p.cmd.Process.Signal(syscall.SIGKILL); err != nil && !errors.Is(err, os.ErrProcessDone) {
			t.Fatalf("%s: SIGKILL: %v", run, err)
		}
		var exitErr error
		select {
		case exitErr = <-p.done:
		case <-time.After(20 * time.Second):
			t.Fatalf("%s: still running 20 s after SIGKILL", run)
		}
		// Killed mid-run, or the run ended by itself before the signal.
		var ee *exec.ExitError
		ws, _ := p.cmd.ProcessState.Sys().(syscall.WaitStatus)
		killed := errors.As(exitErr, &ee) && ws.Signaled() && ws.Signal() == syscall.SIGKILL
		switch {
		case killed:
			midRun++
		case exitErr == nil && strings.Contains(p.log(), `reason="end of source"`):
		default:
			t.Fatalf("%s: exit %v, neither killed nor a clean end:\n%s", run, exitErr, p.log())
		}
		n := ledger.add(t, run, p.stderrLines())
		reportedByKilled += n
		before := len(stored)
		stored = ledger.check(t, run, logPath, stored)
		unreported += max(0, len(stored)-before-n)
		t.Logf("%s after %v: killed mid-run %v, %d events reported, %d newly stored, %d in the log",
			run, delay.Round(time.Millisecond), killed, n, len(stored)-before, len(stored))
		if t.Failed() {
			t.FailNow() // later runs would only repeat the report
		}
	}
	killTime := time.Since(killsBegan)

	// The same log, no kill: the agent opens it, plays the whole folder
	// and exits 0.
	p := start(t, nil, "run", "--config", cfg)
	select {
	case err := <-p.done:
		if err != nil {
			t.Fatalf("normal run after %d kills: %v\n%s", crashKills, err, p.log())
		}
	case <-time.After(60 * time.Second):
		t.Fatalf("normal run after %d kills still running after 60 s:\n%s", crashKills, p.log())
	}
	if !strings.Contains(p.log(), `reason="end of source"`) {
		t.Errorf("normal run did not end with its source:\n%s", p.log())
	}
	final := ledger.add(t, "normal run", p.stderrLines())
	stored = ledger.check(t, "normal run", logPath, stored)

	// Guards against a test that checks nothing: the parser found events,
	// and most kills landed while the agent was working.
	if final == 0 || len(ledger.clips) == 0 {
		t.Errorf("the normal run reported %d events and all runs %d clips; the replay of faulty recordings should give both", final, len(ledger.clips))
	}
	if reportedByKilled == 0 {
		t.Errorf("no killed process reported an event stored: the kills tested nothing")
	}
	if midRun*2 <= crashKills {
		t.Errorf("only %d of %d kills landed mid-run; the rest found the run already over", midRun, crashKills)
	}
	t.Logf("%d kills (%d mid-run) in %v; killed runs reported %d events stored (and stored %d more they did not live to report), the normal run %d; %d events and %d reported clips in the log at the end",
		crashKills, midRun, killTime.Round(time.Millisecond), reportedByKilled, unreported, final, len(stored), len(ledger.clips))
}
