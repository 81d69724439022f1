#!/usr/bin/env python3
"""Writes the reference vectors the engine's TypeScript tests compare against.

Every value comes from numpy / scipy, never from Earmark's own code, so the tests check
the engine against an outside implementation. Inputs are seeded, so the output is
deterministic for a given numpy/scipy build.

Usage: python3 generate_fixtures.py [output_dir]   (default: ./fixtures next to this file)
"""
import json
import os
import sys

import numpy as np
import scipy
import scipy.signal as sig

OUT = sys.argv[1] if len(sys.argv) > 1 else os.path.join(os.path.dirname(os.path.abspath(__file__)), "fixtures")
os.makedirs(OUT, exist_ok=True)


def lst(a):
    return [float(v) for v in np.asarray(a, dtype=np.float64).ravel()]


def write(name, payload):
    payload = {"generator": "packages/dsp/reference/generate_fixtures.py",
               "numpy": np.__version__, "scipy": scipy.__version__, **payload}
    with open(os.path.join(OUT, name), "w") as f:
        json.dump(payload, f, separators=(",", ":"))
        f.write("\n")


# --- windows: scipy.signal.get_window, symmetric (fftbins=False) and periodic (fftbins=True)
SCIPY_NAMES = {"rectangular": "boxcar", "hann": "hann", "hamming": "hamming", "blackman": "blackman",
               "blackman-harris": "blackmanharris", "flat-top": "flattop"}
windows = []
for kind, name in SCIPY_NAMES.items():
    for m in [1, 2, 7, 8, 64, 401]:
        for periodic in [False, True]:
            windows.append({"kind": kind, "length": m, "symmetry": "periodic" if periodic else "symmetric",
                            "values": lst(sig.get_window(name, m, fftbins=periodic))})
write("windows.json", {"windows": windows})

# --- FFT: numpy.fft.rfft / irfft / fft / ifft
rng = np.random.default_rng(20240301)
rfft_cases = []
for n in [2, 4, 8, 64, 1024, 4096]:
    x = rng.standard_normal(n)
    X = np.fft.rfft(x)
    rfft_cases.append({"n": n, "input": lst(x), "re": lst(X.real), "im": lst(X.imag)})
irfft_cases = []
for n in [4, 16, 512]:
    X = rng.standard_normal(n // 2 + 1) + 1j * rng.standard_normal(n // 2 + 1)
    irfft_cases.append({"n": n, "re": lst(X.real), "im": lst(X.imag), "output": lst(np.fft.irfft(X, n))})
fft_cases = []
for n in [2, 8, 256]:
    z = rng.standard_normal(n) + 1j * rng.standard_normal(n)
    Z = np.fft.fft(z)
    zi = np.fft.ifft(z)
    fft_cases.append({"n": n, "re": lst(z.real), "im": lst(z.imag), "fftRe": lst(Z.real), "fftIm": lst(Z.imag),
                      "ifftRe": lst(zi.real), "ifftIm": lst(zi.imag)})
write("fft.json", {"rfft": rfft_cases, "irfft": irfft_cases, "fft": fft_cases})

# --- numpy.unwrap
unwrap_cases = []
p = np.cumsum(rng.uniform(-2.5, 2.5, 200))
wrapped = np.angle(np.exp(1j * p))
unwrap_cases.append({"name": "random walk", "discont": None, "input": lst(wrapped), "output": lst(np.unwrap(wrapped))})
steep = np.angle(np.exp(-1j * 2 * np.pi * 0.37 * np.arange(300)))
unwrap_cases.append({"name": "linear phase of a delay", "discont": None, "input": lst(steep), "output": lst(np.unwrap(steep))})
edge = np.array([0.0, np.pi, 0.0, -np.pi, 0.0, 3.5, -3.5, 2 * np.pi, 0.1, 7.0, -7.0])
unwrap_cases.append({"name": "exact pi jumps and large steps", "discont": None, "input": lst(edge), "output": lst(np.unwrap(edge))})
big = rng.uniform(-10, 10, 100)
unwrap_cases.append({"name": "discont 4", "discont": 4.0, "input": lst(big), "output": lst(np.unwrap(big, discont=4.0))})
write("unwrap.json", {"unwrap": unwrap_cases})

# --- scipy.signal.welch and csd
fs = 48000.0
x = rng.standard_normal(5000)
tt = np.arange(5000) / fs
y = 0.5 * np.sin(2 * np.pi * 1000 * tt) + 0.01 * rng.standard_normal(5000) + 0.2
welch_cases = []
for (sig_name, s) in [("noise", x), ("tone", y)]:
    for (nperseg, noverlap, window, detrend, scaling) in [
        (256, None, "hann", "constant", "density"),
        (1024, 512, "hann", False, "density"),
        (1024, 768, "blackmanharris", "constant", "spectrum"),
        (512, 0, "boxcar", False, "spectrum"),
    ]:
        f, pxx = sig.welch(s, fs=fs, window=window, nperseg=nperseg, noverlap=noverlap, detrend=detrend, scaling=scaling)
        welch_cases.append({"signal": sig_name, "segmentLength": nperseg,
                            "overlap": noverlap if noverlap is not None else nperseg // 2,
                            "window": {"hann": "hann", "blackmanharris": "blackman-harris", "boxcar": "rectangular"}[window],
                            "detrend": "constant" if detrend else "none", "scaling": scaling,
                            "binHz": float(f[1] - f[0]), "psd": lst(pxx)})
h = np.array([0.1, 0.3, -0.2, 0.05])
yf = sig.lfilter(h, [1.0], x) + 0.001 * rng.standard_normal(5000)
f, pxy = sig.csd(x, yf, fs=fs, window="hann", nperseg=512, noverlap=256, detrend=False)
write("welch.json", {"sampleRate": fs, "noise": lst(x), "tone": lst(y), "welch": welch_cases,
                     "csd": {"x": "noise", "y": lst(yf), "segmentLength": 512, "overlap": 256, "re": lst(pxy.real), "im": lst(pxy.imag)}})

# --- scipy.signal.group_delay
gd_cases = []
for name, b, a in [
    ("symmetric FIR, 9 taps", np.array([1, -2, 3, 5, 7, 5, 3, -2, 1], dtype=float), np.array([1.0])),
    ("random FIR, 12 taps", rng.standard_normal(12), np.array([1.0])),
    ("Butterworth order 4, 0.2", *sig.butter(4, 0.2)),
]:
    w, gd = sig.group_delay((b, a), w=64)
    gd_cases.append({"name": name, "b": lst(b), "a": lst(a), "w": lst(w), "groupDelay": lst(gd)})
write("group-delay.json", {"groupDelay": gd_cases})
