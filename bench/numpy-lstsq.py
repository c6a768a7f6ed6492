"""Times numpy.linalg.lstsq on design matrices written by bench/run.ts (run with OPENBLAS_NUM_THREADS=1), in CPU
time of this process (time.process_time, per call over batches of calls), as bench/run.ts times its kernel.

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
    # Calls in batches of about 1 ms of CPU between two clock readings (as bench/run.ts times its kernel): a
    # reading of process_time costs about 1.8 µs here, which timing every call added to every call. The arrays of
    # one call stay referenced until the next call replaces them (as in a loop that keeps its result), which spares
    # the allocator returning and re-mapping them: at 50 000 rows a call costs 2 ms this way and 15 ms when they are freed at once.
    times = []
    batch = 1
    reps = max(3, min(200, int(2e6 / (n * p))))
    while len(times) < max(3, reps // batch) + 1:
        t0 = time.process_time()
        for _ in range(batch):
            aw = a * sw[:, None]
            x, *_ = np.linalg.lstsq(aw, y * sw, rcond=None)
        t = (time.process_time() - t0) / batch
        if batch == 1 and not times:
            # The first call sets the batch size (it also warms up).
            batch = max(1, int(1e-3 / max(t, 1e-7)))
            times.append(t)
            continue
        times.append(t)
    print(json.dumps({"name": path.rsplit("/", 1)[-1], "median_us": float(np.median(times[1:]) * 1e6)}))
