package audio

import (
	"encoding/binary"
	"math"
)

// Sample conversion rules (the exact contract of WAVReader's output).
//
// Integer samples are first left-justified to a 32-bit value v:
//
//	 8-bit unsigned u:  v = (u - 128) << 24
//	16-bit signed s:    v = s << 16
//	24-bit signed s:    v = s << 8
//	32-bit signed s:    v = s
//
// A picked channel is then rounded to 16 bits, half up:
// out = floor((v + 2^15) / 2^16), clipped to 32767. So 8 and 16-bit input
// is reproduced exactly ((u-128)<<8 and s), and 24/32-bit input is rounded
// to the nearest 16-bit step with ties toward +infinity, the rule SoX
// 14.4 uses when it writes 16-bit output without dither (from memory of
// sox.h's SOX_SAMPLE_TO_SIGNED_16BIT; TestWAVRoundingAgainstSox confirms it).
//
// Float samples x (full scale is -1.0..+1.0) become
// out = floor(x*32768 + 0.5), clipped to -32768..32767; NaN becomes 0. The
// scale 32768 makes 16-bit -> float -> 16-bit conversions by s/32768
// (which SoX and most tools use) lossless.
//
// Mixing (channel -1) sums the left-justified values of all C channels in
// 64-bit integers (float: float64) and applies the same rounding to the
// mean: out = floor((sum + C*2^15) / (C*2^16)), clipped; for float
// out = floor(mean*32768 + 0.5), clipped. Rounding happens once, after
// averaging.

// sampleDecoder converts interleaved little-endian frames to mono int16.
type sampleDecoder struct {
	sampleBytes int  // bytes per sample: 1, 2, 3, 4 or 8
	channels    int  // interleaved channels per frame
	channel     int  // channel to pick, or -1 to mix all
	float       bool // IEEE float samples
}

// decode converts len(dst) frames from src, which must hold exactly
// len(dst)*channels*sampleBytes bytes. It does not allocate.
func (d *sampleDecoder) decode(dst []int16, src []byte) {
	frame := d.channels * d.sampleBytes
	if !d.float && d.sampleBytes == 2 && d.channels == 1 {
		for i := range dst {
			dst[i] = int16(binary.LittleEndian.Uint16(src[2*i:]))
		}
		return
	}
	if d.channel >= 0 {
		off := d.channel * d.sampleBytes
		for i := range dst {
			s := src[i*frame+off:]
			if d.float {
				dst[i] = floatToInt16(d.floatAt(s))
			} else {
				dst[i] = roundMean(int64(d.intAt(s)), 1)
			}
		}
		return
	}
	for i := range dst {
		s := src[i*frame : (i+1)*frame]
		if d.float {
			var sum float64
			for c := 0; c < d.channels; c++ {
				sum += d.floatAt(s[c*d.sampleBytes:])
			}
			dst[i] = floatToInt16(sum / float64(d.channels))
		} else {
			var sum int64
			for c := 0; c < d.channels; c++ {
				sum += int64(d.intAt(s[c*d.sampleBytes:]))
			}
			dst[i] = roundMean(sum, d.channels)
		}
	}
}

// intAt returns the left-justified 32-bit value of the integer sample at
// the start of s.
func (d *sampleDecoder) intAt(s []byte) int32 {
	switch d.sampleBytes {
	case 1:
		return (int32(s[0]) - 128) << 24
	case 2:
		return int32(binary.LittleEndian.Uint16(s)) << 16
	case 3:
		return int32(uint32(s[0])<<8 | uint32(s[1])<<16 | uint32(s[2])<<24)
	default:
		return int32(binary.LittleEndian.Uint32(s))
	}
}

// floatAt returns the float sample at the start of s.
func (d *sampleDecoder) floatAt(s []byte) float64 {
	if d.sampleBytes == 8 {
		return math.Float64frombits(binary.LittleEndian.Uint64(s))
	}
	return float64(math.Float32frombits(binary.LittleEndian.Uint32(s)))
}

// roundMean returns floor((sum + n*2^15) / (n*2^16)) clipped to int16: the
// mean of n left-justified 32-bit samples rounded half up to 16 bits.
func roundMean(sum int64, n int) int16 {
	d := int64(n) << 16
	q := sum + d/2
	if q >= 0 {
		q /= d
	} else {
		q = -((-q + d - 1) / d)
	}
	return int16(min(max(q, math.MinInt16), math.MaxInt16))
}

// floatToInt16 returns floor(x*32768 + 0.5) clipped to int16; NaN gives 0.
func floatToInt16(x float64) int16 {
	y := math.Floor(x*32768 + 0.5)
	switch {
	case y != y:
		return 0
	case y >= math.MaxInt16:
		return math.MaxInt16
	case y <= math.MinInt16:
		return math.MinInt16
	}
	return int16(y)
}
