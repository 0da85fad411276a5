package baseline

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Model is the fitted whitening transform and anchor. It is read-only once
// fitted; use a Scorer to compute distances.
type Model struct {
	Mean   []float32   // healthy mean per dimension
	Scale  []float32   // healthy standard deviation per dimension (floored)
	Lambda []float32   // eigenvalues of the kept components, descending
	Comps  [][]float32 // kept unit eigenvectors, K x D
	Floor  float32     // eigenvalue floor for everything outside the kept components
	Anchor float32     // the constant first coordinate of every embedding
}

// ModelOptions tunes the fit.
type ModelOptions struct {
	// Floor scales the eigenvalue floor (default 1). The floor is
	// Floor * (1 + sqrt(D/Neff))^2 * median eigenvalue: the upper edge of
	// the Marchenko-Pastur law for D dimensions and Neff independent
	// windows, with the median eigenvalue as the noise level. Eigenvalues
	// below it cannot be told from sampling noise, so they are not trusted;
	// components above it (gain, background, speed variation) are whitened.
	Floor float64 `json:"floor"`
	// Redundancy is how many windows make one independent observation
	// (overlapping windows: window length over step; default 1). Neff is
	// the number of windows divided by it.
	Redundancy float64 `json:"redundancy"`
	// NoWhiten skips the eigen-decomposition: a plain per-dimension
	// standardisation (for comparison).
	NoWhiten bool `json:"no_whiten,omitempty"`
	// MinScale is the smallest per-dimension standard deviation used for
	// standardising, in the features' units (dB; default 0.1).
	MinScale float64 `json:"min_scale"`
}

// DefaultModelOptions returns the options enrolment uses by default.
func DefaultModelOptions() ModelOptions { return ModelOptions{Floor: 1, Redundancy: 1, MinScale: 0.1} }

// Fit learns a model from healthy vectors (N x D, N >= 2).
func Fit(x [][]float32, opt ModelOptions) (*Model, error) {
	n := len(x)
	if n < 2 {
		return nil, fmt.Errorf("baseline: need at least 2 windows to fit, got %d", n)
	}
	d := len(x[0])
	if d == 0 {
		return nil, errors.New("baseline: vectors have no dimensions")
	}
	m := &Model{Mean: make([]float32, d), Scale: make([]float32, d)}
	mean := make([]float64, d)
	for _, v := range x {
		if len(v) != d {
			return nil, errors.New("baseline: vectors of different lengths")
		}
		for j, f := range v {
			mean[j] += float64(f)
		}
	}
	for j := range mean {
		mean[j] /= float64(n)
	}
	vars := make([]float64, d)
	for _, v := range x {
		for j, f := range v {
			dv := float64(f) - mean[j]
			vars[j] += dv * dv
		}
	}
	for j := range vars {
		m.Mean[j] = float32(mean[j])
		m.Scale[j] = float32(max(math.Sqrt(vars[j]/float64(n-1)), opt.MinScale))
	}
	z := mat.NewDense(n, d, nil)
	for i, v := range x {
		row := z.RawRowView(i)
		for j, f := range v {
			row[j] = (float64(f) - mean[j]) / float64(m.Scale[j])
		}
	}
	var cov mat.SymDense
	cov.SymOuterK(1/float64(n-1), z.T())
	var trace float64
	for j := 0; j < d; j++ {
		trace += cov.At(j, j)
	}
	if opt.NoWhiten {
		m.Floor = float32(max(trace/float64(d), 1e-6))
	} else {
		var eig mat.EigenSym
		if !eig.Factorize(&cov, true) {
			return nil, errors.New("baseline: eigen-decomposition of the healthy covariance failed")
		}
		vals := eig.Values(nil) // ascending
		neff := float64(n) / max(opt.Redundancy, 1)
		mp := 1 + math.Sqrt(float64(d)/neff)
		floor := max(opt.Floor*mp*mp*vals[len(vals)/2], 1e-6*trace/float64(d))
		m.Floor = float32(floor)
		var vecs mat.Dense
		eig.VectorsTo(&vecs)
		for i := len(vals) - 1; i >= 0 && vals[i] > floor; i-- {
			m.Lambda = append(m.Lambda, float32(vals[i]))
			c := make([]float32, d)
			for j := range c {
				c[j] = float32(vecs.At(j, i))
			}
			m.Comps = append(m.Comps, c)
		}
	}
	// Anchor: the root-mean-square whitened norm of the training windows.
	s := m.NewScorer()
	var sq float64
	for _, v := range x {
		sq += s.norm2(v)
	}
	m.Anchor = float32(math.Sqrt(max(sq/float64(n), 1e-12)))
	return m, nil
}

// Dim is the input dimension.
func (m *Model) Dim() int { return len(m.Mean) }

// Scorer computes distances without allocating. Not safe for concurrent
// use; make one per goroutine.
type Scorer struct {
	m *Model
	z []float32
}

// NewScorer returns a Scorer for m.
func (m *Model) NewScorer() *Scorer { return &Scorer{m: m, z: make([]float32, len(m.Mean))} }

// norm2 is the squared whitened norm |w|^2 of x.
func (s *Scorer) norm2(x []float32) float64 {
	m := s.m
	var zz float64
	for j, v := range x {
		z := (v - m.Mean[j]) / m.Scale[j]
		s.z[j] = z
		zz += float64(z) * float64(z)
	}
	var proj, res float64
	res = zz
	for i, c := range m.Comps {
		var dot float32
		for j, v := range c {
			dot += v * s.z[j]
		}
		d2 := float64(dot) * float64(dot)
		proj += d2 / float64(m.Lambda[i])
		res -= d2
	}
	return proj + max(res, 0)/float64(m.Floor)
}

// Distance is the cosine distance between the embedding of x and the
// enrolled mean embedding, in [0, 1).
func (s *Scorer) Distance(x []float32) float64 {
	return CosineDistance(float64(s.m.Anchor), s.norm2(x))
}

// Norm2 is the squared whitened distance of x from the healthy mean: the
// floored Mahalanobis distance squared.
func (s *Scorer) Norm2(x []float32) float64 { return s.norm2(x) }

// CosineDistance is the cosine distance between an embedding with anchor a
// and squared whitened norm d2, and the mean embedding (a, 0, ..., 0).
func CosineDistance(a, d2 float64) float64 { return 1 - a/math.Sqrt(a*a+d2) }

// Deviations writes the standardised deviation (x - mean)/scale of every
// dimension into dst (len D) and returns it.
func (s *Scorer) Deviations(x []float32, dst []float32) []float32 {
	for j, v := range x {
		dst[j] = (v - s.m.Mean[j]) / s.m.Scale[j]
	}
	return dst
}
