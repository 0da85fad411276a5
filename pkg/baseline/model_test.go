package baseline

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// correlated draws n vectors of dimension d with a few strong common
// factors (like gain and speed) plus small independent noise.
func correlated(n, d int, seed uint64) [][]float32 { return correlatedDraw(n, d, seed, seed) }

// correlatedDraw draws from the machine given by machine (its factor
// loadings) with the random draw given by draw.
func correlatedDraw(n, d int, machine, draw uint64) [][]float32 {
	r := rand.New(rand.NewPCG(machine, 2))
	load := make([][]float64, 3)
	for f := range load {
		load[f] = make([]float64, d)
		for j := range load[f] {
			load[f][j] = r.NormFloat64()
		}
	}
	r = rand.New(rand.NewPCG(draw, 3))
	out := make([][]float32, n)
	for i := range out {
		v := make([]float32, d)
		fs := []float64{3 * r.NormFloat64(), 2 * r.NormFloat64(), r.NormFloat64()}
		for j := range v {
			x := 10 + 0.3*r.NormFloat64()
			for f := range fs {
				x += fs[f] * load[f][j]
			}
			v[j] = float32(x)
		}
		out[i] = v
	}
	return out
}

// The distance must equal 1 - a/sqrt(a^2 + d^2) where d^2 is the
// Mahalanobis distance under the floored covariance, computed here the
// textbook way: standardise, eigen-decompose, raise small eigenvalues to
// the floor, invert (Mahalanobis 1936; the floor is our regularisation).
func TestDistanceIsFlooredMahalanobis(t *testing.T) {
	x := correlated(300, 24, 1)
	m, err := Fit(x, ModelOptions{Floor: 0.05, MinScale: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	d := len(x[0])
	z := func(v []float32) []float64 {
		o := make([]float64, d)
		for j := range o {
			o[j] = float64((v[j] - m.Mean[j]) / m.Scale[j])
		}
		return o
	}
	zs := mat.NewDense(len(x), d, nil)
	for i, v := range x {
		zs.SetRow(i, z(v))
	}
	var cov mat.SymDense
	cov.SymOuterK(1/float64(len(x)-1), zs.T())
	var eig mat.EigenSym
	eig.Factorize(&cov, true)
	vals := eig.Values(nil)
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	for i := range vals {
		vals[i] = max(vals[i], float64(m.Floor))
	}
	inv := mat.NewDense(d, d, nil)
	for i := 0; i < d; i++ {
		for j := 0; j < d; j++ {
			var s float64
			for k := range vals {
				s += vecs.At(i, k) * vecs.At(j, k) / vals[k]
			}
			inv.Set(i, j, s)
		}
	}
	s := m.NewScorer()
	probe := correlated(20, 24, 9)
	probe[0][3] += 5 // an anomaly in one dimension
	for i, v := range probe {
		zv := mat.NewVecDense(d, z(v))
		var tmp mat.VecDense
		tmp.MulVec(inv, zv)
		d2 := mat.Dot(zv, &tmp)
		a := float64(m.Anchor)
		want := 1 - a/math.Sqrt(a*a+d2)
		if got := s.Distance(v); math.Abs(got-want) > 1e-4 {
			t.Errorf("probe %d: distance %.6f, floored Mahalanobis gives %.6f", i, got, want)
		}
	}
}

// The distance is the cosine distance between the explicit embedding
// (anchor, whitened coordinates, scaled residual) and the mean embedding
// (anchor, 0, ...): 1 - e.m / (|e| |m|), taken from the nearest
// operating-point centre when there are several.
func TestDistanceIsCosineToMeanEmbedding(t *testing.T) {
	x := correlated(200, 16, 3)
	for _, centroids := range []int{1, DefaultCentroids} {
		opt := DefaultModelOptions()
		opt.Centroids = centroids
		m, err := Fit(x, opt)
		if err != nil {
			t.Fatal(err)
		}
		centres := m.Centres
		if centroids == 1 {
			centres = [][]float32{m.Mean}
		} else if len(centres) < 2 {
			t.Fatalf("%d centres from %d allowed", len(centres), centroids)
		}
		s := m.NewScorer()
		for _, v := range correlated(10, 16, 4) {
			want := 1.0
			for _, c := range centres {
				want = min(want, explicitCosine(m, v, c))
			}
			if got := s.Distance(v); math.Abs(got-want) > 1e-4 {
				t.Errorf("%d centres: distance %.6f, explicit cosine %.6f", len(centres), got, want)
			}
		}
	}
}

// explicitCosine builds the embedding of v from centre c and returns its
// cosine distance to the mean embedding (anchor, 0, ..., 0).
func explicitCosine(m *Model, v, centre []float32) float64 {
	{
		z := make([]float64, len(v))
		for j := range z {
			z[j] = float64((v[j] - centre[j]) / m.Scale[j])
		}
		e := []float64{float64(m.Anchor)}
		res := append([]float64(nil), z...)
		for i, c := range m.Comps {
			var dot float64
			for j := range c {
				dot += float64(c[j]) * z[j]
			}
			e = append(e, dot/math.Sqrt(float64(m.Lambda[i])))
			for j := range res {
				res[j] -= dot * float64(c[j])
			}
		}
		for _, r := range res {
			e = append(e, r/math.Sqrt(float64(m.Floor)))
		}
		var ee float64
		for _, x := range e {
			ee += x * x
		}
		return 1 - e[0]*float64(m.Anchor)/(math.Sqrt(ee)*float64(m.Anchor))
	}
}

// A machine with two healthy operating points (two set-points of a drive,
// say): one mean sits between them, where no healthy window ever is, so a
// window there would score as the healthiest of all. With operating-point
// centres it scores as unusual, and windows at either point stay healthy.
func TestCentresKeepTheGapBetweenOperatingPoints(t *testing.T) {
	const d = 12
	r := rand.New(rand.NewPCG(21, 22))
	shift := make([]float32, d)
	for j := range shift {
		shift[j] = float32(3 * r.NormFloat64())
	}
	draw := func(n int, at float32) [][]float32 {
		out := make([][]float32, n)
		for i := range out {
			v := make([]float32, d)
			for j := range v {
				v[j] = -40 + at*shift[j] + float32(0.3*r.NormFloat64())
			}
			out[i] = v
		}
		return out
	}
	x := append(draw(150, 0), draw(150, 1)...)
	mid := draw(50, 0.5)
	fresh := append(draw(50, 0), draw(50, 1)...)
	mean := func(s *Scorer, xs [][]float32) float64 {
		var sum float64
		for _, v := range xs {
			sum += s.Distance(v)
		}
		return sum / float64(len(xs))
	}
	one := DefaultModelOptions()
	one.Centroids = 1
	m1, _ := Fit(x, one)
	mk, _ := Fit(x, DefaultModelOptions())
	s1, sk := m1.NewScorer(), mk.NewScorer()
	h1, g1 := mean(s1, fresh), mean(s1, mid)
	hk, gk := mean(sk, fresh), mean(sk, mid)
	t.Logf("one mean: healthy %.3f, between %.3f; %d centres: healthy %.3f, between %.3f", h1, g1, len(mk.Centres), hk, gk)
	if !(g1 < h1) {
		t.Errorf("with one mean the gap should look healthier than the operating points: %.3f vs %.3f", g1, h1)
	}
	if !(gk > hk+0.3) {
		t.Errorf("with centres the gap should stand out: between %.3f, healthy %.3f", gk, hk)
	}
}

// Enrolment must be reproducible: the same windows give the same model.
func TestCentresAreDeterministic(t *testing.T) {
	x := correlated(300, 20, 9)
	a, _ := Fit(x, DefaultModelOptions())
	b, _ := Fit(x, DefaultModelOptions())
	if len(a.Centres) != len(b.Centres) || len(a.Centres) < 2 {
		t.Fatalf("centres %d and %d", len(a.Centres), len(b.Centres))
	}
	for i := range a.Centres {
		for j := range a.Centres[i] {
			if a.Centres[i][j] != b.Centres[i][j] {
				t.Fatal("two fits of the same windows differ")
			}
		}
	}
}

// A cluster with fewer than two independent windows is merged away.
func TestCentresNeedEnoughWindows(t *testing.T) {
	x := correlated(12, 8, 10)
	opt := DefaultModelOptions()
	opt.Redundancy = 5 // 12 windows are 2.4 independent ones: room for one centre only
	m, err := Fit(x, opt)
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Centres) > 1 {
		t.Errorf("%d centres from 12 windows of redundancy 5", len(m.Centres))
	}
}

func TestHealthyScoresNearDesignPoint(t *testing.T) {
	x := correlated(400, 20, 5)
	m, err := Fit(x, DefaultModelOptions())
	if err != nil {
		t.Fatal(err)
	}
	s := m.NewScorer()
	var sum float64
	for _, v := range x {
		sum += s.Distance(v)
	}
	// The anchor is the RMS whitened norm, so a typical window sits near
	// 1 - 1/sqrt(2) = 0.293.
	if mean := sum / float64(len(x)); math.Abs(mean-0.29) > 0.03 {
		t.Errorf("mean healthy distance %.3f, want about 0.29", mean)
	}
}

// Whitening the major components lets a change against the healthy
// correlation structure stand out: gain, background and speed move many
// dimensions together, a fault does not.
func TestWhiteningSeesMinorDirections(t *testing.T) {
	x := correlated(400, 20, 6)
	white, _ := Fit(x, DefaultModelOptions())
	diag, _ := Fit(x, ModelOptions{NoWhiten: true, MinScale: 0.1})
	fresh := correlatedDraw(400, 20, 6, 60)
	detected := func(m *Model) float64 {
		s := m.NewScorer()
		var h []float64
		for _, v := range fresh {
			h = append(h, s.Distance(v))
		}
		sort.Float64s(h)
		p95 := h[len(h)*95/100]
		hit := 0
		for _, v := range fresh {
			a := append([]float32(nil), v...)
			for j := range a {
				a[j] += float32(0.5 * float64(1-2*(j%2)))
			}
			if s.Distance(a) > p95 {
				hit++
			}
		}
		return float64(hit) / float64(len(fresh))
	}
	w, d := detected(white), detected(diag)
	if !(w > 0.9 && w > d+0.2) {
		t.Errorf("share of perturbed windows above the healthy 95th percentile: whitened %.2f, diagonal %.2f", w, d)
	}
}

func TestScorerDoesNotAllocate(t *testing.T) {
	x := correlated(100, 32, 7)
	m, _ := Fit(x, DefaultModelOptions())
	s := m.NewScorer()
	if a := testing.AllocsPerRun(100, func() { s.Distance(x[1]) }); a != 0 {
		t.Errorf("Distance allocates %.0f times", a)
	}
}

// BenchmarkDistance scores one window of the default size (195 dimensions)
// against a model with about 40 kept components, with one mean and with
// 8 operating-point centres.
func BenchmarkDistance(b *testing.B) {
	x := correlated(400, 195, 8)
	for _, k := range []int{1, 8} {
		opt := DefaultModelOptions()
		opt.Centroids = k
		m, err := Fit(x, opt)
		if err != nil {
			b.Fatal(err)
		}
		s := m.NewScorer()
		b.Run(fmt.Sprintf("centres=%d", max(len(m.Centres), 1)), func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				s.Distance(x[i%len(x)])
			}
		})
	}
}
