#!/usr/bin/env python3
"""Write golden vectors for the smoothing tests from scipy, an independent reference implementation.

Usage (from the project root):  python3 scripts/golden/make_golden.py
Writes tests/unit/spectra/golden/scipy-smoothing.json and scipy-prepare.json; commit the result. The input signals are stored
in the file, so the tests do not depend on numpy's random generator.
"""
import json
import os
import sys

import numpy as np
import scipy
from scipy.ndimage import gaussian_filter1d
from scipy.integrate import cumulative_trapezoid
from scipy.signal import savgol_coeffs, savgol_filter

GOLDEN = os.path.join(os.path.dirname(__file__), "..", "..", "tests", "unit", "spectra", "golden")
OUT = os.path.join(GOLDEN, "scipy-smoothing.json")
OUT_PREPARE = os.path.join(GOLDEN, "scipy-prepare.json")


def write(path: str, doc: dict) -> None:
    os.makedirs(os.path.dirname(path), exist_ok=True)
    with open(path, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    print(f"wrote {os.path.relpath(path)} with scipy {scipy.__version__}")


def prepare() -> None:
    """cumulative_trapezoid(y, x, initial=0) on a uniform and a non-uniform axis, for lib/spectra/prepare."""
    rng = np.random.default_rng(20261205)
    cases = []
    x = np.linspace(-0.3, 0.3, 151)
    y = 1.0 + np.tanh((x - 0.1) / 0.02) + 0.3 * np.abs(x) + 0.02 * rng.standard_normal(x.size)
    cases.append({"name": "uniform", "x": x.tolist(), "y": y.tolist(), "output": cumulative_trapezoid(y, x, initial=0).tolist()})
    xn = np.sort(rng.uniform(-0.5, 0.5, 97))
    yn = np.exp(xn / 0.15) + 0.05 * rng.standard_normal(xn.size)
    cases.append({"name": "non-uniform", "x": xn.tolist(), "y": yn.tolist(), "output": cumulative_trapezoid(yn, xn, initial=0).tolist()})
    write(OUT_PREPARE, {
        "source": f"scipy {scipy.__version__} (numpy {np.__version__}, python {sys.version.split()[0]}): "
        "scipy.integrate.cumulative_trapezoid(y, x, initial=0)",
        "scipy_version": scipy.__version__,
        "generator": "scripts/golden/make_golden.py",
        "cumulative_trapezoid": cases,
    })


def main() -> None:
    rng = np.random.default_rng(20261201)
    x = np.linspace(-0.5, 0.5, 201)
    y = np.sin(9 * x) + 0.4 * x**3 - 0.2 * x + 0.05 * rng.standard_normal(x.size)
    coeffs = []
    for window, order, deriv, delta in [(5, 2, 0, 1.0), (7, 2, 0, 1.0), (9, 3, 0, 1.0), (11, 2, 0, 1.0), (11, 4, 0, 1.0),
                                        (21, 3, 0, 1.0), (5, 2, 1, 1.0), (7, 2, 1, 1.0), (5, 3, 1, 1.0), (9, 4, 2, 0.5)]:
        # use="dot": coefficients in the natural order (use="conv", the default, reverses them).
        c = savgol_coeffs(window, order, deriv=deriv, delta=delta, use="dot")
        coeffs.append({"window": window, "order": order, "deriv": deriv, "delta": delta, "coeffs": c.tolist()})
    filters = []
    for window, order, deriv, delta in [(11, 3, 0, 1.0), (21, 2, 0, 1.0), (15, 4, 1, float(x[1] - x[0])), (9, 2, 2, float(x[1] - x[0])), (5, 2, 0, 1.0)]:
        out = savgol_filter(y, window, order, deriv=deriv, delta=delta, mode="interp")
        filters.append({"window": window, "order": order, "deriv": deriv, "delta": delta, "mode": "interp", "output": out.tolist()})
    gauss = []
    for sigma in [0.8, 2.5, 6.0]:
        gauss.append({"sigma": sigma, "mode": "reflect", "truncate": 4.0, "output": gaussian_filter1d(y, sigma, mode="reflect", truncate=4.0).tolist()})
    doc = {
        "source": f"scipy {scipy.__version__} (numpy {np.__version__}, python {sys.version.split()[0]}): "
        "scipy.signal.savgol_coeffs(use='dot'), scipy.signal.savgol_filter(mode='interp'), "
        "scipy.ndimage.gaussian_filter1d(mode='reflect', truncate=4)",
        "scipy_version": scipy.__version__,
        "generator": "scripts/golden/make_golden.py",
        "input": {"x": x.tolist(), "y": y.tolist()},
        "savgol_coeffs": coeffs,
        "savgol_filter": filters,
        "gaussian_filter1d": gauss,
    }
    write(OUT, doc)
    prepare()


if __name__ == "__main__":
    main()
