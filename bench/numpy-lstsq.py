"""Times numpy.linalg.lstsq on design matrices written by bench/run.ts (run with OPENBLAS_NUM_THREADS=1), in CPU
time of this process (time.process_time), as bench/run.ts times its kernel.

Input: a binary file of float64: rows, cols, then the column-major design (rows*cols), then y (rows), then w.
Prints one line of JSON: {"name": ..., "median_us": ...} per file given on the command line.
"""
import json
import sys
import time

import numpy as np

for path in sys.argv[1:]:
    raw = np.fromfile(path, dtype=np.float64)
    n, p = int(raw[0]), int(raw[1])
    a = raw[2:2 + n * p].reshape((p, n)).T.copy()
    y = raw[2 + n * p:2 + n * p + n]
    w = raw[2 + n * p + n:2 + n * p + 2 * n]
    sw = np.sqrt(w)
    times = []
    reps = max(3, min(200, int(2e6 / (n * p))))
    for _ in range(reps):
        t0 = time.process_time()
        aw = a * sw[:, None]
        x, *_ = np.linalg.lstsq(aw, y * sw, rcond=None)
        times.append(time.process_time() - t0)
    print(json.dumps({"name": path.rsplit("/", 1)[-1], "median_us": float(np.median(times) * 1e6)}))
