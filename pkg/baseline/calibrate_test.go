package baseline

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/auscult/auscult/pkg/gamma"
)

// RaiseRate against a direct simulation of a k-of-n debounce on
// independent windows: count windows where the k-of-n condition turns true.
// The closed form is the binomial leading term; for small p it matches.
func TestRaiseRateMatchesSimulation(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	p, k, n := 0.05, 3, 5
	const windows = 4_000_000
	hist := make([]bool, n)
	raised, prev := 0, false
	for i := 0; i < windows; i++ {
		hist[i%n] = r.Float64() < p
		c := 0
		for _, h := range hist {
			if h {
				c++
			}
		}
		now := c >= k
		if now && !prev {
			raised++
		}
		prev = now
	}
	got := float64(raised) / windows
	want := RaiseRate(p, k, n)
	if math.Abs(got-want)/want > 0.15 {
		t.Errorf("simulated raise rate %.3g per window, formula %.3g", got, want)
	}
}

func TestRaiseRateSpecialCases(t *testing.T) {
	if got := RaiseRate(0.01, 1, 1); got != 0.01 {
		t.Errorf("1 of 1: %g", got)
	}
	if got := RaiseRate(0.1, 2, 2); math.Abs(got-0.01) > 1e-15 {
		t.Errorf("2 of 2: %g", got)
	}
}

// The threshold is the gamma quantile of the held-out distances: on data
// drawn from a known shifted gamma (healthy distances have a lower edge), it
// lands near the true quantile, and the measured share above it is near the
// design value.
func TestCalibrateThresholdIsGammaQuantile(t *testing.T) {
	r := rand.New(rand.NewPCG(2, 2))
	const loc, shape, scale = 0.25, 4, 0.03
	held := make([]float64, 20000)
	for i := range held {
		// A sum of exponentials is gamma for an integer shape.
		var s float64
		for j := 0; j < shape; j++ {
			s += -math.Log(1-r.Float64()) * scale
		}
		held[i] = loc + s
	}
	c, err := Calibrate(held, CalibrationOptions{FalseAlarmProb: 0.002, K: 3, N: 5, StepSeconds: 2.048})
	if err != nil {
		t.Fatal(err)
	}
	want := loc + gamma.Dist{Shape: shape, Scale: scale}.Quantile(0.998)
	if math.Abs(c.Threshold-want)/want > 0.03 {
		t.Errorf("threshold %.4f, true quantile %.4f", c.Threshold, want)
	}
	if math.Abs(c.WindowsPerDay-86400/2.048) > 1e-9 || c.FalseAlarmsPerDay <= 0 {
		t.Errorf("rate fields: %+v", c)
	}
	if c.HeldOutOver > 0.004 {
		t.Errorf("%.4f of held-out windows over a 0.2 %% threshold", c.HeldOutOver)
	}
}

func TestEnrollNeedsTwoGroups(t *testing.T) {
	x := correlated(50, 8, 3)
	g := make([]int, len(x))
	_, _, err := Enroll(x, g, DefaultModelOptions(), CalibrationOptions{FalseAlarmProb: 0.01, K: 1, N: 1, Folds: 5})
	if err != ErrTooFewGroups {
		t.Fatalf("got %v", err)
	}
}

// groupedDraw returns windows of n recordings (groups), 40 windows each:
// recording g sits at operating point pointOf(g) (a shared pattern times the
// point) plus its own offset of size quirk, plus window noise.
func groupedDraw(n int, pointOf func(int) float32, quirk float64, seed uint64) ([][]float32, []int) {
	const d = 12
	r := rand.New(rand.NewPCG(seed, 7))
	shift := make([]float32, d)
	for j := range shift {
		shift[j] = float32(3 * r.NormFloat64())
	}
	var x [][]float32
	var groups []int
	for g := 0; g < n; g++ {
		own := make([]float32, d)
		for j := range own {
			own[j] = float32(quirk * r.NormFloat64())
		}
		for w := 0; w < 40; w++ {
			v := make([]float32, d)
			for j := range v {
				v[j] = -40 + pointOf(g)*shift[j] + own[j] + float32(0.3*r.NormFloat64())
			}
			x, groups = append(x, v), append(groups, g)
		}
	}
	return x, groups
}

// Two set-points shared by many recordings: held-out recordings land on a
// centre they have never been part of, so several centres win.
func TestEnrollFindsSharedOperatingPoints(t *testing.T) {
	x, groups := groupedDraw(20, func(g int) float32 { return float32(g % 2) }, 0, 31)
	k, err := SelectCentroids(x, groups, DefaultModelOptions(), 5)
	if err != nil {
		t.Fatal(err)
	}
	if k < 2 {
		t.Errorf("chose %d centre(s) for two shared operating points", k)
	}
}

// Every recording with its own quirk and no shared operating points:
// centres would learn the quirks, which do not carry over to a recording
// never seen, so one mean wins.
func TestEnrollKeepsOneMeanForRecordingQuirks(t *testing.T) {
	x, groups := groupedDraw(10, func(int) float32 { return 0 }, 2, 32)
	k, err := SelectCentroids(x, groups, DefaultModelOptions(), 5)
	if err != nil {
		t.Fatal(err)
	}
	if k != 1 {
		t.Errorf("chose %d centres for recordings that share nothing but the mean", k)
	}
}
