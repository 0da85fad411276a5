package audio

import (
	"errors"
	"fmt"
	"io"
	"math"
)

// Resampler filter design. The anti-aliasing lowpass runs at the common
// upsampled rate in*up = out*down. Its passband ends at
// ResamplePassband times the lower of the two Nyquist frequencies and its
// stopband starts exactly at that Nyquist frequency, so nothing above the
// new Nyquist frequency can alias into the output with more than
// -ResampleStopbandDB of gain. The -6 dB cutoff lies midway.
const (
	// ResampleStopbandDB is the designed stopband attenuation in dB.
	ResampleStopbandDB = 80.0
	// ResamplePassband is the passband edge as a fraction of the lower
	// Nyquist frequency min(in, out)/2.
	ResamplePassband = 0.96
	// MaxResampleTaps is the largest polyphase filter table (coefficients
	// over all phases) NewResampler builds; at 4 bytes each this is 8 MiB.
	MaxResampleTaps = 1 << 21
)

// resampleChunk is how many input samples one refill reads at most.
const resampleChunk = 1024

// Arbitrary-ratio path. When the exact table would need more than
// maxExactPhases phases (up, the reduced output rate) or more than
// MaxResampleTaps coefficients, as for 11127 Hz to 16000 Hz (up = 16000),
// the resampler instead samples the same continuous windowed-sinc
// prototype at resamplePhases points per input sample and interpolates
// linearly between adjacent phases. With 256 phases the interpolation
// error lies near -100 dB re signal (linear interpolation of an L-times
// oversampled lowpass leaks its first image at about (1/(2L))^2, from
// memory), below int16 rounding.
const (
	resamplePhases = 256
	maxExactPhases = 1024
)

// resampler is a streaming polyphase windowed-sinc resampler.
//
// Output sample n lies at input time t_n = n*in/out (in input samples).
// With x the input, zeros before index 0 and after the last sample, and g
// the continuous prototype (a Kaiser-windowed sinc centred on 0), output
// sample n is
//
//	y[n] = sum_k x[k] * g(t_n - k)
//
// so the filter's group delay is compensated and output aligns with input.
// The output length is ceil(inLen*out/in). Both rules match
// scipy.signal.resample_poly with padtype="constant" (zero padding).
//
// g is tabulated at L points per input sample as the N-tap filter h (N
// odd, c = (N-1)/2) designed at rate in*L: g(t) = L*h[c + t*L]. Let
// P_n = c + t_n*L = c + n*in*L/out, split as P_n = L*kmax + phase + rem/up
// with 0 <= phase < L and 0 <= rem < up (up/down the reduced ratio
// out/in). Then the taps for x[kmax-j] sit at h[phase + j*L] (+ rem/up).
//
// Exact path: L = up, so in*L/out = down is an integer, rem stays 0 and
// y[n] = sum_k x[k] * up*h[c + n*down - k*up], the rational polyphase
// resampler. Interpolating path (interp): L = resamplePhases, rem/up is
// the fraction between phase and phase+1, and the coefficient is
// interpolated linearly between those two rows. P_n is advanced by the
// integer step in*L/out as quotient and remainder modulo up, so the
// output times carry no rounding error however long the stream.
type resampler struct {
	src      Source
	outRate  int
	up, down int // reduced ratio out/in
	nph      int // phases L per input sample
	stepInt  int // floor(down*L/up)
	stepRem  int // down*L mod up
	interp   bool
	invUp    float32
	taps     int       // taps per phase T
	table    []float32 // row p at table[p*T:(p+1)*T], time-reversed; L+1 rows if interp
	hist     []float32 // hist[i] is x[base+i]; cap T+resampleChunk
	base     int64
	scratch  []int16
	phase    int   // floor(P_n) mod L for the next output n
	rem      int   // up*frac(P_n) for the next output n (interp only)
	kmax     int64 // floor(P_n / L) for the next output n
	produced int64
	inLen    int64 // input samples read so far
	eof      bool
	total    int64 // output length, valid once eof
	err      error
}

// NewResampler returns a Source that delivers src resampled to outRate Hz
// (1..MaxSampleRate) with an anti-aliasing Kaiser-window polyphase filter
// of ResampleStopbandDB stopband attenuation (see resampler for the exact
// alignment and length rules). Any pair of rates whose downsampling
// factor keeps the filter table within MaxResampleTaps works, for example
// every input rate 8000..192000 Hz to every output rate 8000..48000 Hz;
// common rate pairs use an exact rational polyphase filter, others a
// 256-phase table with linear interpolation between phases. Output is
// rounded half up and clipped to int16. If src already runs at outRate,
// src itself is returned. The filter table is built once here; Read does
// not allocate.
func NewResampler(src Source, outRate int) (Source, error) {
	in := src.Rate()
	if in < 1 || in > MaxSampleRate {
		return nil, fmt.Errorf("%w: resampler input rate %d Hz, want 1..%d", ErrSampleRate, in, MaxSampleRate)
	}
	if outRate < 1 || outRate > MaxSampleRate {
		return nil, fmt.Errorf("%w: resampler output rate %d Hz, want 1..%d", ErrSampleRate, outRate, MaxSampleRate)
	}
	if in == outRate {
		return src, nil
	}
	return newResampler(src, outRate, resampleDesign(in, outRate))
}

// newResampler builds the resampler for design d (tests use it to force
// the interpolating path on a rate pair that would use the exact one).
func newResampler(src Source, outRate int, d filterDesign) (Source, error) {
	in := src.Rate()
	if d.tableSize() > MaxResampleTaps {
		return nil, fmt.Errorf("%w: %d Hz to %d Hz needs a %d-tap filter (%d taps per input sample over %d phases), limit %d coefficients",
			ErrResampleRatio, in, outRate, d.taps, d.tapsPerPhase(), d.rows(), MaxResampleTaps)
	}
	h := kaiserLowpass(d.taps, d.cutoff, d.beta)
	L := d.phases
	T := d.tapsPerPhase()
	table := make([]float32, d.rows()*T)
	for p := 0; p < d.rows(); p++ {
		for j := 0; p+j*L < d.taps; j++ {
			table[p*T+T-1-j] = float32(h[p+j*L] * float64(L))
		}
	}
	c := int64(d.taps-1) / 2
	step := int64(d.down) * int64(L)
	r := &resampler{
		src:     src,
		outRate: outRate,
		up:      d.up,
		down:    d.down,
		nph:     L,
		stepInt: int(step / int64(d.up)),
		stepRem: int(step % int64(d.up)),
		interp:  d.interp,
		invUp:   float32(1 / float64(d.up)),
		taps:    T,
		table:   table,
		hist:    make([]float32, 0, T+resampleChunk),
		scratch: make([]int16, resampleChunk),
		phase:   int(c % int64(L)),
		kmax:    c / int64(L),
	}
	// Zeros stand for x[k], k < 0, from the first window's start.
	r.base = r.kmax - int64(T) + 1
	r.hist = r.hist[:-r.base]
	return r, nil
}

// filterDesign is the lowpass the resampler uses for one rate pair.
type filterDesign struct {
	up, down int     // reduced ratio out/in
	phases   int     // L: phases per input sample (up, or resamplePhases if interp)
	interp   bool    // interpolate between phases (arbitrary-ratio path)
	taps     int     // odd filter length N at the rate in*phases
	beta     float64 // Kaiser shape parameter
	cutoff   float64 // -6 dB frequency as a fraction of the in*phases Nyquist
	width    float64 // transition width as a fraction of the in*phases Nyquist
}

// tapsPerPhase returns T, the taps per phase (per input sample).
func (d filterDesign) tapsPerPhase() int { return (d.taps + d.phases - 1) / d.phases }

// rows returns the number of table rows: the phases, plus one copy of
// phase 0 shifted by one input sample when interpolating.
func (d filterDesign) rows() int {
	if d.interp {
		return d.phases + 1
	}
	return d.phases
}

// tableSize returns the number of coefficients in the filter table.
func (d filterDesign) tableSize() int64 { return int64(d.rows()) * int64(d.tapsPerPhase()) }

// resampleDesign computes the filter for resampling in Hz to out Hz: the
// exact rational design when it has at most maxExactPhases phases and
// fits MaxResampleTaps, else the interpolating design.
func resampleDesign(in, out int) filterDesign {
	g := gcd(in, out)
	up, down := out/g, in/g
	if up <= maxExactPhases {
		if d := designAt(in, out, up, down, up, false); d.tableSize() <= MaxResampleTaps {
			return d
		}
	}
	return designAt(in, out, up, down, resamplePhases, true)
}

// designAt designs the lowpass at rate in*phases.
func designAt(in, out, up, down, phases int, interp bool) filterDesign {
	d := filterDesign{up: up, down: down, phases: phases, interp: interp}
	nyq := float64(in) * float64(phases) / 2
	stop := float64(min(in, out)) / 2
	pass := ResamplePassband * stop
	d.cutoff = (pass + stop) / 2 / nyq
	d.width = (stop - pass) / nyq
	d.beta = kaiserBeta(ResampleStopbandDB)
	d.taps = kaiserLength(ResampleStopbandDB, d.width)
	return d
}

// gcd returns the greatest common divisor of two positive integers.
func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

// Rate returns the output sample rate in Hz.
func (r *resampler) Rate() int { return r.outRate }

// Read fills p with resampled samples. It returns io.EOF after the last of
// ceil(inLen*out/in) samples; an error from the source is returned after
// the samples already computed. Read does not allocate.
func (r *resampler) Read(p []int16) (int, error) {
	if r.err != nil {
		return 0, r.err
	}
	T := int64(r.taps)
	out := 0
	for out < len(p) {
		if r.eof && r.produced >= r.total {
			break
		}
		if r.kmax-r.base >= int64(len(r.hist)) {
			if err := r.fill(); err != nil {
				r.err = err
				break
			}
			continue
		}
		lo := r.kmax - T + 1 - r.base
		x := r.hist[lo : lo+T]
		row := r.table[r.phase*r.taps:]
		if r.interp {
			a, b := dot2(row[:r.taps], row[r.taps:2*r.taps], x)
			p[out] = floatToSample(a + float32(r.rem)*r.invUp*(b-a))
		} else {
			p[out] = floatToSample(dot(row[:r.taps], x))
		}
		out++
		r.produced++
		r.phase += r.stepInt
		r.rem += r.stepRem
		if r.rem >= r.up {
			r.rem -= r.up
			r.phase++
		}
		r.kmax += int64(r.phase / r.nph)
		r.phase %= r.nph
	}
	if out > 0 {
		return out, nil
	}
	if r.err != nil {
		return 0, r.err
	}
	if len(p) == 0 {
		return 0, nil
	}
	return 0, io.EOF
}

// fill drops input no longer needed and appends input (or, after the end of
// the source, zeros) until the window for the next output is available.
func (r *resampler) fill() error {
	T := int64(r.taps)
	if start := r.kmax - T + 1 - r.base; start > 0 {
		start = min(start, int64(len(r.hist)))
		n := copy(r.hist, r.hist[start:])
		r.hist = r.hist[:n]
		r.base += start
	}
	if r.eof {
		need := int(r.kmax - r.base + 1 - int64(len(r.hist)))
		for range need {
			r.hist = append(r.hist, 0)
		}
		return nil
	}
	for tries := 0; ; tries++ {
		m := min(cap(r.hist)-len(r.hist), len(r.scratch))
		k, err := r.src.Read(r.scratch[:m])
		for _, s := range r.scratch[:k] {
			r.hist = append(r.hist, float32(s))
		}
		r.inLen += int64(k)
		if errors.Is(err, io.EOF) {
			r.eof = true
			r.total = (r.inLen*int64(r.up) + int64(r.down) - 1) / int64(r.down)
			return nil
		}
		if err != nil {
			return err
		}
		if k > 0 {
			return nil
		}
		if tries >= 100 {
			return fmt.Errorf("audio: resampler source: %w", io.ErrNoProgress)
		}
	}
}

// dot2 returns the inner products of a and b with x[:len(a)], in one pass
// over x; b must be as long as a.
func dot2(a, b, x []float32) (float32, float32) {
	b = b[:len(a)]
	x = x[:len(a)]
	var s0, s1, t0, t1 float32
	i := 0
	for ; i+2 <= len(a); i += 2 {
		s0 += a[i] * x[i]
		t0 += b[i] * x[i]
		s1 += a[i+1] * x[i+1]
		t1 += b[i+1] * x[i+1]
	}
	for ; i < len(a); i++ {
		s0 += a[i] * x[i]
		t0 += b[i] * x[i]
	}
	return s0 + s1, t0 + t1
}

// dot returns the inner product of a and b[:len(a)].
func dot(a, b []float32) float32 {
	b = b[:len(a)]
	var s0, s1, s2, s3 float32
	i := 0
	for ; i+4 <= len(a); i += 4 {
		s0 += a[i] * b[i]
		s1 += a[i+1] * b[i+1]
		s2 += a[i+2] * b[i+2]
		s3 += a[i+3] * b[i+3]
	}
	for ; i < len(a); i++ {
		s0 += a[i] * b[i]
	}
	return (s0 + s1) + (s2 + s3)
}

// floatToSample rounds y half up and clips it to int16.
func floatToSample(y float32) int16 {
	v := math.Floor(float64(y) + 0.5)
	switch {
	case v >= math.MaxInt16:
		return math.MaxInt16
	case v <= math.MinInt16:
		return math.MinInt16
	case v != v:
		return 0
	}
	return int16(v)
}
