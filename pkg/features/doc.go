// Package features is the spectral front end of auscult: it cuts a
// stream of int16 samples into overlapping frames and turns each frame
// into a row of log-mel energies, using only precomputed float32 tables
// so that the per-frame path does not allocate and ports directly to
// fixed point.
//
// # Pipeline
//
// Framer (frames of Config.FrameLen samples, Config.Hop apart, starting
// at sample 0, independent of block boundaries) → Extractor.Rows:
// samples/32768 → periodic Hann window → real FFT (FFT) → power |X_k|^2
// → sparse HTK mel filterbank (Bank, NewMelBank) → DB → floor. NewLogBank
// builds constant-relative-width bands for a long FFT (e.g. 16384 points,
// about 1 Hz bins at 16 kHz) when a fine low-frequency view is needed.
//
// # Units
//
//   - Samples: int16; full scale is 32768, so input is x/32768 in [-1, 1).
//   - Frequencies: Hz. Mel: HTK scale, mel(f) = 2595 log10(1 + f/700).
//   - Power spectrum: |X_k|^2 of the windowed, scaled frame, unnormalised
//     (as numpy.fft.rfft gives), k = 0..N/2, bin k at k*Rate/N Hz.
//   - Rows: dB relative to the one-sided power of a full-scale sine,
//     N sum(w^2)/4 = 3N^2/32 for the periodic Hann window (98304 for
//     N = 1024); see Extractor. Floored at Config.FloorDB.
//
// # Caveats
//
//   - A full-scale tone reads 0 dB only if its whole spectral line (3 bins
//     for Hann) sits under one band's peak; the line and the neighbouring
//     triangles share the energy. Measured with the default config, a
//     full-scale sine swept from 20 Hz to 7.5 kHz gives a loudest band
//     between -3.9 and -0.2 dB; within 50 Hz of FMax (where the last
//     triangle ends) it drops to about -5.3 dB.
//   - Many mel bands for a short FFT leave the lowest bands one or two
//     bins wide; NewMelBank refuses configurations where a band would
//     hold no bin. NewLogBank merges such bands instead (see there).
//   - Types with scratch buffers (FFT, Extractor, Framer) are not safe for
//     concurrent use; Bank is read-only and may be shared.
//   - DB is exact to 1e-4 dB over the normal float32 range; zero, negative,
//     subnormal and NaN powers give MinDB.
//
// # FIXEDPOINT
//
// Every stage maps onto Q15/Q31 integer arithmetic with bounded ranges:
//
//   - Input: int16 samples are Q15 values in [-1, 1).
//   - Window: Hann coefficients in Q15 (w <= 1; use 32767 for w[N/2] = 1).
//     x*w is Q30 in int32, rounded back to Q15. sum w = N/2 and
//     sum w^2 = 3N/8 exactly for the periodic window.
//   - FFT: pack z_t = (x_2t + i x_2t+1)/2, so |z_t| < 1 although each
//     part may be near full scale, then run the N/2-point complex
//     transform with a right shift by 1 per radix-2 stage (by 2 per
//     radix-4 stage), block floating point: a butterfly at most doubles
//     a modulus, so with the shift every intermediate modulus stays
//     below 1 and no Q15 component overflows. The real-split pass
//     (E_k, O_k halves) also shifts by 1. The total shift is
//     s = log2(N) + 1 bits: the output is X_k / 2N in Q15. Range: for
//     full-scale input after the Hann window |X_k| <= sum |x w| <= N/2
//     (reached at k = 0 by a constant -32768 frame), so
//     |X_k / 2N| <= 1/4.
//   - Power: re^2 + im^2 of those Q15 values is Q30 and at most
//     2^30 / 16, so it fits int32 (Q31) with headroom; it equals
//     |X_k|^2 / 4N^2, a known shift of 2(log2(N) + 1) bits relative to
//     this package's float Spectrum.
//   - Mel: weights in [0, 1] as Q15 (1 → 32767); accumulate w * P
//     (Q15 * Q30 = Q45) in int64, or shift P down by 15 first and
//     accumulate in Q30 in int64. Weights sum to at most 1 per bin over
//     all bands, so the total over bands stays within the power range.
//   - Log: integer log2 of a band energy = position of the highest set
//     bit (count leading zeros) + a lookup of log2(1 + f) in a table
//     indexed by the next 7 bits, linearly interpolated with the bits
//     below, exactly as DB does with the float32 exponent and mantissa.
//     dB = log2 * 10 log10(2) (3.0103, e.g. Q8.8 result); the reference
//     3N^2/32 and the fixed-point shifts become one additive constant in
//     log2 units. The floor is a compare with a constant.
//
// The float32 implementation is checked against a float64 version of
// the same pipeline (|difference| < 0.05 dB above floor+20 dB) and
// against numpy/scipy fixtures in testdata/features, written by
// scripts/ref/make_features_fixture.py.
//
// # Speed
//
// The per-frame path is zero-allocation; measure it with
// go test ./pkg/features -bench . -benchmem -run xxx. The hot path uses
// this package's own float32 FFT, which benchmarks faster than gonum's
// dsp/fourier (float64) on the same lengths (BenchmarkFFT1024,
// BenchmarkFFT16384).
package features
