package gate

import (
	"fmt"
	"math"

	"github.com/auscult/auscult/pkg/embed"
)

// Lines is the machine's tonal signature, learnt at enrolment by a
// LineLearner and stored with the baseline: the fine-view bands where the
// running machine shows tonal lines, and a few templates of how prominent
// those lines are in the machine's different running conditions (for
// example its speed set-points).
//
// A band's prominence is its level minus the median level of the bands two
// and three places away on either side (dB), floored at 0: a steady tone
// stands out of its neighbours, broadband sound does not. Level and gain
// cancel out of it, and so does the embedding's level normalisation.
//
// The zero value (no bands) means the machine showed no usable lines; a
// Machine gate then judges by level alone.
type Lines struct {
	// Bands are indices into embed.Window.Vec of the fine-view bands that
	// held a line in at least LearnConfig.MinPresence of the enrolment
	// windows. Each has three fine-view bands on either side.
	Bands []int `json:"bands"`
	// Hz are the centre frequencies of Bands (geometric mean of the band
	// edges), in Hz, for reports only.
	Hz []float64 `json:"hz"`
	// Templates are mean prominences of Bands, in dB, one row per cluster
	// of enrolment windows; each row has len(Bands) values >= 0.
	Templates [][]float32 `json:"templates"`
	// MatchP10 is the 10th percentile of the enrolment windows' match
	// against the templates (see Machine), in (0, 1]: how well a typical
	// healthy running window matches. The gate's thresholds scale with it.
	MatchP10 float64 `json:"match_p10"`
}

// Empty reports whether no lines were learnt.
func (l *Lines) Empty() bool { return len(l.Bands) == 0 }

// check verifies that l fits layout.
func (l *Lines) check(layout []embed.Dim) error {
	if l.Empty() {
		return nil
	}
	if len(l.Templates) == 0 {
		return fmt.Errorf("%w: %d line bands but no templates", ErrReference, len(l.Bands))
	}
	for _, b := range l.Bands {
		if b-lineReach < 0 || b+lineReach >= len(layout) {
			return fmt.Errorf("%w: line band %d lacks neighbours in a layout of %d dimensions", ErrReference, b, len(layout))
		}
		for d := -lineReach; d <= lineReach; d++ {
			if layout[b+d].Part != "fine" {
				return fmt.Errorf("%w: line band %d: dimension %d is %q, not part of the fine view", ErrReference, b, b+d, layout[b+d].Part)
			}
		}
	}
	for i, t := range l.Templates {
		if len(t) != len(l.Bands) {
			return fmt.Errorf("%w: template %d has %d values for %d bands", ErrReference, i, len(t), len(l.Bands))
		}
		var e float64
		for _, v := range t {
			if !(v >= 0) || math.IsInf(float64(v), 0) {
				return fmt.Errorf("%w: template %d holds %g, want finite values >= 0", ErrReference, i, v)
			}
			e += float64(v) * float64(v)
		}
		if e == 0 {
			return fmt.Errorf("%w: template %d is all zero", ErrReference, i)
		}
	}
	if !(l.MatchP10 > 0 && l.MatchP10 <= 1) {
		return fmt.Errorf("%w: match_p10 %g, want (0, 1]", ErrReference, l.MatchP10)
	}
	return nil
}

// lineReach is how far the neighbours of a band reach, in bands.
const lineReach = 3

// prominence is the level of vec[i] above the median of vec[i±2] and
// vec[i±3], in dB, floored at 0. The band right next to a line is skipped
// because the line leaks into it.
func prominence(vec []float32, i int) float32 {
	a, b, c, d := vec[i-3], vec[i-2], vec[i+2], vec[i+3]
	lo := min(a, b, c, d)
	hi := max(a, b, c, d)
	med := (a + b + c + d - lo - hi) / 2
	return max(vec[i]-med, 0)
}

// match scores prominences p against template t: sum min(p, t) over
// sum t. It is 1 when every line is at least as prominent as the template
// has it and 0 when none stands out; a line louder than the template counts
// only up to the template, so one strong foreign tone cannot make up for
// missing ones. invNorm is 1/sum(t).
func match(p, t []float32, invNorm float32) float32 {
	var s float32
	for i, v := range t {
		s += min(p[i], v)
	}
	return s * invNorm
}

// matcher scores prominence rows against a set of templates without
// allocating.
type matcher struct {
	templates [][]float32
	inv       []float32 // 1/sum(t) per template, 0 for an all-zero one
}

func newMatcher(templates [][]float32) matcher {
	m := matcher{templates: templates, inv: make([]float32, len(templates))}
	for i, t := range templates {
		var e float32
		for _, v := range t {
			e += v
		}
		if e > 0 {
			m.inv[i] = 1 / e
		}
	}
	return m
}

// best is the highest match of p over all templates, in [0, 1].
func (m *matcher) best(p []float32) float32 {
	var b float32
	for i, t := range m.templates {
		b = max(b, match(p, t, m.inv[i]))
	}
	return b
}
