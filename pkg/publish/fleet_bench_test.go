package publish_test

import (
	"context"
	"fmt"
	"log/slog"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"syscall"
	"testing"
	"time"

	mqtt "github.com/eclipse/paho.mqtt.golang"

	"github.com/auscult/auscult/pkg/publish"
	"github.com/auscult/auscult/pkg/publish/brokertest"
	"github.com/auscult/auscult/pkg/store"
)

// fleetAgents is how many agents BenchmarkFleet runs in one process; set
// AUSCULT_FLEET to change it.
func fleetAgents() int {
	if n, err := strconv.Atoi(os.Getenv("AUSCULT_FLEET")); err == nil && n > 0 {
		return n
	}
	return 100
}

// BenchmarkFleet runs many agents (store, outbox and publisher each, as in
// the agent) in one process against one Mosquitto. It measures the worst
// moment of a fleet's day: the broker comes back after an outage and every
// agent drains a backlog at once. Reported: messages per second delivered
// to a subscriber, CPU of this process per agent (a share of one core),
// heap and resident memory. Mosquitto runs on the same two cores, so the
// figures are a floor for a real deployment, not a ceiling.
func BenchmarkFleet(b *testing.B) {
	agents, backlog := fleetAgents(), 50
	// The bridge takes everything: without this Mosquitto would queue at
	// most 1000 messages for it and drop the rest (its default).
	br := brokertest.Start(b, brokertest.Options{Extra: "max_queued_messages 0"})
	var got atomic.Int64
	sub := mqtt.NewClient(mqtt.NewClientOptions().AddBroker(br.URL).SetClientID("fleet-bridge"))
	if tok := sub.Connect(); !tok.WaitTimeout(5*time.Second) || tok.Error() != nil {
		b.Fatal(tok.Error())
	}
	defer sub.Disconnect(100)
	sub.Subscribe("auscult/+/+/alarm", 1, func(mqtt.Client, mqtt.Message) { got.Add(1) }).Wait()

	type agent struct {
		st     *store.Store
		pub    *publish.Publisher
		notify func()
	}
	fleet := make([]*agent, agents)
	dir := b.TempDir()
	for i := range fleet {
		a := &agent{}
		st, err := store.Open(filepath.Join(dir, fmt.Sprintf("p%03d.db", i)), store.Options{FlushInterval: -1,
			Outbox: store.OutboxOptions{Enabled: true, Notify: func() {
				if a.notify != nil {
					a.notify()
				}
			}}})
		if err != nil {
			b.Fatal(err)
		}
		defer st.Close()
		a.st = st
		fleet[i] = a
	}
	for i := 0; i < b.N; i++ {
		got.Store(0)
		// The outage: every agent queues a backlog of alarms.
		for _, a := range fleet {
			for j := range backlog {
				if _, err := a.st.AppendEvent(alarmEvent(j, "alarm.raised")); err != nil {
					b.Fatal(err)
				}
			}
		}
		runtime.GC()
		var ru0 syscall.Rusage
		syscall.Getrusage(syscall.RUSAGE_SELF, &ru0)
		start := time.Now()
		ctx, cancel := context.WithCancel(context.Background())
		var wg sync.WaitGroup
		for k, a := range fleet {
			pub, err := publish.New(publish.Config{URLs: []string{br.URL}, Site: "obrinvale", Asset: fmt.Sprintf("P-%03d", k),
				ClientID: fmt.Sprintf("fleet-%03d", k), ReconnectMin: 100 * time.Millisecond, ReconnectMax: time.Second,
				Logger: slog.New(slog.DiscardHandler), Info: publish.Info{Version: "bench", Started: start}}, a.st, &desk{})
			if err != nil {
				b.Fatal(err)
			}
			a.pub, a.notify = pub, pub.Notify
			wg.Go(func() { pub.Run(ctx) })
		}
		want := int64(agents * backlog)
		for got.Load() < want && time.Since(start) < 5*time.Minute {
			time.Sleep(5 * time.Millisecond)
		}
		took := time.Since(start)
		var ru1 syscall.Rusage
		syscall.Getrusage(syscall.RUSAGE_SELF, &ru1)
		var ms runtime.MemStats
		runtime.ReadMemStats(&ms)
		rss := rssBytes()
		cancel()
		wg.Wait()
		if got.Load() < want {
			b.Fatalf("%d of %d messages arrived in %v", got.Load(), want, took)
		}
		cpu := time.Duration(ru1.Utime.Nano()+ru1.Stime.Nano()-ru0.Utime.Nano()-ru0.Stime.Nano()) * time.Nanosecond
		b.ReportMetric(float64(want)/took.Seconds(), "msg/s")
		b.ReportMetric(100*cpu.Seconds()/took.Seconds()/float64(agents), "%cpu/agent")
		b.ReportMetric(float64(ms.HeapInuse)/(1<<20), "MiB-heap")
		b.ReportMetric(float64(rss)/(1<<20), "MiB-rss")
		b.ReportMetric(float64(agents), "agents")
	}
}

// rssBytes reads this process's resident set from /proc (Linux).
func rssBytes() int64 {
	b, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0
	}
	for _, l := range strings.Split(string(b), "\n") {
		if f := strings.Fields(l); len(f) >= 2 && f[0] == "VmRSS:" {
			kb, _ := strconv.ParseInt(f[1], 10, 64)
			return kb << 10
		}
	}
	return 0
}
