package features

import "math"

// MinDB is what DB returns for zero, negative, subnormal and NaN input.
// It lies just below 10*log10 of the smallest normal float32 (about
// -379.3 dB).
const MinDB = -380

// dbPerLog2 is 10*log10(2): dB per octave of power.
const dbPerLog2 = 3.0102999566398120

// log2Bits is the number of mantissa bits that index the table.
const log2Bits = 7

// log2Table holds log2(1 + i/128) for i = 0..128 (index 128 is 1). It is
// filled once at package initialisation and only read afterwards.
var log2Table = func() (t [1<<log2Bits + 1]float32) {
	for i := range t {
		t[i] = float32(math.Log2(1 + float64(i)/(1<<log2Bits)))
	}
	return t
}()

// DB returns 10*log10(x) for a power value x, without calling a
// logarithm: log2(x) = e + log2(m) where e is the unbiased exponent and
// m in [1, 2) the mantissa of the float32; log2(m) comes from a 129-entry
// table indexed by the top 7 mantissa bits, linearly interpolated with
// the remaining 16 bits. The interpolation error is below
// (1/128)^2/8/ln 2 = 1.1e-5 in log2, i.e. 3.3e-5 dB; with float32
// rounding the total error stays below 1e-4 dB over the whole normal
// float32 range (tested against math.Log10).
//
// Zero, negative, subnormal and NaN input gives MinDB; +Inf gives +Inf.
// Callers apply their own floor (Extractor uses Config.FloorDB).
func DB(x float32) float32 {
	b := math.Float32bits(x)
	if b-0x00800000 >= 0x7f000000 { // not a positive, normal, finite value
		if b == 0x7f800000 {
			return x
		}
		return MinDB
	}
	e := int32(b>>23) - 127
	mant := b & 0x7fffff
	i := mant >> (23 - log2Bits)
	frac := float32(mant&(1<<(23-log2Bits)-1)) * (1.0 / (1 << (23 - log2Bits)))
	t0 := log2Table[i]
	t1 := log2Table[i+1]
	return (float32(e) + t0 + frac*(t1-t0)) * dbPerLog2
}

// dbInto sets dst[i] = max(DB(src[i]) - sub, floor) for every i, with
// the body of DB written out so that the loop needs no calls. NaN,
// zero, negative and subnormal input give floor; +Inf gives +Inf. It
// assumes floor > MinDB - sub.
func dbInto(dst, src []float32, sub, floor float32) {
	dst = dst[:len(src)]
	for i, x := range src {
		b := math.Float32bits(x)
		if b-0x00800000 >= 0x7f000000 {
			if b == 0x7f800000 {
				dst[i] = x
			} else {
				dst[i] = floor
			}
			continue
		}
		mant := b & 0x7fffff
		j := mant >> (23 - log2Bits)
		frac := float32(mant&(1<<(23-log2Bits)-1)) * (1.0 / (1 << (23 - log2Bits)))
		t0 := log2Table[j]
		t1 := log2Table[j+1]
		v := (float32(int32(b>>23)-127)+t0+frac*(t1-t0))*dbPerLog2 - sub
		dst[i] = max(v, floor)
	}
}
