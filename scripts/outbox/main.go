// Command outbox prints the MQTT outbox figures of an agent's log file
// (opened read-only): messages waiting, bytes, the oldest, and the drops
// by kind. scripts/day.sh uses it after a simulated broker outage.
//
//	go run ./scripts/outbox /var/lib/auscult/auscult.db
package main

import (
	"fmt"
	"os"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

func main() {
	if len(os.Args) != 2 {
		fmt.Fprintln(os.Stderr, "usage: outbox LOGFILE")
		os.Exit(2)
	}
	st, err := store.Open(os.Args[1], store.Options{ReadOnly: true, Timeout: 2 * time.Second})
	if err != nil {
		fmt.Fprintln(os.Stderr, "outbox:", err)
		os.Exit(1)
	}
	defer st.Close()
	ob, err := st.OutboxStats()
	if err != nil {
		fmt.Fprintln(os.Stderr, "outbox:", err)
		os.Exit(1)
	}
	oldest := "-"
	if !ob.Oldest.IsZero() {
		oldest = ob.Oldest.Format(time.RFC3339)
	}
	fmt.Printf("outbox           %d messages, %.2f MiB, oldest %s, last seq %d\n", ob.Depth, float64(ob.Bytes)/(1<<20), oldest, ob.LastSeq)
	fmt.Printf("dropped          %d in all:", ob.Drops.Total)
	for c := store.ClassSummary; c <= store.ClassAlarm; c++ {
		fmt.Printf(" %s %d", c, ob.Drops.ByClass[c])
	}
	fmt.Println()
}
