package site

import (
	"bytes"
	"errors"
	"image"
	"image/color"
	"image/png"
	"math"
	"math/rand/v2"
	"testing"
	"time"
)

// Layout of a default-size spectrogram (900 x 360): a 14-pixel band above
// and below the plot for labels, 30 pixels left of it, 50 right of it.
const (
	specTestTop    = 14
	specTestBottom = 360 - 14
	specTestLeft   = 30
	specTestRight  = 900 - 50
)

func renderSpectrogram(t testing.TB, s Spectrogram) image.Image {
	t.Helper()
	var b bytes.Buffer
	if err := s.WritePNG(&b); err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(&b)
	if err != nil {
		t.Fatalf("not a PNG: %v", err)
	}
	return img
}

// expectedY is where frequency f lies on a plot from top to bottom showing
// 0 to maxHz, by the documented axis: height proportional to
// ln(1 + f/100 Hz).
func expectedY(f, maxHz float64, top, bottom int) float64 {
	return float64(top) + (1-math.Log1p(f/100)/math.Log1p(maxHz/100))*float64(bottom-top)
}

// tone makes a sine of frequency f (Hz) and amplitude amp (LSB).
func tone(rate int, seconds, f, amp float64) []int16 {
	out := make([]int16, int(float64(rate)*seconds))
	for i := range out {
		out[i] = int16(math.Round(amp * math.Sin(2*math.Pi*f*float64(i)/float64(rate))))
	}
	return out
}

// rgbaAt is the colour of the pixel at (x, y).
func rgbaAt(img image.Image, x, y int) color.RGBA {
	return color.RGBAModel.Convert(img.At(x, y)).(color.RGBA)
}

// lightness is a luma of c, enough to order the colour map's levels.
func lightness(c color.Color) float64 {
	r, g, b, _ := c.RGBA()
	return 0.2126*float64(r) + 0.7152*float64(g) + 0.0722*float64(b)
}

// brightestRow returns the row of the plot between top and bottom whose
// pixels in columns [x0, x1) are brightest on average.
func brightestRow(img image.Image, x0, x1, top, bottom int) int {
	best, bestY := -1.0, -1
	for y := top; y < bottom; y++ {
		var sum float64
		for x := x0; x < x1; x++ {
			sum += lightness(img.At(x, y))
		}
		if sum > best {
			best, bestY = sum, y
		}
	}
	return bestY
}

func TestSpectrogramToneRow(t *testing.T) {
	for _, maxHz := range []float64{0, 2000} {
		s := Spectrogram{Rate: 16000, Samples: tone(16000, 2, 1000, 16384), EventAt: -1, MaxHz: maxHz}
		img := renderSpectrogram(t, s)
		if b := img.Bounds(); b.Dx() != 900 || b.Dy() != 360 {
			t.Fatalf("size %v, want 900 x 360", b)
		}
		top := maxHz
		if top == 0 {
			top = 8000
		}
		want := expectedY(1000, top, specTestTop, specTestBottom)
		got := brightestRow(img, specTestLeft, specTestRight, specTestTop, specTestBottom)
		if math.Abs(float64(got)+0.5-want) > 2 {
			t.Errorf("MaxHz %v: brightest row %d, want the row of 1 kHz at y %.1f", maxHz, got, want)
		}
	}
}

func TestSpectrogramLevelReference(t *testing.T) {
	// A sine of amplitude A on a bin centre must read 20 log10(A/32768)
	// dB: with the periodic Hann window the coherent gain sum(w)/N is 0.5
	// (F. J. Harris, "On the use of windows for harmonic analysis with the
	// discrete Fourier transform", Proc. IEEE 66(1), 1978, table 1).
	for _, amp := range []float64{16384, 1024} {
		s := Spectrogram{Rate: 16000, Samples: tone(16000, 1, 1000, amp), EventAt: -1} // 1000 Hz = bin 64
		img := renderSpectrogram(t, s)
		y := brightestRow(img, specTestLeft, specTestRight, specTestTop, specTestBottom)
		c := rgbaAt(img, (specTestLeft+specTestRight)/2, y)
		level := -1
		for i, v := range specLUT {
			if v.R == c.R && v.G == c.G && v.B == c.B {
				level = i
			}
		}
		wantDB := 20 * math.Log10(amp/32768)
		want := (wantDB - specFloorDB) / (specTopDB - specFloorDB) * 255
		if level < 0 || math.Abs(float64(level)-want) > 1 {
			t.Errorf("amplitude %v: colour level %d, want %.1f (%.2f dBFS)", amp, level, want, wantDB)
		}
	}
}

func TestSpectrogramSilenceIsFloor(t *testing.T) {
	img := renderSpectrogram(t, Spectrogram{Rate: 16000, Samples: make([]int16, 32000), EventAt: -1})
	floor := specLUT[0]
	for y := specTestTop; y < specTestBottom; y++ {
		for x := specTestLeft; x < specTestRight; x++ {
			c := rgbaAt(img, x, y)
			if c.R != floor.R || c.G != floor.G || c.B != floor.B {
				t.Fatalf("silence: pixel (%d, %d) is %v, want the floor colour %v", x, y, c, floor)
			}
		}
	}
	// The margins hold the axes: some ink left of the plot and below it.
	ink := 0
	for y := 0; y < 360; y++ {
		for x := 0; x < specTestLeft-3; x++ {
			if lightness(img.At(x, y)) < 40000 {
				ink++
			}
		}
	}
	if ink < 50 {
		t.Errorf("%d dark pixels left of the plot: no frequency labels", ink)
	}
}

func TestSpectrogramChirpRises(t *testing.T) {
	const rate, seconds, f0, f1 = 16000, 4.0, 100.0, 6000.0
	n := int(rate * seconds)
	samples := make([]int16, n)
	for i := range samples {
		tt := float64(i) / rate
		phase := 2 * math.Pi * (f0*tt + (f1-f0)/(2*seconds)*tt*tt)
		samples[i] = int16(12000 * math.Sin(phase))
	}
	img := renderSpectrogram(t, Spectrogram{Rate: rate, Samples: samples, EventAt: -1})
	pw := specTestRight - specTestLeft
	prev := math.MaxInt
	for _, frac := range []float64{0.1, 0.3, 0.5, 0.7, 0.9} {
		x := specTestLeft + int(frac*float64(pw))
		y := brightestRow(img, x, x+1, specTestTop, specTestBottom)
		f := f0 + (f1-f0)*frac // instantaneous frequency at the column's time
		want := expectedY(f, rate/2, specTestTop, specTestBottom)
		if y >= prev {
			t.Errorf("at %.0f%% the ridge is at y %d, not above %d", 100*frac, y, prev)
		}
		if math.Abs(float64(y)+0.5-want) > 3 {
			t.Errorf("at %.0f%% (%.0f Hz) the ridge is at y %d, want %.1f", 100*frac, f, y, want)
		}
		prev = y
	}
}

func TestSpectrogramLongClipSkipsNothing(t *testing.T) {
	// Two minutes at 16 kHz: each of the 820 columns spans about 2341
	// samples, more than one frame. A 25 ms burst of 1 kHz at the very
	// start of column 400's span must show in that column.
	const rate = 16000
	samples := make([]int16, 120*rate)
	span := float64(len(samples)) / float64(specTestRight-specTestLeft)
	at := int(400*span) + 8
	for i := 0; i < 400; i++ {
		samples[at+i] = int16(16000 * math.Sin(2*math.Pi*1000*float64(i)/rate))
	}
	img := renderSpectrogram(t, Spectrogram{Rate: rate, Samples: samples, EventAt: -1})
	y := int(expectedY(1000, rate/2, specTestTop, specTestBottom))
	floor := lightness(specLUT[0])
	if got := lightness(img.At(specTestLeft+400, y)); got <= floor+1000 {
		t.Errorf("the burst does not show: column 400 at 1 kHz has luma %.0f, the floor %.0f", got, floor)
	}
	if got := lightness(img.At(specTestLeft+200, y)); got != floor {
		t.Errorf("column 200 at 1 kHz has luma %.0f, want the floor %.0f", got, floor)
	}
}

func TestSpectrogramMarks(t *testing.T) {
	base := Spectrogram{Rate: 16000, Samples: tone(16000, 2, 300, 3000), EventAt: -1}
	plain := renderSpectrogram(t, base)
	marked := base
	marked.Marks = []BandMark{{LowHz: 600, HighHz: 900, Label: "band 3: 600-900 Hz"}}
	marked.EventAt = 500 * time.Millisecond
	img := renderSpectrogram(t, marked)

	yIn := int((expectedY(600, 8000, specTestTop, specTestBottom) + expectedY(900, 8000, specTestTop, specTestBottom)) / 2)
	yOut := int(expectedY(3000, 8000, specTestTop, specTestBottom))
	xIn := specTestLeft + 100
	if plain.At(xIn, yIn) == img.At(xIn, yIn) {
		t.Errorf("inside the band (%d, %d): same colour with and without the mark", xIn, yIn)
	}
	if plain.At(xIn, yOut) != img.At(xIn, yOut) {
		t.Errorf("outside the band (%d, %d): the colour changed", xIn, yOut)
	}
	// The bracket right of the plot.
	if plain.At(specTestRight+5, yIn) == img.At(specTestRight+5, yIn) {
		t.Errorf("no bracket right of the plot at y %d", yIn)
	}
	// The event line, 0.5 s into a 2 s clip: a quarter of the plot.
	xEv := specTestLeft + (specTestRight-specTestLeft)/4
	changed := 0
	for y := specTestTop; y < specTestBottom; y++ {
		if plain.At(xEv, y) != img.At(xEv, y) {
			changed++
		}
	}
	if changed < (specTestBottom-specTestTop)/2 {
		t.Errorf("event line: %d pixels of column %d changed", changed, xEv)
	}
	// A column away from the line and the band is untouched.
	for y := specTestTop; y < specTestBottom; y++ {
		if x := xEv + 40; y < yIn-20 && plain.At(x, y) != img.At(x, y) {
			t.Fatalf("pixel (%d, %d) changed", x, y)
		}
	}
}

func TestSpectrogramBadInput(t *testing.T) {
	good := Spectrogram{Rate: 16000, Samples: make([]int16, 2000)}
	for name, mod := range map[string]func(*Spectrogram){
		"rate 0":        func(s *Spectrogram) { s.Rate = 0 },
		"negative rate": func(s *Spectrogram) { s.Rate = -8000 },
		"no samples":    func(s *Spectrogram) { s.Samples = nil },
		"tiny":          func(s *Spectrogram) { s.Width, s.Height = 10, 10 },
		"negative":      func(s *Spectrogram) { s.Width = -900 },
		"huge":          func(s *Spectrogram) { s.Height = 1 << 20 },
		"above Nyquist": func(s *Spectrogram) { s.MaxHz = 9000 },
		"NaN MaxHz":     func(s *Spectrogram) { s.MaxHz = math.NaN() },
		"negative Hz":   func(s *Spectrogram) { s.MaxHz = -1 },
		"empty band":    func(s *Spectrogram) { s.Marks = []BandMark{{LowHz: 500, HighHz: 500}} },
		"NaN band":      func(s *Spectrogram) { s.Marks = []BandMark{{LowHz: math.NaN(), HighHz: 500}} },
		"infinite band": func(s *Spectrogram) { s.Marks = []BandMark{{LowHz: 10, HighHz: math.Inf(1)}} },
	} {
		s := good
		mod(&s)
		var b bytes.Buffer
		if err := s.WritePNG(&b); !errors.Is(err, ErrBadSpectrogram) || b.Len() != 0 {
			t.Errorf("%s: err %v, %d bytes written", name, err, b.Len())
		}
	}
	// Odd but valid: shorter than one FFT frame, one sample, a low rate,
	// a band above the axis, an event past the end, a small image.
	for name, s := range map[string]Spectrogram{
		"short":         {Rate: 16000, Samples: tone(16000, 0.01, 1000, 8000)},
		"one sample":    {Rate: 8000, Samples: []int16{-32768}},
		"rate 1":        {Rate: 1, Samples: make([]int16, 5000)},
		"band above":    {Rate: 16000, Samples: make([]int16, 5000), Marks: []BandMark{{LowHz: 9000, HighHz: 9500, Label: "x"}}},
		"event past":    {Rate: 16000, Samples: make([]int16, 5000), EventAt: time.Hour},
		"small":         {Rate: 16000, Samples: make([]int16, 5000), Width: 200, Height: 120, Marks: []BandMark{{LowHz: 0, HighHz: 8000, Label: "everything ä<>"}}},
		"large, scaled": {Rate: 48000, Samples: tone(48000, 0.5, 440, 9000), Width: 1400, Height: 700, EventAt: 0},
	} {
		img := renderSpectrogram(t, s)
		w, h := max(s.Width, 0), max(s.Height, 0)
		if w == 0 {
			w, h = 900, 360
		}
		if b := img.Bounds(); b.Dx() != w || b.Dy() != h {
			t.Errorf("%s: size %v", name, b)
		}
	}
	if err := good.WritePNG(failWriter{}); err == nil || errors.Is(err, ErrBadSpectrogram) {
		t.Errorf("write error not returned: %v", err)
	}
}

// cieL is CIE 1976 L* of an sRGB colour: sRGB decoding as in IEC
// 61966-2-1, relative luminance with the Rec. 709 / sRGB primaries (D65),
// then L* = 116 (Y)^(1/3) - 16 (or 903.3 Y in the dark).
func cieL(c color.RGBA) float64 {
	lin := func(v uint8) float64 {
		x := float64(v) / 255
		if x <= 0.04045 {
			return x / 12.92
		}
		return math.Pow((x+0.055)/1.055, 2.4)
	}
	y := 0.2126*lin(c.R) + 0.7152*lin(c.G) + 0.0722*lin(c.B)
	if y > 216.0/24389 {
		return 116*math.Cbrt(y) - 16
	}
	return 24389.0 / 27 * y
}

func TestSpectrogramColourMapIsPerceptuallyOrdered(t *testing.T) {
	prev := -1.0
	for i, c := range specLUT {
		l := cieL(c)
		if l <= prev {
			t.Errorf("level %d: L* %.2f, not above %.2f", i, l, prev)
		}
		// Even: no level more than 0.6 L* from the one before.
		if i > 0 && l-prev > 0.6 {
			t.Errorf("level %d: L* step %.2f", i, l-prev)
		}
		prev = l
	}
	if lo, hi := cieL(specLUT[0]), cieL(specLUT[255]); lo > 6 || hi < 94 {
		t.Errorf("L* range %.1f to %.1f, want about 5 to 95", lo, hi)
	}
	for i, want := range []float64{4.7, 23.0, 40.8, 59.2, 77.2, 95.3} {
		p := specPeat[i]
		if got := cieL(color.RGBA{uint8(p.r), uint8(p.g), uint8(p.b), 255}); math.Abs(got-want) > 0.05 {
			t.Errorf("control point %d: L* %.2f, documented %.1f", i, got, want)
		}
	}
}

func TestSpectrogramFont(t *testing.T) {
	seen := map[[7]uint8]rune{}
	for r, g := range specFont {
		if other, ok := seen[g]; ok {
			t.Errorf("%q and %q look the same", r, other)
		}
		seen[g] = r
		for _, row := range g {
			if row >= 1<<5 {
				t.Errorf("%q is wider than 5 pixels", r)
			}
		}
	}
	for _, r := range "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZdksz .-?" {
		if _, ok := specFont[r]; !ok {
			t.Errorf("no glyph for %q", r)
		}
	}
	if specFont['8'] != [7]uint8{0b01110, 0b10001, 0b10001, 0b01110, 0b10001, 0b10001, 0b01110} {
		t.Errorf("'8' is %05b", specFont['8'])
	}
}

func BenchmarkSpectrogram(b *testing.B) {
	const rate = 16000
	r := rand.New(rand.NewPCG(5, 6))
	samples := make([]int16, 20*rate)
	for i := range samples {
		tt := float64(i) / rate
		v := 3000*math.Sin(2*math.Pi*50*tt) + 1500*math.Sin(2*math.Pi*612*tt) + 800*r.NormFloat64()
		samples[i] = int16(v)
	}
	s := Spectrogram{Rate: rate, Samples: samples, EventAt: 12 * time.Second,
		Marks: []BandMark{{LowHz: 550, HighHz: 700, Label: "band 7"}}}
	var buf bytes.Buffer
	b.ReportAllocs()
	for b.Loop() {
		buf.Reset()
		if err := s.WritePNG(&buf); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Milliseconds())/float64(b.N), "ms/op")
	b.ReportMetric(float64(buf.Len()), "png-bytes")
}
