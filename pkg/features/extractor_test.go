package features

import (
	"math"
	"math/rand/v2"
	"testing"
)

// rows64 is the float64 version of the same pipeline, written
// independently of the package code: periodic Hann from its formula, a
// direct DFT, HTK triangles from their formula, math.Log10. It returns
// the row in dB relative to N sum(w^2)/4, floored.
func rows64(cfg Config, frame []int16) []float64 {
	n := cfg.FrameLen
	x := make([]float64, n)
	var sumSq float64
	for i, s := range frame {
		w := 0.5 - 0.5*math.Cos(2*math.Pi*float64(i)/float64(n))
		sumSq += w * w
		x[i] = float64(s) / 32768 * w
	}
	p := naivePower(x)
	mel := func(f float64) float64 { return 2595 * math.Log10(1+f/700) }
	hz := func(m float64) float64 { return 700 * (math.Pow(10, m/2595) - 1) }
	pts := make([]float64, cfg.Mels+2)
	for i := range pts {
		pts[i] = hz(mel(cfg.FMin) + (mel(cfg.FMax)-mel(cfg.FMin))*float64(i)/float64(cfg.Mels+1))
	}
	pts[0], pts[cfg.Mels+1] = cfg.FMin, cfg.FMax
	ref := float64(n) * sumSq / 4
	out := make([]float64, cfg.Mels)
	for b := range out {
		var e float64
		for k, v := range p {
			f := float64(k) * float64(cfg.Rate) / float64(n)
			w := math.Max(0, math.Min((f-pts[b])/(pts[b+1]-pts[b]), (pts[b+2]-f)/(pts[b+2]-pts[b+1])))
			e += w * v
		}
		out[b] = math.Max(10*math.Log10(e/ref), float64(cfg.FloorDB))
	}
	return out
}

// compareRows checks got against want: |difference| < tol dB wherever
// want is above floor+20 dB, and exactly the floor where want is at it.
func compareRows(t *testing.T, got []float32, want []float64, floor float64, tol float64) {
	t.Helper()
	for i, w := range want {
		g := float64(got[i])
		switch {
		case w > floor+20:
			if math.Abs(g-w) > tol {
				t.Errorf("band %d: %.4f dB, reference %.4f dB", i, g, w)
			}
		case w == floor:
			if g > floor+1 {
				t.Errorf("band %d: %.4f dB, reference at floor %g", i, g, floor)
			}
		}
	}
}

// TestExtractorFixture compares with the numpy log-mel row of the
// fixture frame. Tolerance 0.05 dB above floor+20 dB (the float32 FFT
// error bound of TestFFTFixture is 1e-5 of the norm; the weakest band is
// 60 dB below the strongest, i.e. 1e-3 in amplitude, so the error there
// is below 0.01 dB).
func TestExtractorFixture(t *testing.T) {
	r := loadReference(t)
	cfg := Config{Rate: r.Rate, FrameLen: r.N, Hop: r.N / 2, Mels: r.Mels, FMin: r.FMin, FMax: r.FMax, FloorDB: float32(r.FloorDB)}
	e, err := NewExtractor(cfg)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(e.RefEnergy()-r.RefEnergy) > 1e-4*r.RefEnergy {
		t.Errorf("RefEnergy %g, numpy %g", e.RefEnergy(), r.RefEnergy)
	}
	row := make([]float32, r.Mels)
	e.Rows(r.Frame, row)
	compareRows(t, row, r.LogMel, r.FloorDB, 0.05)
	if e := normRelErr(e.Spectrum(), r.Power); e > 1e-5 {
		t.Errorf("Spectrum norm-wise relative error vs numpy %.3g", e)
	}
}

// TestExtractorFloat64 compares float32 rows with the float64 pipeline
// on frames from silence to full scale. Tolerance 0.05 dB above
// floor+20 dB (brief's target; float32 rounding is ~1e-4 dB).
func TestExtractorFloat64(t *testing.T) {
	cfg := DefaultConfig()
	e, err := NewExtractor(cfg)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(13, 14))
	gen := map[string]func(i int) float64{
		"silence":         func(int) float64 { return 0 },
		"quiet noise":     func(int) float64 { return rng.NormFloat64() * 3 },
		"loud noise":      func(int) float64 { return rng.NormFloat64() * 8000 },
		"full-scale tone": func(i int) float64 { return 32767 * math.Sin(2*math.Pi*1234.5*float64(i)/16000) },
		"two tones": func(i int) float64 {
			return 9000*math.Sin(2*math.Pi*50*float64(i)/16000) + 300*math.Sin(2*math.Pi*6100*float64(i)/16000)
		},
		"full-scale clips": func(int) float64 { return float64(rng.IntN(2)*65535 - 32768) },
	}
	for name, g := range gen {
		t.Run(name, func(t *testing.T) {
			frame := make([]int16, cfg.FrameLen)
			for i := range frame {
				frame[i] = int16(math.Max(-32768, math.Min(32767, math.Round(g(i)))))
			}
			row := make([]float32, cfg.Mels)
			e.Rows(frame, row)
			compareRows(t, row, rows64(cfg, frame), float64(cfg.FloorDB), 0.05)
		})
	}
}

// TestExtractorTone checks the 0 dB reference and band placement: a
// full-scale sine puts its largest band energy in the band whose centre
// is nearest the tone, and that band reads at most 0 dB (the one-sided
// energy of the tone is the reference, and weights are <= 1) and not
// below -6 dB (the tone's main lobe spans 3 bins, and neighbouring
// triangles sum to 1; -6 dB is common practice, no source).
func TestExtractorTone(t *testing.T) {
	cfg := DefaultConfig()
	e, _ := NewExtractor(cfg)
	frame := make([]int16, cfg.FrameLen)
	row := make([]float32, cfg.Mels)
	for _, hz := range []float64{250, 1000, 1234.5, 3000, 6000} {
		t.Run(itoa(int(hz)), func(t *testing.T) {
			for i := range frame {
				frame[i] = int16(math.Round(32767 * math.Sin(2*math.Pi*hz*float64(i)/float64(cfg.Rate))))
			}
			e.Rows(frame, row)
			best, nearest := 0, 0
			for i := range row {
				if row[i] > row[best] {
					best = i
				}
				c := e.Bank().Centers()
				if math.Abs(c[i]-hz) < math.Abs(c[nearest]-hz) {
					nearest = i
				}
			}
			if best != nearest {
				t.Errorf("largest band %d (centre %.1f Hz), nearest band %d (centre %.1f Hz)", best, e.Bank().Centers()[best], nearest, e.Bank().Centers()[nearest])
			}
			if row[best] > 0.01 || row[best] < -6 {
				t.Errorf("peak band reads %.3f dB, want in [-6, 0]", row[best])
			}
			t.Logf("%g Hz: band %d reads %.3f dB", hz, best, row[best])
		})
	}
}

// TestExtractorFullScaleBound checks the documented range bound
// max |X_k| <= sum w = N/2 for full-scale input (triangle inequality;
// a constant -32768 frame reaches it at k = 0).
func TestExtractorFullScaleBound(t *testing.T) {
	cfg := DefaultConfig()
	e, _ := NewExtractor(cfg)
	frame := make([]int16, cfg.FrameLen)
	row := make([]float32, cfg.Mels)
	limit := float64(cfg.FrameLen/2) * float64(cfg.FrameLen/2)
	for i := range frame {
		frame[i] = -32768
	}
	e.Rows(frame, row)
	if p0 := float64(e.Spectrum()[0]); math.Abs(p0-limit) > 1e-5*limit {
		t.Errorf("|X_0|^2 = %g for constant full scale, want (N/2)^2 = %g", p0, limit)
	}
	rng := rand.New(rand.NewPCG(15, 16))
	for trial := 0; trial < 20; trial++ {
		for i := range frame {
			frame[i] = int16(rng.IntN(2)*65535 - 32768)
		}
		e.Rows(frame, row)
		for k, p := range e.Spectrum() {
			if float64(p) > limit*(1+1e-5) {
				t.Fatalf("|X_%d|^2 = %g > (N/2)^2", k, p)
			}
		}
	}
}

// TestExtractorSilenceAndAllocs checks that silence gives the floor and
// that Rows does not allocate.
func TestExtractorSilenceAndAllocs(t *testing.T) {
	cfg := DefaultConfig()
	e, _ := NewExtractor(cfg)
	frame := make([]int16, cfg.FrameLen)
	row := make([]float32, cfg.Mels)
	e.Rows(frame, row)
	for i, v := range row {
		if v != cfg.FloorDB {
			t.Fatalf("silence band %d = %g, want floor %g", i, v, cfg.FloorDB)
		}
	}
	if a := testing.AllocsPerRun(100, func() { e.Rows(frame, row) }); a != 0 {
		t.Errorf("%v allocations per Rows, want 0", a)
	}
	if len(e.Spectrum()) != cfg.FrameLen/2+1 || e.Bank().Len() != cfg.Mels || e.Config() != cfg {
		t.Errorf("accessors disagree with the config")
	}
}

// TestExtractorPanics checks the length contract.
func TestExtractorPanics(t *testing.T) {
	e, _ := NewExtractor(DefaultConfig())
	defer func() {
		if recover() == nil {
			t.Error("no panic for a short frame")
		}
	}()
	e.Rows(make([]int16, 100), make([]float32, 128))
}
