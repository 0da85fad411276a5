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

// resampler is a streaming polyphase windowed-sinc rational resampler.
//
// With up/down the reduced ratio out/in, h the N-tap filter (N odd,
// c = (N-1)/2) and x the input with zeros before index 0 and after the
// last sample, output sample n is
//
//	y[n] = sum_k x[k] * h[c + n*down - k*up]
//
// which places output n at input time n*in/out with the filter centred on
// it: the filter's group delay is compensated, so output aligns with
// input. The output length is ceil(inLen*up/down). Both rules match
// scipy.signal.resample_poly with padtype="constant" (zero padding).
type resampler struct {
	src      Source
	outRate  int
	up, down int
	taps     int       // taps per phase T
	table    []float32 // phase p at table[p*T:(p+1)*T], time-reversed
	hist     []float32 // hist[i] is x[base+i]; cap T+resampleChunk
	base     int64
	scratch  []int16
	phase    int   // (c + n*down) mod up for the next output n
	kmax     int64 // floor((c + n*down) / up) for the next output n
	produced int64
	inLen    int64 // input samples read so far
	eof      bool
	total    int64 // output length, valid once eof
	err      error
}

// NewResampler returns a Source that delivers src resampled to outRate Hz
// (1..MaxSampleRate) with an anti-aliasing Kaiser-window polyphase filter
// of ResampleStopbandDB stopband attenuation (see resampler for the exact
// alignment and length rules). Output is rounded half up and clipped to
// int16. If src already runs at outRate, src itself is returned. The
// filter table is built once here; Read does not allocate.
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
	d := resampleDesign(in, outRate)
	if int64(d.up)*int64((d.taps+d.up-1)/d.up) > MaxResampleTaps {
		return nil, fmt.Errorf("%w: %d Hz to %d Hz (ratio %d/%d) needs a %d-tap filter, limit %d",
			ErrResampleRatio, in, outRate, d.up, d.down, d.taps, MaxResampleTaps)
	}
	h := kaiserLowpass(d.taps, d.cutoff, d.beta)
	T := (d.taps + d.up - 1) / d.up
	table := make([]float32, d.up*T)
	for p := 0; p < d.up; p++ {
		for j := 0; p+j*d.up < d.taps; j++ {
			table[p*T+T-1-j] = float32(h[p+j*d.up] * float64(d.up))
		}
	}
	c := int64(d.taps-1) / 2
	r := &resampler{
		src:     src,
		outRate: outRate,
		up:      d.up,
		down:    d.down,
		taps:    T,
		table:   table,
		hist:    make([]float32, 0, T+resampleChunk),
		scratch: make([]int16, resampleChunk),
		phase:   int(c % int64(d.up)),
		kmax:    c / int64(d.up),
	}
	// Zeros stand for x[k], k < 0, from the first window's start.
	r.base = r.kmax - int64(T) + 1
	r.hist = r.hist[:-r.base]
	return r, nil
}

// filterDesign is the lowpass the resampler uses for one rate pair.
type filterDesign struct {
	up, down int     // reduced ratio out/in
	taps     int     // odd filter length N at the upsampled rate
	beta     float64 // Kaiser shape parameter
	cutoff   float64 // -6 dB frequency as a fraction of the upsampled Nyquist
	width    float64 // transition width as a fraction of the upsampled Nyquist
}

// resampleDesign computes the filter for resampling in Hz to out Hz.
func resampleDesign(in, out int) filterDesign {
	g := gcd(in, out)
	d := filterDesign{up: out / g, down: in / g}
	nyqUp := float64(in) * float64(d.up) / 2
	stop := float64(min(in, out)) / 2
	pass := ResamplePassband * stop
	d.cutoff = (pass + stop) / 2 / nyqUp
	d.width = (stop - pass) / nyqUp
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
// ceil(inLen*up/down) samples; an error from the source is returned after
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
		coef := r.table[r.phase*r.taps : (r.phase+1)*r.taps]
		p[out] = floatToSample(dot(coef, r.hist[lo:lo+T]))
		out++
		r.produced++
		r.phase += r.down
		r.kmax += int64(r.phase / r.up)
		r.phase %= r.up
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
