#!/usr/bin/env python3
"""The analyze measures written with numpy/scipy, for the side-by-side benchmark.

Same methods as Earmark's analyzeCapture (docs/analysis.md), idiomatic numpy: levels,
Parseval energy (rectangular rfft), Hann rfft for 1/3-octave bands and the start frequency,
a four-parameter sine fit (Gauss-Newton, IEEE Std 1241), a joint least-squares fit of DC and
harmonics 1..10 (normal equations through BLAS), the residual's in-band noise (rfft) with
A-weighting (IEC 61672-1), and the second-difference discontinuity scan.

Usage: scipy_analyze.py <capture.f64> <channels> <sample_rate> <rounds>
Prints per-round seconds (whole analysis of all channels) and the first channel's results.
"""
import json
import sys
import time

import numpy as np
import scipy.fft as sfft
import scipy.signal as sig


def a_weight_gain(f):
    f1, f2, f3, f4 = 20.598997, 107.65265, 737.86223, 12194.217
    def ra(f):
        f2_ = f * f
        return (f4**2 * f2_**2) / ((f2_ + f1**2) * np.sqrt((f2_ + f2**2) * (f2_ + f3**2)) * (f2_ + f4**2))
    return ra(f) / ra(np.array(1000.0))


def analyze_channel(x, fs):
    n = x.size
    nfft = 1 << (n - 1).bit_length()
    rms = np.sqrt(np.mean(x * x))
    peak = np.max(np.abs(x))
    out = {"rmsDbfs": 20 * np.log10(rms * np.sqrt(2)), "peakDbfs": 20 * np.log10(peak),
           "dcOffset": float(np.mean(x)), "clipped": int(np.count_nonzero(np.abs(x) >= 1 - 2**-15))}
    X = sfft.rfft(x, nfft)
    p = np.abs(X) ** 2
    w2 = np.ones_like(p); w2[1:-1] = 2
    out["energy"] = [float(np.sum(x * x)), float(np.sum(w2 * p) / nfft)]
    w = sig.get_window("hann", n)
    Xw = sfft.rfft(x * w, nfft)
    pw = np.abs(Xw) ** 2
    power = w2 * pw / (nfft * np.sum(w * w))
    bin_hz = fs / nfft
    k = np.argmax(pw[max(1, int(np.ceil(10 / bin_hz))):-1]) + max(1, int(np.ceil(10 / bin_hz)))
    a, b, c = np.log(pw[k - 1:k + 2])
    f0 = (k + 0.5 * (a - c) / (a - 2 * b + c)) * bin_hz
    # 1/3-octave bands, IEC 61260-1 base 10
    g = 10 ** 0.3
    bands = []
    for xb in range(-16, 14):
        fm = 1000 * g ** (xb / 3)
        lo, hi = fm / g ** (1 / 6), fm * g ** (1 / 6)
        if hi > fs / 2:
            break
        kk = np.arange(int(np.ceil(lo / bin_hz)), int(np.ceil(hi / bin_hz)))
        bands.append(10 * np.log10(2 * np.sum(power[kk])))
    out["bands"] = bands
    # four-parameter sine fit on centred time
    t = np.arange(n) - (n - 1) / 2
    om = 2 * np.pi * f0 / fs
    cs, sn = np.cos(om * t), np.sin(om * t)
    M = np.stack([cs, sn, np.ones(n)], axis=1)
    A, B, C = np.linalg.lstsq(M, x, rcond=None)[0]
    for _ in range(30):
        cs, sn = np.cos(om * t), np.sin(om * t)
        d = t * (B * cs - A * sn)
        M = np.stack([cs, sn, np.ones(n), d], axis=1)
        A, B, C, dw = np.linalg.solve(M.T @ M, M.T @ x)
        om += dw
        if abs(dw) * n < 1e-11:
            break
    # joint harmonic fit, harmonics below Nyquist (keep a bin's distance)
    K = [h for h in range(1, 11) if h * om < np.pi - 2 * np.pi / n]
    cols = [np.ones(n)]
    for h in K:
        cols += [np.cos(h * om * t), np.sin(h * om * t)]
    M = np.stack(cols, axis=1)
    coef = np.linalg.solve(M.T @ M, M.T @ x)
    amps = np.hypot(coef[1::2], coef[2::2])
    resid = x - M @ coef
    R = sfft.rfft(resid, nfft)
    f = np.arange(R.size) * bin_hz
    band = (f >= 20) & (f <= min(20000, fs / 2))
    pr = (w2 * np.abs(R) ** 2)[band]
    noise = np.sum(pr) / (nfft * n)
    noise_a = np.sum(pr * a_weight_gain(f[band]) ** 2) / (nfft * n)
    p1 = amps[0] ** 2 / 2
    harm_in_band = sum(amps[i] ** 2 / 2 for i, h in enumerate(K) if i > 0 and 20 <= h * om * fs / (2 * np.pi) <= 20000)
    out.update({"fundamentalHz": om * fs / (2 * np.pi), "thdPercent": 100 * np.sqrt(np.sum(amps[1:] ** 2)) / amps[0],
                "snrDb": 10 * np.log10(p1 / noise), "thdnDb": 10 * np.log10((noise + harm_in_band) / (noise + harm_in_band + p1)),
                "noiseFloorDbfs": 10 * np.log10(2 * noise), "noiseFloorDbfsA": 10 * np.log10(2 * noise_a)})
    # discontinuities: second difference against 8x its RMS
    e = np.diff(x, 2)
    out["discontinuities"] = int(np.count_nonzero(np.abs(e) > max(8 * np.sqrt(np.mean(e * e)), 1e-4)))
    return out


def main():
    path, channels, fs, rounds = sys.argv[1], int(sys.argv[2]), float(sys.argv[3]), int(sys.argv[4])
    data = np.fromfile(path, dtype=np.float64).reshape(channels, -1)
    result = [analyze_channel(c, fs) for c in data]  # warm-up
    times = []
    for _ in range(rounds):
        t = time.perf_counter()
        result = [analyze_channel(c, fs) for c in data]
        times.append(time.perf_counter() - t)
    first = {k: (float(v) if not isinstance(v, list) else [float(u) for u in v]) for k, v in result[0].items()}
    print(json.dumps({"seconds": times, "first": first}))


main()
