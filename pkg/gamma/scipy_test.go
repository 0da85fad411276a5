package gamma

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// scipyCase is one case of testdata/gamma/scipy_cases.json, written by
// scripts/ref/make_gamma_fixture.py with SciPy 1.10.1 (Debian
// python3-scipy) and numpy 1.24.2.
type scipyCase struct {
	Name  string             `json:"name"`
	X     []float64          `json:"x"`
	Shape float64            `json:"shape"`
	Scale float64            `json:"scale"`
	PPF   map[string]float64 `json:"ppf"`
	CDF   [][2]float64       `json:"cdf"`
	SF    [][2]float64       `json:"sf"`
	KS    float64            `json:"ks"`
}

// loadScipyCases reads the SciPy fixture.
func loadScipyCases(t *testing.T) []scipyCase {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("..", "..", "testdata", "gamma", "scipy_cases.json"))
	if err != nil {
		t.Fatalf("read fixture: %v", err)
	}
	var f struct {
		Source string      `json:"source"`
		Cases  []scipyCase `json:"cases"`
	}
	if err := json.Unmarshal(raw, &f); err != nil {
		t.Fatalf("parse fixture: %v", err)
	}
	if len(f.Cases) == 0 {
		t.Fatal("fixture has no cases")
	}
	t.Logf("reference: %s", f.Source)
	return f.Cases
}

// relErr is |got-want|/|want|, or |got| when want is 0.
func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

func TestFitMatchesScipy(t *testing.T) {
	for _, c := range loadScipyCases(t) {
		t.Run(c.Name, func(t *testing.T) {
			// Reference: scipy.stats.gamma.fit(x, floc=0), SciPy 1.10.1
			// (root found by brentq, so agreement is limited to ~1e-10).
			d, err := Fit(c.X)
			if err != nil {
				t.Fatal(err)
			}
			if e := relErr(d.Shape, c.Shape); e > 1e-6 {
				t.Errorf("shape %.17g, scipy %.17g (rel %.2g)", d.Shape, c.Shape, e)
			}
			if e := relErr(d.Scale, c.Scale); e > 1e-6 {
				t.Errorf("scale %.17g, scipy %.17g (rel %.2g)", d.Scale, c.Scale, e)
			}
		})
	}
}

func TestDistMatchesScipy(t *testing.T) {
	for _, c := range loadScipyCases(t) {
		// The SciPy fit is used so that only the distribution functions
		// are compared.
		d := Dist{Shape: c.Shape, Scale: c.Scale}
		t.Run(c.Name, func(t *testing.T) {
			// Reference: scipy.stats.gamma.ppf(p, k, 0, theta), SciPy 1.10.1.
			for key, want := range c.PPF {
				p, err := strconv.ParseFloat(key, 64)
				if err != nil {
					t.Fatal(err)
				}
				if got := d.Quantile(p); relErr(got, want) > 1e-6 {
					t.Errorf("Quantile(%v) = %.17g, scipy %.17g", p, got, want)
				}
			}
			// Reference: scipy.stats.gamma.cdf and .sf, SciPy 1.10.1.
			for _, pt := range c.CDF {
				if got := d.CDF(pt[0]); relErr(got, pt[1]) > 1e-9 {
					t.Errorf("CDF(%v) = %.17g, scipy %.17g", pt[0], got, pt[1])
				}
			}
			for _, pt := range c.SF {
				if got := d.Survival(pt[0]); relErr(got, pt[1]) > 1e-9 {
					t.Errorf("Survival(%v) = %.17g, scipy %.17g", pt[0], got, pt[1])
				}
			}
			// Reference: scipy.stats.kstest(x, "gamma", args=(k, 0, theta)).statistic,
			// SciPy 1.10.1.
			if got := KSStat(c.X, d); math.Abs(got-c.KS) > 1e-12 {
				t.Errorf("KSStat = %.17g, scipy %.17g", got, c.KS)
			}
		})
	}
}
