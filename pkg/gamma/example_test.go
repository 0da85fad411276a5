package gamma_test

import (
	"fmt"

	"github.com/auscult/auscult/pkg/gamma"
)

func ExampleFit() {
	// Cosine distances of healthy windows from their reference.
	// Reference: scipy.stats.gamma.fit(dist, floc=0) in SciPy 1.10.1 gives
	// shape 18.8386, scale 0.0015040 and ppf(0.999) 0.052840.
	dist := []float64{0.021, 0.034, 0.018, 0.027, 0.041, 0.025, 0.030, 0.022, 0.036, 0.029, 0.024, 0.033}
	d, err := gamma.Fit(dist)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("shape %.2f, scale %.5f, mean %.4f\n", d.Shape, d.Scale, d.Mean())
	fmt.Printf("alarm level (p = 0.999): %.4f\n", d.Quantile(0.999))
	// Output:
	// shape 18.84, scale 0.00150, mean 0.0283
	// alarm level (p = 0.999): 0.0528
}

func ExampleDist_Survival() {
	d := gamma.Dist{Shape: 2, Scale: 0.01}
	fmt.Printf("P(distance > 0.06) = %.5f\n", d.Survival(0.06))
	// Output: P(distance > 0.06) = 0.01735
}

func ExampleFit_error() {
	_, err := gamma.Fit([]float64{0.1, 0.2, 0.3})
	fmt.Println(err)
	// Output: gamma: too few values to fit (3 values, need 10)
}
