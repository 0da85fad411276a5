package features

import (
	"errors"
	"math"
	"testing"
)

// TestHzToMel checks the HTK mel formula mel(f) = 2595 log10(1 + f/700)
// (HTK Book) at values from the project's reference sheet.
func TestHzToMel(t *testing.T) {
	for _, tc := range []struct {
		hz, mel, tol float64
	}{
		{1000, 999.986, 0.0005}, // reference sheet, 3 decimals
		{440, 549.64, 0.005},    // reference sheet, 2 decimals
		{8000, 2840.02, 0.005},  // reference sheet, 2 decimals
		{0, 0, 1e-12},           // log10(1) = 0
	} {
		t.Run(itoa(int(tc.hz)), func(t *testing.T) {
			if got := HzToMel(tc.hz); math.Abs(got-tc.mel) > tc.tol {
				t.Errorf("HzToMel(%g) = %.4f, want %g", tc.hz, got, tc.mel)
			}
			if back := MelToHz(HzToMel(tc.hz)); math.Abs(back-tc.hz) > 1e-9*(1+tc.hz) {
				t.Errorf("MelToHz(HzToMel(%g)) = %g", tc.hz, back)
			}
		})
	}
}

// TestMelBankFixture compares the sparse weights with the numpy HTK
// triangles in the fixture (same definition, evaluated in float64;
// float32 storage gives 6e-8 relative error, so 1e-6 absolute).
func TestMelBankFixture(t *testing.T) {
	r := loadReference(t)
	b, err := NewMelBank(r.Rate, r.N, r.Mels, r.FMin, r.FMax)
	if err != nil {
		t.Fatal(err)
	}
	if b.Len() != r.Mels || b.Bins() != r.N/2+1 {
		t.Fatalf("Len %d, Bins %d", b.Len(), b.Bins())
	}
	for i := 0; i < b.Len(); i++ {
		w := b.Weights(i)
		if b.First(i) != r.MelFirst[i] || len(w) != len(r.MelWeights[i]) {
			t.Fatalf("band %d: first %d, %d weights; numpy first %d, %d weights", i, b.First(i), len(w), r.MelFirst[i], len(r.MelWeights[i]))
		}
		for j, want := range r.MelWeights[i] {
			if math.Abs(float64(w[j])-want) > 1e-6 {
				t.Errorf("band %d bin %d: %g, numpy %g", i, b.First(i)+j, w[j], want)
			}
		}
		lo, hi := b.Edges(i)
		if math.Abs(lo-r.MelPointsHz[i]) > 1e-6 || math.Abs(hi-r.MelPointsHz[i+2]) > 1e-6 || math.Abs(b.Centers()[i]-r.MelPointsHz[i+1]) > 1e-6 {
			t.Errorf("band %d: edges %g..%g centre %g, numpy %g..%g centre %g", i, lo, hi, b.Centers()[i], r.MelPointsHz[i], r.MelPointsHz[i+2], r.MelPointsHz[i+1])
		}
	}
}

// TestMelBankErrors checks rejected arguments.
func TestMelBankErrors(t *testing.T) {
	for _, tc := range []struct {
		name             string
		rate, nfft, mels int
		fmin, fmax       float64
		want             error
	}{
		{"nfft not power of two", 16000, 1000, 40, 0, 8000, ErrFFTSize},
		{"no bands", 16000, 1024, 0, 0, 8000, ErrBank},
		{"fmax above Nyquist", 16000, 1024, 40, 0, 9000, ErrBank},
		{"empty range", 16000, 1024, 40, 500, 500, ErrBank},
		{"negative fmin", 16000, 1024, 40, -1, 8000, ErrBank},
		{"band without a bin", 16000, 256, 128, 0, 8000, ErrBank},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := NewMelBank(tc.rate, tc.nfft, tc.mels, tc.fmin, tc.fmax); !errors.Is(err, tc.want) {
				t.Errorf("error %v, want %v", err, tc.want)
			}
		})
	}
}

// TestLogBank checks the constant-relative-width bands: each holds at
// least one bin, bands are contiguous and disjoint, unmerged bands have
// the nominal ratio hi/lo = 2^(1/b), and every bin between the first and
// the last edge belongs to exactly one band.
func TestLogBank(t *testing.T) {
	for _, tc := range []struct {
		name       string
		rate, nfft int
		fmin, fmax float64
		bpo        int
		wantMerged bool
	}{
		{"long FFT 1/24 octave", 16000, 16384, 10, 8000, 24, true},
		{"long FFT 1/12 octave", 16000, 16384, 5, 5000, 12, true},
		{"short FFT 1/3 octave", 16000, 1024, 20, 8000, 3, true},
		{"coarse no merging", 16000, 16384, 100, 6400, 1, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			b, err := NewLogBank(tc.rate, tc.nfft, tc.fmin, tc.fmax, tc.bpo)
			if err != nil {
				t.Fatal(err)
			}
			binHz := float64(tc.rate) / float64(tc.nfft)
			ratio := math.Exp2(1 / float64(tc.bpo))
			merged := false
			next := b.First(0)
			for i := 0; i < b.Len(); i++ {
				w := b.Weights(i)
				lo, hi := b.Edges(i)
				if len(w) == 0 {
					t.Fatalf("band %d is empty", i)
				}
				if b.First(i) != next {
					t.Fatalf("band %d starts at bin %d, want %d (gap or overlap)", i, b.First(i), next)
				}
				next = b.First(i) + len(w)
				for j := range w {
					f := float64(b.First(i)+j) * binHz
					if w[j] != 1 || f < lo-1e-9 || f >= hi+1e-9 {
						t.Errorf("band %d (%g..%g Hz): bin at %g Hz weight %g", i, lo, hi, f, w[j])
					}
				}
				if c := b.Centers()[i]; c <= lo || c >= hi {
					t.Errorf("band %d centre %g outside %g..%g", i, c, lo, hi)
				}
				if r := hi / lo; r > ratio*(1+1e-9) {
					merged = true
				} else if math.Abs(r-ratio) > 1e-9 {
					t.Errorf("band %d: hi/lo = %g, want %g", i, hi/lo, ratio)
				}
			}
			if merged != tc.wantMerged {
				t.Errorf("merged = %v, want %v", merged, tc.wantMerged)
			}
		})
	}
}

// TestLogBankErrors checks rejected arguments.
func TestLogBankErrors(t *testing.T) {
	for _, tc := range []struct {
		name       string
		rate, nfft int
		fmin, fmax float64
		bpo        int
		want       error
	}{
		{"zero fmin", 16000, 16384, 0, 8000, 12, ErrBank},
		{"no bands per octave", 16000, 16384, 10, 8000, 0, ErrBank},
		{"range below one band", 16000, 16384, 1000, 1010, 12, ErrBank},
		{"range holds no bin", 16000, 64, 1, 1.5, 12, ErrBank},
		{"bad nfft", 16000, 100, 10, 8000, 12, ErrFFTSize},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := NewLogBank(tc.rate, tc.nfft, tc.fmin, tc.fmax, tc.bpo); !errors.Is(err, tc.want) {
				t.Errorf("error %v, want %v", err, tc.want)
			}
		})
	}
}

// TestBankApply checks Apply against a dense weighted sum (definition).
func TestBankApply(t *testing.T) {
	b, err := NewMelBank(16000, 512, 40, 100, 7000)
	if err != nil {
		t.Fatal(err)
	}
	p := make([]float32, b.Bins())
	for k := range p {
		p[k] = float32(1 + k%7)
	}
	got := make([]float32, b.Len())
	b.Apply(p, got)
	for i := range got {
		var want float64
		for j, w := range b.Weights(i) {
			want += float64(w) * float64(p[b.First(i)+j])
		}
		if math.Abs(float64(got[i])-want) > 1e-5*want {
			t.Errorf("band %d: %g, want %g", i, got[i], want)
		}
	}
	if a := testing.AllocsPerRun(100, func() { b.Apply(p, got) }); a != 0 {
		t.Errorf("%v allocations per Apply, want 0", a)
	}
	defer func() {
		if recover() == nil {
			t.Error("no panic for wrong lengths")
		}
	}()
	b.Apply(p[:10], got)
}
