package baseline_test

import (
	"fmt"
	"math/rand/v2"

	"github.com/auscult/auscult/pkg/baseline"
)

// Fit a model to healthy vectors and score a healthy and a shifted one.
func ExampleFit() {
	r := rand.New(rand.NewPCG(1, 2))
	healthy := make([][]float32, 400)
	for i := range healthy {
		common := r.NormFloat64() // a shared nuisance, like microphone gain
		v := make([]float32, 8)
		for j := range v {
			v[j] = float32(-40 + 2*common + 0.2*r.NormFloat64())
		}
		healthy[i] = v
	}
	opt := baseline.DefaultModelOptions()
	opt.Centroids = 1 // one operating point: one mean (Enroll chooses the count on held-out recordings)
	m, err := baseline.Fit(healthy, opt)
	if err != nil {
		panic(err)
	}
	s := m.NewScorer()
	probe := append([]float32(nil), healthy[0]...)
	fmt.Printf("healthy %.2f\n", s.Distance(probe))
	probe[3] += 1.5 // one band 1.5 dB up, against the healthy pattern
	fmt.Printf("fault   %.2f\n", s.Distance(probe))
	// Output:
	// healthy 0.44
	// fault   0.66
}
