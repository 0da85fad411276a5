package site

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"gonum.org/v1/gonum/dsp/fourier"
)

// ErrBadSpectrogram is returned (wrapped) by Spectrogram.WritePNG when the
// clip or the drawing cannot be rendered: no samples, a sample rate that is
// not positive, a size out of range, a frequency axis above the Nyquist
// frequency, a band mark that is not a band.
var ErrBadSpectrogram = errors.New("site: invalid spectrogram")

// Spectrogram renders a clip as a PNG image: time across (seconds from the
// clip's first sample), frequency up, power as colour.
//
// The short-time Fourier transform uses a periodic Hann window
// (w[n] = 0.5 - 0.5 cos(2πn/N)) of N = 1024 samples, one frame for each
// pixel column, so the hop is about len(Samples)/plot width samples. Each
// column shows the frame centred on its time; at the ends of the clip the
// frame is kept inside it (and a clip shorter than N samples is padded with
// zeros). When a column spans more than N samples (a clip longer than about
// a minute at 16 kHz), it shows the mean power of enough frames to cover
// its span, so no part of the clip is skipped. Power is in dB relative to a full-scale sine (a sine of amplitude
// 32768 centred on a bin reads 0 dB), floored at -110 dBFS, and coloured on
// a fixed scale from -110 dBFS (darkest) to 0 dBFS (lightest), so clips
// can be compared by eye.
//
// The frequency axis is log-like: height is proportional to ln(1 + f/100 Hz),
// nearly linear below 100 Hz and logarithmic above, which gives the 25 to
// 1200 Hz lines of a pump about half of the height at a 16 kHz rate. A
// pixel row spanning several FFT bins shows the strongest of them, so a
// narrow line at high frequency is not averaged away; a row narrower than
// a bin interpolates between the two nearest.
//
// The colour map ("peat") runs from a near-black ink blue through slate
// blue, teal, moss green and straw to cream, with CIE L* rising evenly
// from about 5 to 95; see specPeat.
type Spectrogram struct {
	// Rate is the sample rate in Hz; it must be positive.
	Rate int
	// Samples is the mono clip, 16-bit signed (full scale 32768); it must
	// not be empty.
	Samples []int16
	// Marks are frequency bands to mark, such as the alarm's most
	// deviating bands: each is drawn as a translucent horizontal stripe
	// with a bracket on the right edge.
	Marks []BandMark
	// EventAt is the offset into the clip of the alarm raise, drawn as a
	// vertical dashed line with a marker above the plot; negative (or past
	// the end of the clip) draws none. Note that zero, the field's zero
	// value, marks the clip's first sample.
	EventAt time.Duration
	// Width and Height are the size of the whole image in pixels; zero
	// means 900 and 360. Each must be 0 or from 200 x 120 to 8192 x 8192.
	Width, Height int
	// MaxHz is the top of the frequency axis in Hz; zero means Rate/2. It
	// must not be above Rate/2.
	MaxHz float64
}

// BandMark is one frequency band to mark on a Spectrogram.
type BandMark struct {
	// LowHz and HighHz bound the band in Hz, 0 <= LowHz < HighHz. The part
	// above the frequency axis is not drawn.
	LowHz, HighHz float64
	// Label is drawn beside the bracket, in capitals of the image's own
	// 5 x 7 pixel font (characters it lacks show as '?'), cut to 24
	// characters.
	Label string
}

// Spectrogram parameters and layout, in samples, dB, Hz and pixels.
const (
	specN             = 1024
	specFloorDB       = -110.0
	specTopDB         = 0.0
	specCornerHz      = 100.0
	specDefaultWidth  = 900
	specDefaultHeight = 360
	specMinWidth      = 200
	specMinHeight     = 120
	specMaxSide       = 8192
	specMaxLabel      = 24
	specFullScale     = 32768.0
)

// Colours of the decorations.
var (
	specPaper    = color.RGBA{255, 255, 255, 255}
	specInk      = color.RGBA{51, 51, 51, 255}
	specBand     = color.RGBA{236, 44, 150, 255} // stripes and brackets: magenta, off the map's hues
	specEvent    = color.RGBA{163, 18, 58, 255}  // the alarm marker, as on the trend chart
	specDashDark = color.RGBA{0, 0, 0, 255}
	specDashLite = color.RGBA{255, 255, 255, 255}
)

// specPeat is the colour map's control points: position 0 to 1 and sRGB.
// The colours were chosen so that CIE L* (sRGB companding of IEC
// 61966-2-1, D65) is 4.7, 23.0, 40.8, 59.2, 77.2 and 95.3 at the six
// points: even steps, so equal steps in dB look equally far apart.
var specPeat = [...]struct {
	at      float64
	r, g, b float64
}{
	{0.0, 12, 16, 26},
	{0.2, 26, 56, 91},
	{0.4, 35, 106, 109},
	{0.6, 114, 154, 77},
	{0.8, 216, 190, 75},
	{1.0, 246, 242, 222},
}

// specLUT is the colour map sampled at 256 levels, index 0 at the floor.
var specLUT = func() (lut [256]color.RGBA) {
	for i := range lut {
		t := float64(i) / 255
		j := 0
		for j < len(specPeat)-2 && t > specPeat[j+1].at {
			j++
		}
		a, b := specPeat[j], specPeat[j+1]
		f := (t - a.at) / (b.at - a.at)
		lut[i] = color.RGBA{
			uint8(math.Round(a.r + (b.r-a.r)*f)),
			uint8(math.Round(a.g + (b.g-a.g)*f)),
			uint8(math.Round(a.b + (b.b-a.b)*f)), 255}
	}
	return lut
}()

// specWarp maps a frequency in Hz to the frequency axis' coordinate.
func specWarp(f float64) float64 { return math.Log1p(f / specCornerHz) }

// specLayout is the geometry of one spectrogram.
type specLayout struct {
	w, h, scale    int
	x0, x1, y0, y1 int // the plot is [x0, x1) x [y0, y1)
	maxHz, uMax    float64
	dur            float64 // seconds
}

// yOfHz is the y coordinate (continuous, y0 at the top edge of the plot,
// y1 at the bottom edge) of frequency f in Hz.
func (l *specLayout) yOfHz(f float64) float64 {
	return float64(l.y0) + (1-specWarp(f)/l.uMax)*float64(l.y1-l.y0)
}

// hzOfY inverts yOfHz.
func (l *specLayout) hzOfY(y float64) float64 {
	u := (1 - (y-float64(l.y0))/float64(l.y1-l.y0)) * l.uMax
	return specCornerHz * math.Expm1(u)
}

// xOfTime is the x coordinate (continuous) of t seconds into the clip.
func (l *specLayout) xOfTime(t float64) float64 {
	return float64(l.x0) + t/l.dur*float64(l.x1-l.x0)
}

// layout checks the description and places the plot.
func (s *Spectrogram) layout() (*specLayout, error) {
	if s.Rate <= 0 {
		return nil, fmt.Errorf("%w: sample rate %d Hz", ErrBadSpectrogram, s.Rate)
	}
	if len(s.Samples) == 0 {
		return nil, fmt.Errorf("%w: no samples", ErrBadSpectrogram)
	}
	w, h := s.Width, s.Height
	if w == 0 {
		w = specDefaultWidth
	}
	if h == 0 {
		h = specDefaultHeight
	}
	if w < specMinWidth || h < specMinHeight || w > specMaxSide || h > specMaxSide {
		return nil, fmt.Errorf("%w: size %d x %d, want 0 or %d x %d to %d x %d", ErrBadSpectrogram,
			s.Width, s.Height, specMinWidth, specMinHeight, specMaxSide, specMaxSide)
	}
	nyq := float64(s.Rate) / 2
	maxHz := s.MaxHz
	if maxHz == 0 {
		maxHz = nyq
	}
	if !(maxHz > 0 && maxHz <= nyq) {
		return nil, fmt.Errorf("%w: MaxHz %v, want 0 or up to %v Hz", ErrBadSpectrogram, s.MaxHz, nyq)
	}
	for i, m := range s.Marks {
		if !(m.LowHz >= 0 && m.LowHz < m.HighHz && !math.IsInf(m.HighHz, 0)) {
			return nil, fmt.Errorf("%w: band mark %d: %v to %v Hz", ErrBadSpectrogram, i, m.LowHz, m.HighHz)
		}
	}
	sc := 1
	if h >= 600 && w >= 1200 {
		sc = 2
	}
	l := &specLayout{w: w, h: h, scale: sc,
		x0: 30 * sc, x1: w - 50*sc, y0: 14 * sc, y1: h - 14*sc,
		maxHz: maxHz, uMax: specWarp(maxHz), dur: float64(len(s.Samples)) / float64(s.Rate)}
	return l, nil
}

// specRow says how one pixel row reads the spectrum: the strongest bin of
// k0..k1, or, when k1 < k0, the power interpolated at bin position k0+frac.
type specRow struct {
	k0, k1 int32
	frac   float32
}

// rows maps the plot's pixel rows, top first, to FFT bins.
func (l *specLayout) rows(rate int) []specRow {
	ph := l.y1 - l.y0
	df := float64(rate) / specN
	last := specN / 2
	out := make([]specRow, ph)
	for r := range out {
		y := float64(l.y0 + r)
		fHi, fLo := l.hzOfY(y), l.hzOfY(y+1)
		k0 := int(math.Ceil(fLo / df))
		k1 := min(int(math.Ceil(fHi/df))-1, last)
		if r == 0 && l.maxHz >= float64(rate)/2 { // the top row includes the Nyquist bin
			k1 = last
		}
		if k1 >= k0 {
			out[r] = specRow{k0: int32(k0), k1: int32(k1)}
			continue
		}
		pos := (fLo + fHi) / 2 / df
		k := min(int(pos), last-1)
		out[r] = specRow{k0: int32(k), k1: int32(k - 1), frac: float32(min(pos-float64(k), 1))}
	}
	return out
}

// WritePNG renders the spectrogram, with its axes, band marks, event
// marker and colour bar, and writes it to w as a PNG image. It returns an
// error wrapping ErrBadSpectrogram for an invalid description (nothing is
// written then), or the error from encoding or from w.
func (s Spectrogram) WritePNG(w io.Writer) error {
	img, _, err := s.render()
	if err != nil {
		return err
	}
	enc := png.Encoder{CompressionLevel: png.BestSpeed}
	return enc.Encode(w, img)
}

// render draws the image.
func (s *Spectrogram) render() (*image.RGBA, *specLayout, error) {
	l, err := s.layout()
	if err != nil {
		return nil, nil, err
	}
	img := image.NewRGBA(image.Rect(0, 0, l.w, l.h))
	for i := 0; i < len(img.Pix); i += 4 {
		img.Pix[i], img.Pix[i+1], img.Pix[i+2], img.Pix[i+3] = specPaper.R, specPaper.G, specPaper.B, 255
	}
	s.drawSpectrum(img, l)
	s.drawMarks(img, l)
	s.drawAxes(img, l)
	return img, l, nil
}

// drawSpectrum fills the plot, one FFT frame per pixel column.
func (s *Spectrogram) drawSpectrum(img *image.RGBA, l *specLayout) {
	var win [specN]float64
	for n := range win {
		win[n] = 0.5 - 0.5*math.Cos(2*math.Pi*float64(n)/specN)
	}
	// A sine of amplitude A centred on bin k gives |X_k| = A * sum(w)/2 =
	// A*N/4 with this window; dividing by that for A = 32768 puts such a
	// full-scale sine at 0 dB.
	ref := specFullScale * specN / 4
	invRef2 := 1 / (ref * ref)
	floorP := math.Pow(10, specFloorDB/10)
	levels := 255 / (specTopDB - specFloorDB)

	rows := l.rows(s.Rate)
	fft := fourier.NewFFT(specN)
	frame := make([]float64, specN)
	coef := make([]complex128, specN/2+1)
	rowP := make([]float64, len(rows)) // mean power of the column's frames
	col := make([]uint8, len(rows))
	pw := l.x1 - l.x0
	n := len(s.Samples)
	span := float64(n) / float64(pw) // samples per column
	frames := max(1, int(math.Ceil(span/specN)))
	prev := -1
	for x := 0; x < pw; x++ {
		// The frames' starts: one frame centred on the column, or, when a
		// column spans more than N samples, enough frames to cover it.
		first := (float64(x)+0.5)*span - specN/2
		stride := 0.0
		if frames > 1 {
			first = float64(x) * span
			stride = (span - specN) / float64(frames-1)
		}
		start0 := max(0, min(int(math.Round(first)), n-specN))
		if frames == 1 && start0 == prev {
			s.paintColumn(img, l, x, col)
			continue
		}
		prev = start0
		clear(rowP)
		for f := 0; f < frames; f++ {
			start := max(0, min(int(math.Round(first+float64(f)*stride)), n-specN))
			for i := range frame {
				if j := start + i; j < n {
					frame[i] = float64(s.Samples[j]) * win[i]
				} else {
					frame[i] = 0
				}
			}
			fft.Coefficients(coef, frame)
			for r, m := range rows {
				var p float64
				if m.k1 >= m.k0 {
					for k := m.k0; k <= m.k1; k++ {
						c := coef[k]
						p = max(p, real(c)*real(c)+imag(c)*imag(c))
					}
				} else {
					a, b := coef[m.k0], coef[m.k0+1]
					pa := real(a)*real(a) + imag(a)*imag(a)
					pb := real(b)*real(b) + imag(b)*imag(b)
					p = pa + (pb-pa)*float64(m.frac)
				}
				rowP[r] += p
			}
		}
		scale := invRef2 / float64(frames)
		for r, p := range rowP {
			p *= scale
			if p <= floorP {
				col[r] = 0
				continue
			}
			v := (10*math.Log10(p) - specFloorDB) * levels
			col[r] = uint8(min(v+0.5, 255))
		}
		s.paintColumn(img, l, x, col)
	}
}

// paintColumn colours plot column x from the colour levels in col, top
// row first.
func (s *Spectrogram) paintColumn(img *image.RGBA, l *specLayout, x int, col []uint8) {
	for r, v := range col {
		c := specLUT[v]
		o := img.PixOffset(l.x0+x, l.y0+r)
		img.Pix[o], img.Pix[o+1], img.Pix[o+2] = c.R, c.G, c.B
	}
}

// drawMarks draws the band stripes with their brackets and labels, and the
// event line.
func (s *Spectrogram) drawMarks(img *image.RGBA, l *specLayout) {
	sc := l.scale
	for _, m := range s.Marks {
		if m.LowHz >= l.maxHz {
			continue
		}
		yt := int(math.Floor(l.yOfHz(min(m.HighHz, l.maxHz))))
		yb := int(math.Ceil(l.yOfHz(m.LowHz)))
		yt = max(yt, l.y0)
		yb = min(max(yb, yt+1), l.y1)
		for y := yt; y < yb; y++ {
			a := 0.30
			if y == yt || y == yb-1 {
				a = 0.85 // crisp edges, so a thin band still shows
			}
			for x := l.x0; x < l.x1; x++ {
				specBlend(img, x, y, specBand, a)
			}
		}
		// The bracket: a vertical bar right of the plot with serifs
		// reaching back to it.
		bx := l.x1 + 5*sc
		specFill(img, bx, yt, bx+2*sc, yb, specBand)
		specFill(img, l.x1+1, yt, bx, yt+sc, specBand)
		specFill(img, l.x1+1, yb-sc, bx, yb, specBand)
		if label := specCut(strings.ToUpper(m.Label), specMaxLabel); label != "" {
			tw := specTextWidth(label, sc)
			tx := max(l.x1-4*sc-tw, l.x0+2)
			th := 7 * sc
			ty := (yt+yb)/2 - th/2
			if yb-yt < th+2*sc { // too thin: above the stripe, or below near the top
				ty = yt - th - 2*sc
				if ty < l.y0+1 {
					ty = yb + 2*sc
				}
			}
			specOutlinedText(img, tx, ty, label, sc)
		}
	}
	if s.EventAt >= 0 && s.EventAt.Seconds() <= l.dur {
		x := int(l.xOfTime(s.EventAt.Seconds()))
		x = min(x, l.x1-sc)
		dash := 4 * sc
		for y := l.y0; y < l.y1; y++ {
			c := specDashLite // white dashes with black gaps: seen on any colour
			if (y-l.y0)%(2*dash) >= dash {
				c = specDashDark
			}
			specFill(img, x, y, x+sc, y+1, c)
		}
		// A down-pointing triangle above the plot.
		for i := 0; i < 5*sc; i++ {
			y := l.y0 - 2*sc - i
			specFill(img, x-i, y, x+sc+i, y+1, specEvent)
		}
	}
}

// drawAxes draws the frequency and time ticks with their labels, and the
// colour bar.
func (s *Spectrogram) drawAxes(img *image.RGBA, l *specLayout) {
	sc := l.scale
	// Frequency: fixed candidates, each drawn if it is clear of the last.
	lastY := math.Inf(1)
	for _, f := range []float64{0, 20, 50, 100, 200, 500, 1000, 2000, 5000, 10000, 20000, 50000, 100000} {
		if f > l.maxHz {
			break
		}
		y := int(math.Min(l.yOfHz(f), float64(l.y1-1)))
		if lastY-float64(y) < float64(10*sc) {
			continue
		}
		lastY = float64(y)
		specFill(img, l.x0-3*sc, y, l.x0, y+sc, specInk)
		label := strconv.Itoa(int(f))
		if f >= 1000 {
			label = strconv.Itoa(int(f/1000)) + "k"
		}
		specText(img, l.x0-5*sc-specTextWidth(label, sc), y-3*sc, label, sc, specInk)
	}
	specText(img, l.x0-5*sc-specTextWidth("Hz", sc), l.y0-12*sc, "Hz", sc, specInk)

	// Time: the smallest step that leaves 40 pixels between labels.
	pw := float64(l.x1 - l.x0)
	step := 3600.0
	for _, st := range []float64{0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1, 2, 5, 10, 15, 30, 60, 120, 300, 600, 1200, 1800, 3600} {
		if l.dur/st*float64(40*sc) <= pw {
			step = st
			break
		}
	}
	dec := max(0, int(math.Ceil(-math.Log10(step)-1e-9)))
	for k := 0; float64(k)*step <= l.dur+1e-9; k++ {
		t := float64(k) * step
		x := min(int(l.xOfTime(t)), l.x1-1)
		specFill(img, x, l.y1, x+sc, l.y1+3*sc, specInk)
		label := strconv.FormatFloat(t, 'f', dec, 64) + "s"
		tw := specTextWidth(label, sc)
		tx := min(max(x-tw/2, 0), l.w-tw)
		specText(img, tx, l.y1+5*sc, label, sc, specInk)
	}

	// Colour bar with dB labels.
	bx0, bx1 := l.x1+12*sc, l.x1+20*sc
	ph := float64(l.y1 - l.y0)
	for y := l.y0; y < l.y1; y++ {
		v := (1 - (float64(y-l.y0)+0.5)/ph) * 255
		specFill(img, bx0, y, bx1, y+1, specLUT[int(v+0.5)])
	}
	dbStep := 20.0
	if ph/((specTopDB-specFloorDB)/dbStep) < float64(10*sc) {
		dbStep = 50
	}
	for db := specTopDB; db >= specFloorDB; db -= dbStep {
		y := l.y0 + int((specTopDB-db)/(specTopDB-specFloorDB)*(ph-1))
		specFill(img, bx1, y, bx1+2*sc, y+sc, specInk)
		specText(img, bx1+5*sc, y-3*sc, strconv.Itoa(int(db)), sc, specInk)
	}
	specText(img, bx0-2*sc, l.y0-12*sc, "dBFS", sc, specInk)
}

// specFill paints the rectangle [x0, x1) x [y0, y1), clipped to the image.
func specFill(img *image.RGBA, x0, y0, x1, y1 int, c color.RGBA) {
	b := img.Rect
	x0, y0 = max(x0, b.Min.X), max(y0, b.Min.Y)
	x1, y1 = min(x1, b.Max.X), min(y1, b.Max.Y)
	for y := y0; y < y1; y++ {
		o := img.PixOffset(x0, y)
		for x := x0; x < x1; x, o = x+1, o+4 {
			img.Pix[o], img.Pix[o+1], img.Pix[o+2], img.Pix[o+3] = c.R, c.G, c.B, 255
		}
	}
}

// specBlend mixes colour c over the pixel at (x, y) with opacity a.
func specBlend(img *image.RGBA, x, y int, c color.RGBA, a float64) {
	o := img.PixOffset(x, y)
	p := img.Pix[o : o+3 : o+3]
	p[0] = uint8(float64(p[0])*(1-a) + float64(c.R)*a + 0.5)
	p[1] = uint8(float64(p[1])*(1-a) + float64(c.G)*a + 0.5)
	p[2] = uint8(float64(p[2])*(1-a) + float64(c.B)*a + 0.5)
}

// specCut shortens s to at most n runes.
func specCut(s string, n int) string {
	i := 0
	for j := range s {
		if i == n {
			return s[:j]
		}
		i++
	}
	return s
}

// specTextWidth is the width in pixels of s in the built-in font.
func specTextWidth(s string, sc int) int {
	n := 0
	for range s {
		n++
	}
	if n == 0 {
		return 0
	}
	return (6*n - 1) * sc
}

// specText draws s with its top-left corner at (x, y) in the built-in
// 5 x 7 font, each font pixel sc x sc image pixels. Characters the font
// lacks are drawn as '?'.
func specText(img *image.RGBA, x, y int, s string, sc int, c color.RGBA) {
	for _, r := range s {
		g, ok := specFont[r]
		if !ok {
			g = specFont['?']
		}
		for row, bits := range g {
			for col := 0; col < 5; col++ {
				if bits&(1<<(4-col)) != 0 {
					specFill(img, x+col*sc, y+row*sc, x+(col+1)*sc, y+(row+1)*sc, c)
				}
			}
		}
		x += 6 * sc
	}
}

// specOutlinedText draws s in white with a black outline, readable on any
// part of the colour map.
func specOutlinedText(img *image.RGBA, x, y int, s string, sc int) {
	for _, d := range [8][2]int{{-1, -1}, {0, -1}, {1, -1}, {-1, 0}, {1, 0}, {-1, 1}, {0, 1}, {1, 1}} {
		specText(img, x+d[0]*sc, y+d[1]*sc, s, sc, specDashDark)
	}
	specText(img, x, y, s, sc, specDashLite)
}

// specFont is the built-in 5 x 7 pixel font: digits, capitals, the few
// lower-case letters the axes use (d, k, s, z) and some punctuation. Each
// glyph is seven rows, top first, of five bits, the leftmost pixel in bit 4.
var specFont = func() map[rune][7]uint8 {
	src := map[rune]string{
		'0':  ".###. #...# #..## #.#.# ##..# #...# .###.",
		'1':  "..#.. .##.. ..#.. ..#.. ..#.. ..#.. .###.",
		'2':  ".###. #...# ....# ...#. ..#.. .#... #####",
		'3':  "##### ...#. ..#.. ...#. ....# #...# .###.",
		'4':  "...#. ..##. .#.#. #..#. ##### ...#. ...#.",
		'5':  "##### #.... ####. ....# ....# #...# .###.",
		'6':  "..##. .#... #.... ####. #...# #...# .###.",
		'7':  "##### ....# ...#. ..#.. .#... .#... .#...",
		'8':  ".###. #...# #...# .###. #...# #...# .###.",
		'9':  ".###. #...# #...# .#### ....# ...#. .##..",
		'A':  ".###. #...# #...# ##### #...# #...# #...#",
		'B':  "####. #...# #...# ####. #...# #...# ####.",
		'C':  ".###. #...# #.... #.... #.... #...# .###.",
		'D':  "###.. #..#. #...# #...# #...# #..#. ###..",
		'E':  "##### #.... #.... ####. #.... #.... #####",
		'F':  "##### #.... #.... ####. #.... #.... #....",
		'G':  ".###. #...# #.... #.### #...# #...# .####",
		'H':  "#...# #...# #...# ##### #...# #...# #...#",
		'I':  ".###. ..#.. ..#.. ..#.. ..#.. ..#.. .###.",
		'J':  "..### ...#. ...#. ...#. ...#. #..#. .##..",
		'K':  "#...# #..#. #.#.. ##... #.#.. #..#. #...#",
		'L':  "#.... #.... #.... #.... #.... #.... #####",
		'M':  "#...# ##.## #.#.# #.#.# #...# #...# #...#",
		'N':  "#...# #...# ##..# #.#.# #..## #...# #...#",
		'O':  ".###. #...# #...# #...# #...# #...# .###.",
		'P':  "####. #...# #...# ####. #.... #.... #....",
		'Q':  ".###. #...# #...# #...# #.#.# #..#. .##.#",
		'R':  "####. #...# #...# ####. #.#.. #..#. #...#",
		'S':  ".#### #.... #.... .###. ....# ....# ####.",
		'T':  "##### ..#.. ..#.. ..#.. ..#.. ..#.. ..#..",
		'U':  "#...# #...# #...# #...# #...# #...# .###.",
		'V':  "#...# #...# #...# #...# #...# .#.#. ..#..",
		'W':  "#...# #...# #...# #.#.# #.#.# #.#.# .#.#.",
		'X':  "#...# #...# .#.#. ..#.. .#.#. #...# #...#",
		'Y':  "#...# #...# .#.#. ..#.. ..#.. ..#.. ..#..",
		'Z':  "##### ....# ...#. ..#.. .#... #.... #####",
		'd':  "....# ....# .##.# #..## #...# #...# .####",
		'k':  "#.... #.... #..#. #.#.. ##... #.#.. #..#.",
		's':  "..... ..... .#### #.... .###. ....# ####.",
		'z':  "..... ..... ##### ...#. ..#.. .#... #####",
		' ':  "..... ..... ..... ..... ..... ..... .....",
		'.':  "..... ..... ..... ..... ..... .##.. .##..",
		',':  "..... ..... ..... ..... .##.. ..#.. .#...",
		'-':  "..... ..... ..... .###. ..... ..... .....",
		'+':  "..... ..#.. ..#.. ##### ..#.. ..#.. .....",
		':':  "..... .##.. .##.. ..... .##.. .##.. .....",
		'/':  "..... ....# ...#. ..#.. .#... #.... .....",
		'%':  "##... ##..# ...#. ..#.. .#... #..## ...##",
		'#':  ".#.#. .#.#. ##### .#.#. ##### .#.#. .#.#.",
		'(':  "...#. ..#.. .#... .#... .#... ..#.. ...#.",
		')':  ".#... ..#.. ...#. ...#. ...#. ..#.. .#...",
		'?':  ".###. #...# ....# ...#. ..#.. ..... ..#..",
		'_':  "..... ..... ..... ..... ..... ..... #####",
		'=':  "..... ..... ##### ..... ##### ..... .....",
		'\'': "..#.. ..#.. .#... ..... ..... ..... .....",
	}
	out := make(map[rune][7]uint8, len(src))
	for r, g := range src {
		var rows [7]uint8
		for i, row := range strings.Fields(g) {
			for _, ch := range row {
				rows[i] <<= 1
				if ch == '#' {
					rows[i] |= 1
				}
			}
		}
		out[r] = rows
	}
	return out
}()
