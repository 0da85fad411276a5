#!/usr/bin/python3
"""Reference implementation of auscult's analysis chain in numpy/scipy, for
speed comparison only (scripts/bench.sh). The same work per hour of audio
as auscult's defaults: decode a 16-bit WAV, 1024-point frames with hop 512,
periodic Hann window (scipy.signal.get_window), power spectrum
(numpy.fft.rfft), 128 HTK mel bands up to 7680 Hz, log energy in dB with a
floor, per sub-window (32 hops) the 10th percentile over frames of every
band (numpy.partition) and its mean level, a 16384-point power spectrum per
sub-window pooled into 1/12-octave bands from 25 to 1200 Hz, trimmed mean
over 5 sub-windows every 2, and the whitened distance (standardise, project
on the K = 43 kept components, residual).

Runs single-threaded (set OMP/OPENBLAS thread variables to 1 before numpy
loads) and processes the file in blocks so memory stays bounded.
Usage: bench_numpy.py FILE.wav  -> prints seconds and windows on stdout.
"""
import os
for v in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ[v] = "1"
import sys
import time
import wave

import numpy as np
from scipy.signal import get_window

RATE, N, HOP, MELS, SUB = 16000, 1024, 512, 128, 32
FMAX, BPO, K = 7680.0, 12, 43
LOWK = int(0.1 * (SUB - 1) + 0.5)  # the 10th percentile of 32 frames
LONG = SUB * HOP
FLOOR = -100.0


def htk_mel(f):
    return 2595.0 * np.log10(1.0 + f / 700.0)


def mel_matrix():
    freqs = np.arange(N // 2 + 1) * RATE / N
    pts = 700.0 * (10 ** (np.linspace(0, htk_mel(FMAX), MELS + 2) / 2595.0) - 1)
    w = np.zeros((MELS, freqs.size), np.float32)
    for m in range(MELS):
        lo, c, hi = pts[m], pts[m + 1], pts[m + 2]
        up = (freqs - lo) / (c - lo)
        down = (hi - freqs) / (hi - c)
        w[m] = np.maximum(0, np.minimum(up, down))
    return w


def log_bands():
    freqs = np.arange(LONG // 2 + 1) * RATE / LONG
    edges = 25.0 * 2 ** (np.arange(0, BPO * np.log2(1200 / 25) + 1) / BPO)
    w = np.zeros((edges.size - 1, freqs.size), np.float32)
    for i in range(edges.size - 1):
        w[i, (freqs >= edges[i]) & (freqs < edges[i + 1])] = 1
    return w[w.sum(1) > 0]


def main(path):
    t0 = time.perf_counter()
    win = get_window("hann", N).astype(np.float32)
    lwin = get_window("hann", LONG).astype(np.float32)
    mel, lb = mel_matrix(), log_bands()
    dim = MELS + lb.shape[0]
    rng = np.random.default_rng(1)
    comps = rng.standard_normal((K, dim)).astype(np.float32)
    mean, scale = np.zeros(dim, np.float32), np.ones(dim, np.float32)
    subs, scores = [], []
    with wave.open(path, "rb") as wf:
        assert wf.getframerate() == RATE and wf.getsampwidth() == 2
        block = LONG * 16
        tail = np.zeros(0, np.float32)
        while True:
            raw = wf.readframes(block)
            if not raw:
                break
            x = np.concatenate([tail, np.frombuffer(raw, "<i2").astype(np.float32) / 32768])
            nsub = (len(x) - (N - HOP)) // LONG
            if nsub <= 0:
                tail = x
                continue
            used = nsub * LONG
            frames = np.lib.stride_tricks.sliding_window_view(x[: used + N - HOP], N)[::HOP][: nsub * SUB]
            spec = np.abs(np.fft.rfft(frames * win, axis=1)) ** 2
            e = 10 * np.log10(np.maximum(spec @ mel.T, 1e-30))
            e = np.maximum(e, FLOOR).reshape(nsub, SUB, MELS)
            low = np.partition(e, LOWK, axis=1)[:, LOWK, :]
            lvl = e.mean(axis=(1, 2))[:, None]
            longs = x[:used].reshape(nsub, LONG) * lwin
            fine = 10 * np.log10(np.maximum((np.abs(np.fft.rfft(longs, axis=1)) ** 2) @ lb.T, 1e-30))
            subs.extend(np.concatenate([low - lvl, fine - lvl], axis=1))
            tail = x[used:]
    subs = np.array(subs)
    for i in range(0, len(subs) - 4, 2):
        v = np.sort(subs[i:i + 5], axis=0)[1:4].mean(0)
        z = (v - mean) / scale
        c = comps @ z
        r = z - comps.T @ c
        scores.append(float(c @ c + r @ r))
    el = time.perf_counter() - t0
    print(f"{el:.3f} {len(scores)}")


if __name__ == "__main__":
    main(sys.argv[1])
