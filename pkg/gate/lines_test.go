package gate

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/auscult/auscult/pkg/embed"
)

// testLayout is nMel mel_low dimensions followed by nFine fine-view bands
// of 1/12 octave from 25 Hz, like embed's default layout but smaller.
func testLayout(nMel, nFine int) []embed.Dim {
	var l []embed.Dim
	for i := range nMel {
		l = append(l, embed.Dim{Part: "mel_low", LoHz: float64(i) * 100, HiHz: float64(i+1) * 100})
	}
	for i := range nFine {
		lo := 25 * math.Pow(2, float64(i)/12)
		l = append(l, embed.Dim{Part: "fine", LoHz: lo, HiHz: lo * math.Pow(2, 1.0/12)})
	}
	return l
}

// lineVec is a window vector of the test layout: noise of noiseDB
// (standard deviation) around -40 dB, plus lines of height dB at the given
// bands.
func lineVec(layout []embed.Dim, r *rand.Rand, noiseDB, height float32, bands ...int) []float32 {
	v := make([]float32, len(layout))
	for i := range v {
		v[i] = -40 + noiseDB*float32(r.NormFloat64())
	}
	for _, b := range bands {
		v[b] += height
	}
	return v
}

func TestProminence(t *testing.T) {
	tests := []struct {
		name string
		vec  []float32
		want float32
	}{
		{"flat", []float32{0, 0, 0, 0, 0, 0, 0}, 0},
		// neighbours 1, 2 (i-3, i-2) and 4, 0 (i+2, i+3): median 1.5; i±1 skipped.
		{"line of 10 dB", []float32{1, 2, 9, 10, 3, 4, 0}, 10 - 1.5},
		{"dip floors at 0", []float32{5, 5, 5, -3, 5, 5, 5}, 0},
		// neighbours 1 (i-3), 2 (i-2), 30 (i+2, a foreign line), 4 (i+3):
		// the median of four ignores the odd one out.
		{"foreign line next door", []float32{1, 2, 0, 12, 0, 30, 4}, 12 - 3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := prominence(tc.vec, 3); math.Abs(float64(got-tc.want)) > 1e-6 {
				t.Errorf("prominence = %g, want %g", got, tc.want)
			}
		})
	}
}

// A machine with two speed set-points, each with its own lines: the
// learner finds the union of the lines and a template for each set-point;
// a window of either set-point matches fully, a window without lines or
// with one foreign line in a line band matches poorly.
func TestLineLearner(t *testing.T) {
	layout := testLayout(8, 40)
	setA := []int{18, 22, 30}
	setB := []int{20, 25, 33}
	r := rand.New(rand.NewPCG(3, 4))
	ll, err := NewLineLearner(layout, DefaultLearnConfig())
	if err != nil {
		t.Fatal(err)
	}
	for i := range 200 {
		set := setA
		if i%2 == 1 {
			set = setB
		}
		ll.Add(lineVec(layout, r, 1, 12, set...))
	}
	lines, err := ll.Lines()
	if err != nil {
		t.Fatal(err)
	}
	want := slices.Sorted(slices.Values(append(slices.Clone(setA), setB...)))
	if !slices.Equal(lines.Bands, want) {
		t.Fatalf("bands %v, want %v", lines.Bands, want)
	}
	if len(lines.Templates) < 2 {
		t.Errorf("%d templates, want one per set-point at least", len(lines.Templates))
	}
	if lines.MatchP10 < 0.8 {
		t.Errorf("MatchP10 = %.2f, want >= 0.8 on clean lines", lines.MatchP10)
	}
	if err := lines.check(layout); err != nil {
		t.Fatalf("learnt lines do not fit their layout: %v", err)
	}
	m := newMatcher(lines.Templates)
	p := make([]float32, len(lines.Bands))
	score := func(v []float32) float32 {
		for i, b := range lines.Bands {
			p[i] = prominence(v, b)
		}
		return m.best(p)
	}
	stop := float32(DefaultMachineConfig().StopMatch * lines.MatchP10)
	run := float32(DefaultMachineConfig().RunMatch * lines.MatchP10)
	tests := []struct {
		name    string
		vec     []float32
		atLeast float32
		below   float32
	}{
		{"set-point A", lineVec(layout, r, 1, 12, setA...), run, 2},
		{"set-point B", lineVec(layout, r, 1, 12, setB...), run, 2},
		{"set-point A, lines 20 dB louder", lineVec(layout, r, 1, 32, setA...), run, 2},
		{"no lines", lineVec(layout, r, 1, 0), 0, stop},
		{"one foreign line in a line band", lineVec(layout, r, 1, 20, setB[0]), 0, stop},
		{"foreign lines outside the line bands", lineVec(layout, r, 1, 20, 10, 14, 27, 38), 0, stop},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := score(tc.vec); got < tc.atLeast || got >= tc.below {
				t.Errorf("match %.2f, want in [%.2f, %.2f)", got, tc.atLeast, tc.below)
			}
		})
	}
}

func TestLineLearnerEmptyAndShort(t *testing.T) {
	layout := testLayout(8, 40)
	r := rand.New(rand.NewPCG(5, 6))
	tests := []struct {
		name    string
		windows int
		bands   []int
		layout  []embed.Dim
		wantErr error
		empty   bool
	}{
		{"broadband machine", 100, nil, layout, nil, true},
		{"a single line is too few", 100, []int{20}, layout, nil, true},
		{"no fine view", 100, nil, testLayout(8, 0), nil, true},
		{"too few windows", 10, []int{20, 30}, layout, ErrTooFewWindows, true},
		{"two lines", 100, []int{20, 30}, layout, nil, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			ll, err := NewLineLearner(tc.layout, DefaultLearnConfig())
			if err != nil {
				t.Fatal(err)
			}
			for range tc.windows {
				v := lineVec(layout, r, 1, 12, tc.bands...)
				ll.Add(v[:len(tc.layout)])
			}
			lines, err := ll.Lines()
			if !errors.Is(err, tc.wantErr) {
				t.Fatalf("err %v, want %v", err, tc.wantErr)
			}
			if lines.Empty() != tc.empty {
				t.Errorf("Empty() = %v, want %v (%+v)", lines.Empty(), tc.empty, lines)
			}
		})
	}
}

func TestLearnConfigValidate(t *testing.T) {
	tests := []struct {
		name string
		edit func(*LearnConfig)
	}{
		{"line dB", func(c *LearnConfig) { c.LineDB = 0 }},
		{"presence", func(c *LearnConfig) { c.MinPresence = 1.5 }},
		{"min lines", func(c *LearnConfig) { c.MinLines = 0 }},
		{"templates", func(c *LearnConfig) { c.MaxTemplates = 0 }},
		{"windows", func(c *LearnConfig) { c.MinWindows = 1 }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c := DefaultLearnConfig()
			tc.edit(&c)
			if _, err := NewLineLearner(testLayout(2, 10), c); !errors.Is(err, ErrConfig) {
				t.Errorf("err %v, want ErrConfig", err)
			}
		})
	}
}
