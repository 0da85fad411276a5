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


if __name__ == "__main__":
    main()
