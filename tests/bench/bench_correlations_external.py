"""Evaluations per second of the external natural-convection correlations.

Plain script (not collected by pytest): ``python tests/bench/bench_correlations_external.py``.
Each geometry is evaluated through the public engine function ("auto" and, where it differs,
an explicit method) on 1,000,000-element arrays; target > 1e6 evaluations per second.  The
in-range runs measure the normal path; the out-of-range run measures the note building.
"""

from __future__ import annotations

import time

import numpy as np

import stillair
from stillair.correlations import nusselt

N = 1_000_000
TARGET = 1e6
rng = np.random.default_rng(1)


def log_uniform(low, high, n=N):
    return 10.0 ** rng.uniform(np.log10(low), np.log10(high), n)


PR = rng.uniform(0.7, 7.0, N)
CASES = [
    ("vplate auto", lambda: stillair.nu_vplate(RA_PLATE, PR)),
    ("vplate mcadams", lambda: stillair.nu_vplate(RA_MC, PR, method="mcadams")),
    ("hplate hot-up auto", lambda: stillair.nu_hplate(RA_HP, PR, "hot-up")),
    ("hplate hot-down auto", lambda: stillair.nu_hplate(RA_RH, PR, "hot-down")),
    ("hplate hot-up mcadams", lambda: stillair.nu_hplate(RA_MCH, PR, "hot-up", method="mcadams")),
    ("tplate hot-down auto", lambda: stillair.nu_tplate(RA_HP, PR, TILT60, "hot-down")),
    ("tplate hot-up auto", lambda: stillair.nu_tplate(RA_HP, PR, TILT90, "hot-up")),
    ("hcyl auto (both methods)", lambda: stillair.nu_hcyl(RA_CYL, PR)),
    ("hcyl morgan", lambda: stillair.nu_hcyl(RA_CYL, PR, method="morgan")),
    ("sphere auto", lambda: stillair.nu_sphere(RA_PLATE / 100.0, PR)),
    ("vcyl auto (both methods)", lambda: stillair.nu_vcyl(RA_VC, PR, SLENDER)),
    ("vplate, every value out of range (notes)",
     lambda: nusselt("vplate", "auto", ra=RA_OUT, pr=PR)),
]
RA_PLATE = log_uniform(1e0, 1e11)
RA_OUT = log_uniform(2e12, 1e16)
RA_MC = log_uniform(1e4, 1e13)
RA_HP = log_uniform(1e4, 1e11)
RA_RH = log_uniform(1e4, 1e9)
RA_MCH = log_uniform(1e5 / 64, 3e10 / 64)
RA_CYL = log_uniform(1e-9, 1e11)
RA_VC = log_uniform(2e4, 1e9)
SLENDER = rng.uniform(0.5, 50.0, N)
TILT60 = rng.uniform(0.0, 60.0, N)
TILT90 = rng.uniform(0.0, 90.0, N)


def rate(function, repeats=3):
    function()  # warm-up
    best = min(_timed(function) for _ in range(repeats))
    return N / best


def _timed(function):
    start = time.perf_counter()
    function()
    return time.perf_counter() - start


def main():
    print(f"{'case':45s} {'evaluations/s':>14s}  target {TARGET:.0e}")
    for name, function in CASES:
        value = rate(function)
        flag = "ok" if value > TARGET else "BELOW TARGET"
        print(f"{name:45s} {value:14.3e}  {flag}")


if __name__ == "__main__":
    main()
