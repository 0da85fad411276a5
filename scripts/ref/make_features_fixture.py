#!/usr/bin/python3
"""Write the reference fixture for pkg/features.

Run with the Debian interpreter (python3-numpy, python3-scipy):

    /usr/bin/python3 scripts/ref/make_features_fixture.py

It writes testdata/features/reference.json. The Go tests read that file
and never call Python. Every number in it comes from numpy or scipy, not
from the Go code under test:

  hann        scipy.signal.get_window('hann', N)  (periodic by default)
  frame       deterministic int16 test frame (tones + LCG noise, below)
  power       |numpy.fft.rfft(frame/32768 * hann)|^2, unnormalised
  mel_*       HTK triangular filters, mel(f) = 2595 log10(1 + f/700)
              (HTK Book), peak 1, no area normalisation, evaluated at the
              rfft bin frequencies k*rate/N, stored sparsely per band
              (first nonzero bin, weights up to the last nonzero bin);
              the outer feet are exactly fmin and fmax
  ref_energy  N * sum(hann^2) / 4, the one-sided rfft energy of a
              full-scale sine (Parseval)
  logmel      10*log10(mel energy / ref_energy), floored at floor_db
"""
import json
import os
import platform
import sys

import numpy as np
import scipy
import scipy.signal

RATE = 16000
N = 1024
MELS = 128
FMIN = 0.0
FMAX = RATE / 2
FLOOR_DB = -100.0


def hz_to_mel(f):
    return 2595.0 * np.log10(1.0 + np.asarray(f, dtype=np.float64) / 700.0)


def mel_to_hz(m):
    return 700.0 * (10.0 ** (np.asarray(m, dtype=np.float64) / 2595.0) - 1.0)


def test_frame():
    """Three tones plus uniform noise from a 32-bit LCG (Numerical Recipes
    constants 1664525, 1013904223), so the frame does not depend on the
    numpy random generator version."""
    n = np.arange(N, dtype=np.float64)
    x = (8000.0 * np.sin(2 * np.pi * 440.0 * n / RATE)
         + 4000.0 * np.sin(2 * np.pi * 1000.0 * n / RATE + 0.3)
         + 2000.0 * np.sin(2 * np.pi * 3150.0 * n / RATE + 1.1))
    state = 12345
    noise = np.empty(N)
    for i in range(N):
        state = (1664525 * state + 1013904223) % (1 << 32)
        noise[i] = (state / 2.0 ** 32 - 0.5) * 1000.0
    x = np.round(x + noise)
    return np.clip(x, -32768, 32767).astype(np.int16)


def htk_mel_weights(rate, nfft, nmels, fmin, fmax):
    freqs = np.arange(nfft // 2 + 1, dtype=np.float64) * rate / nfft
    mpts = np.linspace(hz_to_mel(fmin), hz_to_mel(fmax), nmels + 2)
    hpts = mel_to_hz(mpts)
    # Pin the outer feet to the requested range; the mel round trip would
    # otherwise leave them a few ulp off (and give bin nfft/2 a 1e-16
    # weight when fmax is the Nyquist frequency).
    hpts[0], hpts[-1] = fmin, fmax
    w = np.zeros((nmels, freqs.size))
    for i in range(nmels):
        lo, c, hi = hpts[i], hpts[i + 1], hpts[i + 2]
        up = (freqs - lo) / (c - lo)
        down = (hi - freqs) / (hi - c)
        w[i] = np.maximum(0.0, np.minimum(up, down))
    return w, hpts


def main():
    hann = scipy.signal.get_window('hann', N)
    frame = test_frame()
    x = frame.astype(np.float64) / 32768.0 * hann
    power = np.abs(np.fft.rfft(x)) ** 2
    w, hpts = htk_mel_weights(RATE, N, MELS, FMIN, FMAX)
    first, weights = [], []
    for row in w:
        nz = np.nonzero(row)[0]
        first.append(int(nz[0]))
        weights.append([float(v) for v in row[nz[0]:nz[-1] + 1]])
    ref_energy = N * np.sum(hann ** 2) / 4.0
    energies = w @ power
    with np.errstate(divide='ignore'):
        logmel = 10.0 * np.log10(energies / ref_energy)
    logmel = np.maximum(logmel, FLOOR_DB)

    out = {
        "generator": "scripts/ref/make_features_fixture.py",
        "python_version": platform.python_version(),
        "numpy_version": np.__version__,
        "scipy_version": scipy.__version__,
        "rate": RATE,
        "n": N,
        "mels": MELS,
        "fmin": FMIN,
        "fmax": FMAX,
        "floor_db": FLOOR_DB,
        "hann": [float(v) for v in hann],
        "frame": [int(v) for v in frame],
        "power": [float(v) for v in power],
        "mel_points_hz": [float(v) for v in hpts],
        "mel_first": first,
        "mel_weights": weights,
        "ref_energy": float(ref_energy),
        "logmel": [float(v) for v in logmel],
    }
    here = os.path.dirname(os.path.abspath(__file__))
    path = os.path.join(here, "..", "..", "testdata", "features", "reference.json")
    with open(path, "w") as f:
        json.dump(out, f, separators=(",", ":"))
        f.write("\n")
    print("wrote", os.path.normpath(path), file=sys.stderr)


if __name__ == "__main__":
    main()
