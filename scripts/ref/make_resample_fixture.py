#!/usr/bin/python3
"""Reference fixtures for pkg/audio's resampler.

Run with Debian's python3 (packages python3-numpy, python3-scipy):

    /usr/bin/python3 scripts/ref/make_resample_fixture.py

For each input rate in RATES it makes a deterministic 0.5 s test signal
(a logarithmic chirp to 0.45*rate, three tones below the input Nyquist and
seeded Gaussian noise), stores it as raw little-endian int16 and resamples
it to 16000 Hz with scipy.signal.resample_poly.

Like with like: resample_poly is NOT run with its default filter (Kaiser
beta 5.0, cutoff at the Nyquist, 20*max(up,down)+1 taps). Instead this
script designs the filter the Go code is specified to use, independently
of the Go code, with scipy.signal.kaiserord (80 dB stopband, transition
width 0.1 of the lower Nyquist, taps made odd) and scipy.signal.firwin
(Kaiser window, cutoff midway through the transition band), and passes the
taps as resample_poly's `window` argument (resample_poly then multiplies
them by `up` and centres the output on the filter's middle tap, zero
padding the edges). The expected output is stored as little-endian
float32 (not rounded), together with the design parameters, in
testdata/audio/.

Arbitrary ratios (ARB_PAIRS, e.g. 11127 Hz to 16000 Hz, reduced ratio
16000/11127): the Go code does not build the 16000-phase rational filter
but samples the same kind of Kaiser-windowed sinc at L = 256 points per
input sample (a filter designed at rate in*L, again with kaiserord and
firwin) and interpolates between them. The reference here does not
interpolate: it evaluates the continuous windowed sinc directly, in
float64, at the exact output times t_n = n*in/out (computed with Python
integers, so exact):

    y[n] = sum_k x[k] * g(t_n - k)
    g(t) = (2*fc/in) * sinc(2*fc*t/in) * I0(beta*sqrt(1-(t/R)^2)) / I0(beta) / S

for |t| <= R = (numtaps-1)/(2*L) input samples and 0 outside, with fc the
cutoff in Hz, numpy's sinc and i0, and S the DC gain of the unscaled
firwin filter at rate in*L (firwin's own normalisation, which the Go code
also applies). x is zero outside the signal and the output has
ceil(len(x)*out/in) samples, as for resample_poly. Only L (the Go
constant resamplePhases) enters from the Go design, through numtaps and
the normalisation S; it is written to resample_arb_params.txt.
"""

import os
import sys

import numpy as np
import scipy
import scipy.signal as sig

OUT_RATE = 16000
RATES = (8000, 44100, 48000)
DURATION = 0.5
STOPBAND_DB = 80.0
PASSBAND = 0.96  # passband edge as a fraction of the lower Nyquist
ARB_PAIRS = ((11127, 16000), (47999, 16000), (8001, 16000), (11127, 8000))
ARB_PHASES = 256  # L, phases per input sample of the interpolated table

HERE = os.path.dirname(os.path.abspath(__file__))
DEST = os.path.join(HERE, "..", "..", "testdata", "audio")


def test_signal(rate):
    n = int(round(DURATION * rate))
    t = np.arange(n) / rate
    x = 6000.0 * sig.chirp(t, f0=50.0, t1=DURATION, f1=0.45 * rate, method="logarithmic")
    for f, a in ((440.0, 3000.0), (2500.0, 2500.0), (7000.0, 2000.0)):
        if f < rate / 2:
            x += a * np.sin(2 * np.pi * f * t)
    x += np.random.default_rng(20240611).normal(0.0, 300.0, n)
    return np.clip(np.round(x), -32768, 32767).astype("<i2")


def design(in_rate, out_rate):
    g = np.gcd(in_rate, out_rate)
    up, down = out_rate // g, in_rate // g
    nyq_up = in_rate * up / 2.0
    stop = min(in_rate, out_rate) / 2.0
    passe = PASSBAND * stop
    width = (stop - passe) / nyq_up
    cutoff = (passe + stop) / 2.0 / nyq_up
    numtaps, beta = sig.kaiserord(STOPBAND_DB, width)
    if numtaps % 2 == 0:
        numtaps += 1
    taps = sig.firwin(numtaps, cutoff, window=("kaiser", beta))
    return up, down, numtaps, beta, cutoff, width, taps


def direct_sinc(x, in_rate, out_rate, phases):
    """Windowed-sinc resampling evaluated directly at t_n = n*in/out."""
    nyq = in_rate * phases / 2.0
    stop = min(in_rate, out_rate) / 2.0
    passe = PASSBAND * stop
    width = (stop - passe) / nyq
    cutoff = (passe + stop) / 2.0 / nyq
    numtaps, beta = sig.kaiserord(STOPBAND_DB, width)
    if numtaps % 2 == 0:
        numtaps += 1
    gain = sig.firwin(numtaps, cutoff, window=("kaiser", beta), scale=False).sum()
    fc = cutoff * nyq  # -6 dB frequency in Hz
    half = (numtaps - 1) / 2.0 / phases  # R, window half-length in input samples
    x = x.astype(np.float64)
    n_in = len(x)
    n_out = -(-n_in * out_rate // in_rate)
    reach = int(np.ceil(half)) + 1
    j = np.arange(-reach, reach + 1)
    y = np.zeros(n_out)
    for start in range(0, n_out, 500):
        n = np.arange(start, min(start + 500, n_out), dtype=object)
        k0 = np.array([int(v) * in_rate // out_rate for v in n], dtype=np.int64)
        frac = np.array([(int(v) * in_rate % out_rate) / out_rate for v in n])
        k = k0[:, None] - j[None, :]
        t = j[None, :] + frac[:, None]  # t_n - k
        inside = (np.abs(t) <= half) & (k >= 0) & (k < n_in)
        r = np.clip(t / half, -1.0, 1.0)
        g = (2 * fc / in_rate) * np.sinc(2 * fc * t / in_rate) * np.i0(beta * np.sqrt(1 - r * r)) / np.i0(beta) / gain
        xs = x[np.clip(k, 0, n_in - 1)]
        y[start : start + len(n)] = np.sum(np.where(inside, g * xs, 0.0), axis=1)
    return numtaps, beta, cutoff, width, y


def main():
    os.makedirs(DEST, exist_ok=True)
    lines = [
        "# made by scripts/ref/make_resample_fixture.py with python %s, numpy %s, scipy %s"
        % (sys.version.split()[0], np.__version__, scipy.__version__),
        "# in out up down numtaps beta cutoff width",
    ]
    for rate in RATES:
        x = test_signal(rate)
        up, down, numtaps, beta, cutoff, width, taps = design(rate, OUT_RATE)
        y = sig.resample_poly(x.astype(np.float64), up, down, window=taps)
        x.tofile(os.path.join(DEST, "resample_in_%d.s16" % rate))
        y.astype("<f4").tofile(os.path.join(DEST, "resample_%d_to_%d.f32" % (rate, OUT_RATE)))
        lines.append("%d %d %d %d %d %.17g %.17g %.17g" % (rate, OUT_RATE, up, down, numtaps, beta, cutoff, width))
    with open(os.path.join(DEST, "resample_params.txt"), "w") as f:
        f.write("\n".join(lines) + "\n")

    lines = [lines[0], "# in out L numtaps beta cutoff width"]
    for in_rate, out_rate in ARB_PAIRS:
        x = test_signal(in_rate)
        numtaps, beta, cutoff, width, y = direct_sinc(x, in_rate, out_rate, ARB_PHASES)
        x.tofile(os.path.join(DEST, "resample_in_%d.s16" % in_rate))
        y.astype("<f4").tofile(os.path.join(DEST, "resample_%d_to_%d.f32" % (in_rate, out_rate)))
        lines.append("%d %d %d %d %.17g %.17g %.17g" % (in_rate, out_rate, ARB_PHASES, numtaps, beta, cutoff, width))
    with open(os.path.join(DEST, "resample_arb_params.txt"), "w") as f:
        f.write("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
