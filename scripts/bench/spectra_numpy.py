#!/usr/bin/env python3
"""Reference for the benchmark: the plain numpy/scipy way to pick gaps in a grid file.

Reads a tab-separated grid (metadata lines starting with '#', one header row, bias in mV in the first
column, one dI/dV column per spectrum), smooths every spectrum with scipy's Savitzky-Golay filter and
takes the band edges where the smoothed signal first exceeds floor + k*sigma on either side of its
minimum (floor = smoothed minimum's neighbourhood median, sigma = 1.4826 MAD of first differences / sqrt 2).

Usage: python3 scripts/bench/spectra_numpy.py GRID.tsv [--window 9] [--k 3] [--truth GAPS.json]
Prints one JSON line: {"n", "read_s", "pick_s", "median_gap_eV", "scipy", ...}; with --truth (a JSON list
of the true gap of each column, eV) also the median and 90th percentile of |gap error| in meV.
"""
import json
import resource
import sys
import time

t_start = time.perf_counter()
import numpy as np  # noqa: E402
import scipy  # noqa: E402
from scipy.signal import savgol_filter  # noqa: E402


def main() -> None:
    path = sys.argv[1]
    window = int(sys.argv[sys.argv.index("--window") + 1]) if "--window" in sys.argv else 9
    k = float(sys.argv[sys.argv.index("--k") + 1]) if "--k" in sys.argv else 3.0
    t0 = time.perf_counter()
    with open(path, "r", encoding="utf-8") as f:
        line = f.readline()
        while line.startswith("#"):
            line = f.readline()
        # `line` is the header; the rest is numeric.
        data = np.loadtxt(f, delimiter="\t")
    bias = data[:, 0] * 1e-3
    y = data[:, 1:]
    t1 = time.perf_counter()
    s = savgol_filter(y, window, 2, axis=0)
    d = np.diff(y, axis=0)
    sigma = 1.4826 * np.median(np.abs(d - np.median(d, axis=0)), axis=0) / np.sqrt(2)
    gain = np.sqrt(np.sum(scipy.signal.savgol_coeffs(window, 2) ** 2))
    gaps = np.full(y.shape[1], np.nan)
    m = y.shape[0]
    for j in range(y.shape[1]):
        sj = s[:, j]
        i0 = int(np.argmin(sj[window:-window])) + window
        lo, hi = max(0, i0 - 5), min(m, i0 + 6)
        floor = np.median(y[lo:hi, j])
        thr = floor + k * sigma[j] * gain
        up = np.nonzero(sj[i0:] > thr)[0]
        dn = np.nonzero(sj[: i0 + 1][::-1] > thr)[0]
        if up.size and dn.size:
            gaps[j] = bias[i0 + up[0]] - bias[i0 - dn[0]]
    t2 = time.perf_counter()
    extra = {}
    if "--truth" in sys.argv:
        with open(sys.argv[sys.argv.index("--truth") + 1]) as f:
            truth = np.array(json.load(f))
        err = np.abs(np.where(np.isnan(gaps), np.inf, gaps - truth)) * 1000
        extra = {"median_abs_err_meV": float(np.median(err)), "p90_abs_err_meV": float(np.quantile(err, 0.9))}
    print(json.dumps({
        **extra,
        "n": int(y.shape[1]),
        "read_s": t1 - t0,
        "pick_s": t2 - t1,
        "startup_s": t0 - t_start,
        "median_gap_eV": float(np.nanmedian(gaps)),
        "scipy": scipy.__version__,
        "numpy": np.__version__,
        "max_rss_MB": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024,
    }))


if __name__ == "__main__":
    main()
