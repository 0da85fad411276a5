package gate_test

import (
	"fmt"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/gate"
)

// The microphone of P-492B at the Obrinvale raw-water lift station goes
// dead for six seconds: the silence diagnostic is raised after three
// seconds and cleared three seconds after the sound is back.
func ExampleSensor() {
	s, err := gate.NewSensor(gate.DefaultSensorConfig())
	if err != nil {
		panic(err)
	}
	const rate = 16000
	second := make([]int16, rate)
	var events []gate.SensorEvent
	for t := range 15 {
		for i := range second {
			second[i] = int16((i*7919)%2001 - 1000) // a busy signal
			if t >= 4 && t < 10 {
				second[i] = 0
			}
		}
		s.Observe(second)
		events = s.Close(int64((t+1)*rate), events)
	}
	for _, e := range events {
		fmt.Printf("%s active=%v at %.0f s: measured %g, limit %g\n", e.Kind, e.Active, float64(e.SamplePos)/rate, e.Value, e.Limit)
	}
	fmt.Println("healthy:", s.Healthy())
	// Output:
	// silence active=true at 7 s: measured 0, limit 4
	// silence active=false at 13 s: measured 1000, limit 4
	// healthy: true
}

// A gate for a pump with two lines, fed windows whose lines vanish while
// the level stays where it was, as when a pump stops under a loud
// background.
func ExampleMachine() {
	layout := make([]embed.Dim, 12)
	for i := range layout {
		layout[i] = embed.Dim{Part: "fine", LoHz: 100 + 10*float64(i), HiHz: 110 + 10*float64(i)}
	}
	g, err := gate.NewMachine(gate.DefaultMachineConfig(), gate.Reference{
		Level:  baseline.LevelStats{MeanDBFS: -24, StdDB: 1.5},
		Layout: layout,
		Lines:  gate.Lines{Bands: []int{4, 7}, Hz: []float64{145, 175}, Templates: [][]float32{{12, 9}}, MatchP10: 0.9},
	})
	if err != nil {
		panic(err)
	}
	var events []gate.MachineEvent
	vec := make([]float32, len(layout))
	for i := range int64(12) {
		clear(vec)
		if i < 6 {
			vec[4], vec[7] = 12, 9 // the lines
		}
		w := embed.Window{Index: i, Start: i * 32768, End: i*32768 + 81920, Vec: vec, LevelDBFS: -24}
		events = g.Update(&w, events)
	}
	for _, e := range events {
		fmt.Printf("%s -> %s at window %d (match %.2f, drop %.1f dB)\n", e.From, e.To, e.Window, e.Match, e.DropDB)
	}
	// Output:
	// unknown -> running at window 2 (match 1.00, drop 0.0 dB)
	// running -> stopped at window 8 (match 0.00, drop 0.0 dB)
}
