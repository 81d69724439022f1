#!/usr/bin/env python3
"""The analyze measures written with numpy/scipy, for the side-by-side benchmark.

Same methods as Earmark's analyzeCapture in engine 1.0 (docs/analysis.md), idiomatic numpy
and scipy: levels, Parseval energy (rectangular rfft), Hann rfft for 1/3-octave bands, the
steady window (8th-order Butterworth low-pass at 20 kHz, 10 ms block levels, 5-block mean,
longest run near the loudest sustained level), the start frequency from a Hann peak on a
<= 65536-sample centred segment, a four-parameter sine fit (Gauss-Newton, IEEE Std 1241) and a
joint least-squares fit of DC and harmonics 1..10 over the steady window, the residual's
in-band power through a Kaiser (beta 20) windowed exact-band sum with A-weighting on the noise
only (AES17, IEC 61672-1), run-based clipping, the AR(24) prediction-residual glitch scan with
tile medians (Levinson-Durbin via scipy.linalg.solve_toeplitz), and envelope dropouts.

Usage: scipy_analyze.py <capture.f64> <channels> <sample_rate> <rounds>
Prints per-round seconds (whole analysis of all channels) and the first channel's results.
"""
import json
import sys
import time

import numpy as np
import scipy.fft as sfft
import scipy.signal as sig
from scipy import linalg


def a_weight_gain(f):
    f1, f2, f3, f4 = 20.598997, 107.65265, 737.86223, 12194.217
    def ra(f):
        f2_ = f * f
        return (f4**2 * f2_**2) / ((f2_ + f1**2) * np.sqrt((f2_ + f2**2) * (f2_ + f3**2)) * (f2_ + f4**2))
    return ra(f) / ra(np.array(1000.0))


def steady_window(x, fs):
    block = int(round(0.010 * fs))
    n = x.size
    if n < 2 * block:
        return 0, n
    y = x - np.mean(x)
    if fs / 2 > 20000 * 1.05:
        y = sig.sosfilt(sig.butter(8, 20000, fs=fs, output="sos"), y)
    count = int(np.ceil(n / block))
    pad = np.zeros(count * block)
    pad[:n] = y * y
    power = pad.reshape(count, block).sum(axis=1) / np.minimum(block, n - np.arange(count) * block)
    level = 10 * np.log10(np.convolve(power, np.ones(5) / 5, mode="same") + 1e-300)
    span = min(10, count)
    loudest = max(level[j:j + span].min() for j in range(count - span + 1))
    ok = level >= loudest - 6
    best, run_start, bounds = 0, None, (0, count - 1)
    for j, v in enumerate(np.append(ok, False)):
        if v and run_start is None:
            run_start = j
        if not v and run_start is not None:
            if j - run_start > best:
                best, bounds = j - run_start, (run_start, j - 1)
            run_start = None
    a, b = bounds
    settle = block
    return (a * block + settle if a > 0 else 0), ((b + 1) * block - settle if b < count - 1 else n)


def kaiser_band_power(r, fs, lo, hi):
    n = r.size
    beta = 20.0
    w = np.kaiser(n, beta)
    nfft = 1 << (n - 1).bit_length()
    R = sfft.rfft(r * w, nfft)
    f = np.arange(R.size) * fs / nfft
    h = np.sqrt(beta**2 + np.pi**2) * fs / (np.pi * (n - 1))
    band = (f >= lo - h) & (f <= hi + h)
    w2 = np.ones(R.size); w2[1:-1] = 2
    p = (w2 * np.abs(R) ** 2)[band] / (nfft * np.sum(w * w))
    return float(np.sum(p)), float(np.sum(p * a_weight_gain(np.maximum(f[band], 1e-3)) ** 2))


def clipped_runs(x):
    top, bottom = x.max(), x.min()
    count = 0
    for v in (top, bottom):
        at = np.flatnonzero(x == v)
        if at.size < 2:
            continue
        breaks = np.flatnonzero(np.diff(at) != 1)
        starts = np.r_[at[0], at[breaks + 1]]
        ends = np.r_[at[breaks], at[-1]]
        lengths = ends - starts + 1
        count += int(np.sum(lengths[lengths >= 2]))
    return count


def glitches(x, fs, order=24, block=512):
    e = np.zeros_like(x)
    hann = 0.5 - 0.5 * np.cos(2 * np.pi * (np.arange(block) + 0.5) / block)
    for start in range(0, x.size - block + 1, block):
        seg = x[start:start + block] * hann
        r = np.correlate(seg, seg, mode="full")[block - 1:block + order]
        r[0] *= 1 + 1e-9
        if r[0] <= 0:
            continue
        a = linalg.solve_toeplitz(r[:order], r[1:order + 1])
        lo = max(start, order)
        frame = x[lo - order:start + block]
        pred = sig.lfilter(np.r_[0, a], [1], frame)[order:]
        e[lo:start + block] = x[lo:start + block] - pred
    m = np.abs(e)
    window = max(4 * order, int(round(0.004 * fs)))
    tiles = m[: (m.size // window) * window].reshape(-1, window)
    med = np.median(tiles[:, :: max(1, window // 256)], axis=1)
    scale = np.maximum(med, np.maximum(np.r_[0, med[:-1]], np.r_[med[1:], 0]))
    thr = np.repeat(np.maximum(12 * scale, 2**-20), window)
    return int(np.count_nonzero(m[: thr.size] > thr))


def dropouts(x, fs):
    hop = max(1, int(round(0.0005 * fs)))
    k = x.size // hop
    peaks = np.abs(x[: k * hop]).reshape(k, hop).max(axis=1)
    around = sig.convolve(peaks, np.ones(40), mode="same") / 40
    return int(np.count_nonzero(peaks < around * 0.01))


def analyze_channel(x, fs):
    n = x.size
    nfft = 1 << (n - 1).bit_length()
    rms = np.sqrt(np.mean(x * x))
    peak = np.max(np.abs(x))
    out = {"rmsDbfs": 20 * np.log10(rms * np.sqrt(2)), "peakDbfs": 20 * np.log10(peak),
           "dcOffset": float(np.mean(x)), "clipped": clipped_runs(x)}
    X = sfft.rfft(x, nfft)
    p = np.abs(X) ** 2
    w2 = np.ones_like(p); w2[1:-1] = 2
    out["energy"] = [float(np.sum(x * x)), float(np.sum(w2 * p) / nfft)]
    w = sig.get_window("hann", n)
    Xw = sfft.rfft(x * w, nfft)
    power = w2 * np.abs(Xw) ** 2 / (nfft * np.sum(w * w))
    bin_hz = fs / nfft
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
    # steady window, then the start frequency on a centred segment
    s0, s1 = steady_window(x, fs)
    seg = x[s0:s1]
    m = seg.size
    length = min(m, 65536)
    c = seg[(m - length) // 2:(m - length) // 2 + length]
    pf = 1 << (2 * length - 1).bit_length()
    mag = np.abs(sfft.rfft(c * sig.get_window("hann", length), pf))
    bh = fs / pf
    k = np.argmax(mag[max(1, int(np.ceil(10 / bh))):-1]) + max(1, int(np.ceil(10 / bh)))
    a, b, cc = np.log(mag[k - 1:k + 2])
    f0 = (k + 0.5 * (a - cc) / (a - 2 * b + cc)) * bh
    # four-parameter sine fit over the steady window, centred time
    t = np.arange(m) - (m - 1) / 2
    om = 2 * np.pi * f0 / fs
    cs, sn = np.cos(om * t), np.sin(om * t)
    M = np.stack([cs, sn, np.ones(m)], axis=1)
    A, B, C = np.linalg.lstsq(M, seg, rcond=None)[0]
    for _ in range(30):
        cs, sn = np.cos(om * t), np.sin(om * t)
        d = t * (B * cs - A * sn)
        M = np.stack([cs, sn, np.ones(m), d], axis=1)
        A, B, C, dw = np.linalg.solve(M.T @ M, M.T @ seg)
        om += dw
        if abs(dw) * m < 1e-11:
            break
    K = [h for h in range(1, 11) if h * om < np.pi - 2 * np.pi / m]
    cols = [np.ones(m)]
    for h in K:
        cols += [np.cos(h * om * t), np.sin(h * om * t)]
    M = np.stack(cols, axis=1)
    coef = np.linalg.solve(M.T @ M, M.T @ seg)
    amps = np.hypot(coef[1::2], coef[2::2])
    resid = seg - M @ coef
    noise, noise_a = kaiser_band_power(resid, fs, 20, min(20000, fs / 2))
    p1 = amps[0] ** 2 / 2
    harm_in_band = sum(amps[i] ** 2 / 2 for i, h in enumerate(K) if i > 0 and 20 <= h * om * fs / (2 * np.pi) <= 20000)
    out.update({"fundamentalHz": om * fs / (2 * np.pi), "thdPercent": 100 * np.sqrt(np.sum(amps[1:] ** 2)) / amps[0],
                "snrDb": 10 * np.log10(p1 / noise), "thdnDb": 10 * np.log10((noise + harm_in_band) / (noise + harm_in_band + p1)),
                "noiseFloorDbfs": 10 * np.log10(2 * noise), "noiseFloorDbfsA": 10 * np.log10(2 * noise_a)})
    out["discontinuities"] = glitches(x, fs)
    out["dropouts"] = dropouts(x, fs)
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
