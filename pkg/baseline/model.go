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
	Mean []float32 // healthy mean per dimension
	// Centres are the means of the healthy operating points (k-means
	// clusters), when enrolment found more than one; nil means one centre,
	// Mean. A window is scored against its nearest centre.
	Centres [][]float32
	Scale   []float32   // healthy within-cluster standard deviation per dimension (floored)
	Lambda  []float32   // eigenvalues of the kept components, descending
	Comps   [][]float32 // kept unit eigenvectors, K x D
	Floor   float32     // eigenvalue floor for everything outside the kept components
	Anchor  float32     // the constant first coordinate of every embedding
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
	// Centroids is the most operating points enrolment may find (k-means
	// clusters of the healthy windows, each with its own mean; the
	// whitening is shared). 0 or 1 keeps one mean. A cluster needs at least
	// two independent windows (2 x Redundancy) or it is merged away.
	Centroids int `json:"centroids,omitempty"`
}

// DefaultCentroids is the default ModelOptions.Centroids (docs/evaluation.md
// has the measurements behind it).
const DefaultCentroids = 8

// DefaultModelOptions returns the options enrolment uses by default.
func DefaultModelOptions() ModelOptions {
	return ModelOptions{Floor: 1, Redundancy: 1, MinScale: 0.1, Centroids: DefaultCentroids}
}

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
		m.Mean[j] = float32(mean[j])
	}
	centres, labels := [][]float64{mean}, make([]int, n)
	if opt.Centroids > 1 {
		scale := spread(x, centres, labels, opt.MinScale)
		minSize := int(math.Ceil(2 * max(opt.Redundancy, 1)))
		centres, labels = operatingPoints(x, mean, scale, opt.Centroids, minSize)
	}
	if len(centres) > 1 {
		for _, c := range centres {
			m.Centres = append(m.Centres, toFloat32(c))
		}
	}
	scale := spread(x, centres, labels, opt.MinScale)
	for j := range scale {
		m.Scale[j] = float32(scale[j])
	}
	// Everything below works on the windows' offsets from their own centre.
	z := mat.NewDense(n, d, nil)
	for i, v := range x {
		row := z.RawRowView(i)
		c := centres[labels[i]]
		for j, f := range v {
			row[j] = (float64(f) - c[j]) / float64(m.Scale[j])
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
	// Anchor: the root-mean-square whitened norm of the training windows
	// (each from its nearest centre).
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
	m      *Model
	z      []float32
	logDet float64 // log-determinant of the floored covariance, for LogDensity
}

// NewScorer returns a Scorer for m.
func (m *Model) NewScorer() *Scorer {
	logDet := float64(len(m.Mean)-len(m.Lambda)) * math.Log(float64(m.Floor))
	for _, l := range m.Lambda {
		logDet += math.Log(float64(l))
	}
	for _, v := range m.Scale {
		logDet += 2 * math.Log(float64(v))
	}
	return &Scorer{m: m, z: make([]float32, len(m.Mean)), logDet: logDet}
}

// norm2 is the squared whitened norm |w|^2 of x from its nearest centre.
func (s *Scorer) norm2(x []float32) float64 {
	if len(s.m.Centres) == 0 {
		return s.norm2From(x, s.m.Mean)
	}
	best := math.Inf(1)
	for _, c := range s.m.Centres {
		best = min(best, s.norm2From(x, c))
	}
	return best
}

// nearest returns the centre nearest to x in the whitened metric.
func (s *Scorer) nearest(x []float32) []float32 {
	if len(s.m.Centres) == 0 {
		return s.m.Mean
	}
	best, bestD := s.m.Centres[0], math.Inf(1)
	for _, c := range s.m.Centres {
		if d := s.norm2From(x, c); d < bestD {
			best, bestD = c, d
		}
	}
	return best
}

// norm2From is the squared whitened norm of x - centre.
func (s *Scorer) norm2From(x, centre []float32) float64 {
	m := s.m
	var zz float64
	for j, v := range x {
		z := (v - centre[j]) / m.Scale[j]
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

// LogDensity is the log-likelihood of x under the model read as a Gaussian
// mixture: one component per centre, equal weights, the shared floored
// covariance (in the input units), leaving out the constant -D/2 log 2pi.
// Enrolment compares it across numbers of centres on held-out windows.
func (s *Scorer) LogDensity(x []float32) float64 {
	m, logDet := s.m, s.logDet
	centres := m.Centres
	if len(centres) == 0 {
		return -0.5*s.norm2From(x, m.Mean) - 0.5*logDet
	}
	// log sum_c exp(-d_c/2) / C, kept finite by factoring out the largest term.
	top := math.Inf(-1)
	for _, c := range centres {
		top = max(top, -0.5*s.norm2From(x, c))
	}
	var sum float64
	for _, c := range centres {
		sum += math.Exp(-0.5*s.norm2From(x, c) - top)
	}
	return top + math.Log(sum/float64(len(centres))) - 0.5*logDet
}

// CosineDistance is the cosine distance between an embedding with anchor a
// and squared whitened norm d2, and the mean embedding (a, 0, ..., 0).
func CosineDistance(a, d2 float64) float64 { return 1 - a/math.Sqrt(a*a+d2) }

// Deviations writes the standardised deviation (x - centre)/scale of every
// dimension into dst (len D) and returns it, from the healthy centre
// nearest to x.
func (s *Scorer) Deviations(x []float32, dst []float32) []float32 {
	c := s.nearest(x)
	for j, v := range x {
		dst[j] = (v - c[j]) / s.m.Scale[j]
	}
	return dst
}

// spread returns each dimension's standard deviation around the windows'
// own centres (n - number of centres degrees of freedom), at least minScale.
func spread(x [][]float32, centres [][]float64, labels []int, minScale float64) []float64 {
	d := len(centres[0])
	vars := make([]float64, d)
	for i, v := range x {
		c := centres[labels[i]]
		for j, f := range v {
			e := float64(f) - c[j]
			vars[j] += e * e
		}
	}
	dof := float64(max(len(x)-len(centres), 1))
	for j := range vars {
		vars[j] = max(math.Sqrt(vars[j]/dof), minScale)
	}
	return vars
}

func toFloat32(v []float64) []float32 {
	out := make([]float32, len(v))
	for i, f := range v {
		out[i] = float32(f)
	}
	return out
}
