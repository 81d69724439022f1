#!/usr/bin/env python3
"""Times numpy.fft.rfft on the float64 input the benchmark wrote; prints per-round seconds as JSON.

Usage: numpy_fft.py <input.f64> <rounds> <reps-per-round>
"""
import json
import sys
import time

import numpy as np

x = np.fromfile(sys.argv[1], dtype=np.float64)
rounds, reps = int(sys.argv[2]), int(sys.argv[3])
np.fft.rfft(x)  # warm-up: plan caches, page faults
times = []
for _ in range(rounds):
    t = time.perf_counter()
    for _ in range(reps):
        np.fft.rfft(x)
    times.append((time.perf_counter() - t) / reps)
print(json.dumps({"seconds": times, "numpy": np.__version__}))
