package gate

import (
	"math"
	"math/rand/v2"
	"slices"
)

// kmeans clusters x into at most k groups (k-means++ seeding from a fixed
// seed, then Lloyd iterations) and returns the means of the groups that
// hold at least 2 % of the rows (and at least 2), so a few odd windows do
// not get a template of their own.
func kmeans(x [][]float32, k int) [][]float32 {
	d := len(x[0])
	dist := func(a, b []float32) float64 {
		var s float64
		for i := range a {
			e := float64(a[i] - b[i])
			s += e * e
		}
		return s
	}
	r := rand.New(rand.NewPCG(0x6761746521, 1))
	cents := [][]float32{slices.Clone(x[r.IntN(len(x))])}
	near := make([]float64, len(x))
	for len(cents) < k {
		var tot float64
		for i, v := range x {
			near[i] = math.Inf(1)
			for _, c := range cents {
				near[i] = min(near[i], dist(v, c))
			}
			tot += near[i]
		}
		if tot == 0 {
			break
		}
		u := r.Float64() * tot
		pick := len(x) - 1
		for i, w := range near {
			if u -= w; u < 0 {
				pick = i
				break
			}
		}
		cents = append(cents, slices.Clone(x[pick]))
	}
	assign := make([]int, len(x))
	count := make([]int, len(cents))
	for range 30 {
		changed := false
		for i, v := range x {
			best, bd := 0, math.Inf(1)
			for c := range cents {
				if e := dist(v, cents[c]); e < bd {
					best, bd = c, e
				}
			}
			if assign[i] != best {
				assign[i], changed = best, true
			}
		}
		clear(count)
		for c := range cents {
			clear(cents[c])
		}
		for i, v := range x {
			c := cents[assign[i]]
			for j := range d {
				c[j] += v[j]
			}
			count[assign[i]]++
		}
		for c := range cents {
			for j := range d {
				cents[c][j] /= float32(max(count[c], 1))
			}
		}
		if !changed {
			break
		}
	}
	minCount := max(2, len(x)/50)
	var out [][]float32
	for c := range cents {
		var e float32
		for _, v := range cents[c] {
			e += v * v
		}
		if count[c] >= minCount && e > 0 {
			out = append(out, cents[c])
		}
	}
	if len(out) == 0 { // every group tiny: keep the overall mean
		m := make([]float32, d)
		for _, v := range x {
			for j := range d {
				m[j] += v[j] / float32(len(x))
			}
		}
		out = append(out, m)
	}
	return out
}
