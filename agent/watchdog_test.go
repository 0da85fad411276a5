package main

import (
	"encoding/binary"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/audio"
)

// The systemd protocol as the agent speaks it, checked against a notify
// socket of our own (sd_notify(3): datagrams "READY=1", "WATCHDOG=1",
// "STOPPING=1" on the socket named by NOTIFY_SOCKET; WATCHDOG_USEC gives the
// timeout). The watchdog is fed while windows flow and stops being fed when
// the processing loop stalls (here: stdin stops delivering sound), so
// systemd would restart a stuck pipeline, not only a dead process.
func TestWatchdogFollowsTheProcessingLoop(t *testing.T) {
	agentBinary(t) // skips in -short mode, before the slow set-up
	s := simulateSkid(t)
	sock := filepath.Join(t.TempDir(), "notify.sock")
	conn, err := net.ListenUnixgram("unixgram", &net.UnixAddr{Name: sock, Net: "unixgram"})
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	type msg struct {
		at   time.Time
		text string
	}
	var mu sync.Mutex
	var msgs []msg
	go func() {
		buf := make([]byte, 256)
		for {
			n, err := conn.Read(buf)
			if err != nil {
				return
			}
			mu.Lock()
			msgs = append(msgs, msg{time.Now(), string(buf[:n])})
			mu.Unlock()
		}
	}()
	cfg, _ := writeConfig(t, s.baseline, "  kind: stdin\n  rate_hz: 16000")
	cmd := exec.Command(agentBinary(t), "run", "--config", cfg)
	cmd.Env = append(os.Environ(), "NOTIFY_SOCKET="+sock, "WATCHDOG_USEC=2000000")
	stdin, err := cmd.StdinPipe()
	if err != nil {
		t.Fatal(err)
	}
	var stderr strings.Builder
	cmd.Stderr = &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	defer cmd.Process.Kill()
	// Feed 12 s of healthy sound over 6 s, then nothing.
	files, _ := filepath.Glob(filepath.Join(s.dir, "train", "*.wav"))
	r, err := audio.OpenWAV(files[0], 0)
	if err != nil {
		t.Fatal(err)
	}
	sound := make([]int16, 10*16000)
	got, _ := r.Read(sound)
	r.Close()
	sound = sound[:got]
	for range 24 {
		binary.Write(stdin, binary.LittleEndian, sound[:8000])
		sound = append(sound[8000:], sound[:8000]...)
		time.Sleep(250 * time.Millisecond)
	}
	stopped := time.Now()
	time.Sleep(14 * time.Second) // past the 10 s stall limit
	stdin.Close()
	if err := cmd.Wait(); err != nil {
		t.Fatalf("exit: %v\n%s", err, stderr.String())
	}
	mu.Lock()
	defer mu.Unlock()
	var ready, stopping bool
	var fedWhileFlowing, fedLate int
	for _, m := range msgs {
		switch {
		case m.text == "READY=1":
			ready = true
		case m.text == "STOPPING=1":
			stopping = true
		case m.text == "WATCHDOG=1" && m.at.Before(stopped):
			fedWhileFlowing++
		case m.text == "WATCHDOG=1" && m.at.After(stopped.Add(12*time.Second)):
			fedLate++
		}
	}
	if !ready || !stopping {
		t.Errorf("READY=1 %v, STOPPING=1 %v; messages %v", ready, stopping, msgs)
	}
	if fedWhileFlowing < 3 {
		t.Errorf("watchdog fed %d times while sound flowed (every 1 s expected)", fedWhileFlowing)
	}
	if fedLate > 0 {
		t.Errorf("watchdog still fed %d times after the loop had stalled for over 10 s", fedLate)
	}
	if !strings.Contains(stderr.String(), "processing loop stalled") {
		t.Errorf("no stall logged:\n%s", stderr.String())
	}
}
