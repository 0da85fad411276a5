package baseline

import (
	"math"
	"math/rand/v2"
)

// operatingPoints groups the healthy windows x into at most k clusters by
// k-means (Lloyd's algorithm with k-means++ seeding, Arthur and
// Vassilvitskii 2007) on the standardised vectors (x - mean)/scale, and
// returns the cluster means in the input units and each window's cluster.
// Seeding uses a fixed random stream, so the same windows always give the
// same centres. A cluster left with fewer than minSize windows is dropped
// and its windows go to the nearest remaining centre: a centre must rest on
// enough independent windows to be a real operating point, not a stray.
func operatingPoints(x [][]float32, mean, scale []float64, k, minSize int) ([][]float64, []int) {
	n, d := len(x), len(mean)
	z := make([][]float64, n)
	for i, v := range x {
		z[i] = make([]float64, d)
		for j, f := range v {
			z[i][j] = (float64(f) - mean[j]) / scale[j]
		}
	}
	k = min(k, n)
	cent := seedCentres(z, k)
	labels := make([]int, n)
	for iter := 0; iter < 100; iter++ {
		moved := assign(z, cent, labels)
		counts := make([]int, len(cent))
		for _, l := range labels {
			counts[l]++
		}
		kept := cent[:0]
		for c, ctr := range cent {
			if counts[c] >= minSize {
				kept = append(kept, ctr)
			}
		}
		if len(kept) < len(counts) {
			cent = kept
			if len(cent) == 0 { // every cluster too small: one centre, the mean
				cent = [][]float64{make([]float64, d)}
			}
			assign(z, cent, labels)
		} else if !moved && iter > 0 {
			break
		}
		cent = recentre(z, labels, len(cent), d)
	}
	out := make([][]float64, len(cent))
	for c, ctr := range cent {
		out[c] = make([]float64, d)
		for j, v := range ctr {
			out[c][j] = mean[j] + v*scale[j]
		}
	}
	return out, labels
}

// seedCentres picks k starting centres by k-means++: the first at random,
// each next one with probability proportional to its squared distance from
// the nearest centre already picked.
func seedCentres(z [][]float64, k int) [][]float64 {
	r := rand.New(rand.NewPCG(0x61757363, 0x756c74)) // fixed: enrolment is reproducible
	cent := [][]float64{append([]float64(nil), z[r.IntN(len(z))]...)}
	near := make([]float64, len(z))
	for i := range near {
		near[i] = math.Inf(1)
	}
	for len(cent) < k {
		var total float64
		last := cent[len(cent)-1]
		for i, v := range z {
			near[i] = min(near[i], sqDist(v, last))
			total += near[i]
		}
		if total == 0 {
			break // fewer distinct windows than centres
		}
		u := r.Float64() * total
		pick := len(z) - 1
		for i, w := range near {
			if u -= w; u < 0 {
				pick = i
				break
			}
		}
		cent = append(cent, append([]float64(nil), z[pick]...))
	}
	return cent
}

// assign sets each window's label to its nearest centre and reports whether
// any label changed.
func assign(z, cent [][]float64, labels []int) bool {
	moved := false
	for i, v := range z {
		best, bestD := 0, math.Inf(1)
		for c, ctr := range cent {
			if d := sqDist(v, ctr); d < bestD {
				best, bestD = c, d
			}
		}
		if labels[i] != best {
			labels[i], moved = best, true
		}
	}
	return moved
}

// recentre returns the mean of each cluster's windows.
func recentre(z [][]float64, labels []int, k, d int) [][]float64 {
	cent := make([][]float64, k)
	counts := make([]int, k)
	for c := range cent {
		cent[c] = make([]float64, d)
	}
	for i, v := range z {
		l := labels[i]
		counts[l]++
		for j, f := range v {
			cent[l][j] += f
		}
	}
	for c := range cent {
		for j := range cent[c] {
			cent[c][j] /= float64(max(counts[c], 1))
		}
	}
	return cent
}

func sqDist(a, b []float64) float64 {
	var s float64
	for j, v := range a {
		e := v - b[j]
		s += e * e
	}
	return s
}
