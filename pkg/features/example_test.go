package features_test

import (
	"fmt"
	"math"

	"github.com/auscult/auscult/pkg/features"
)

// A stream fed in uneven blocks is cut into frames and each frame becomes
// one row of log-mel energies.
func ExampleExtractor() {
	cfg := features.DefaultConfig()
	ex, err := features.NewExtractor(cfg)
	if err != nil {
		fmt.Println(err)
		return
	}
	fr := features.NewFramer(cfg.FrameLen, cfg.Hop)
	row := make([]float32, cfg.Mels)

	// Two seconds of a full-scale 1 kHz tone, delivered in 700-sample blocks.
	signal := make([]int16, 2*cfg.Rate)
	for i := range signal {
		signal[i] = int16(32767 * math.Sin(2*math.Pi*1000*float64(i)/float64(cfg.Rate)))
	}
	frames, best := 0, 0
	for i := 0; i < len(signal); i += 700 {
		fr.Push(signal[i:min(i+700, len(signal))], func(frame []int16) {
			ex.Rows(frame, row)
			frames++
		})
	}
	for i := range row {
		if row[i] > row[best] {
			best = i
		}
	}
	fmt.Printf("%d frames; loudest band %d, centre %.0f Hz, %.1f dB\n", frames, best, ex.Bank().Centers()[best], row[best])
	// Output: 61 frames; loudest band 44, centre 986 Hz, -2.5 dB
}

// DB converts power to decibels without a logarithm call.
func ExampleDB() {
	fmt.Printf("%.3f %.3f %.3f\n", features.DB(100), features.DB(0.5), features.DB(0))
	// Output: 20.000 -3.010 -380.000
}

// The HTK mel scale.
func ExampleHzToMel() {
	fmt.Printf("%.3f %.2f\n", features.HzToMel(1000), features.MelToHz(features.HzToMel(440)))
	// Output: 999.986 440.00
}

// A long FFT with 1/24-octave bands for a fine low-frequency view.
func ExampleNewLogBank() {
	b, err := features.NewLogBank(16000, 16384, 10, 1000, 24)
	if err != nil {
		fmt.Println(err)
		return
	}
	lo, hi := b.Edges(0)
	fmt.Printf("%d bands; first %.2f..%.2f Hz holds %d bins\n", b.Len(), lo, hi, len(b.Weights(0)))
	// Output: 141 bands; first 10.00..10.91 Hz holds 1 bins
}
