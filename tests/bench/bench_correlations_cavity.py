"""Throughput of the cavity correlations on 1,000,000-element arrays (plain script, no asserts).

    python tests/bench/bench_correlations_cavity.py

Prints evaluations per second through stillair.nusselt (argument checks, validity notes, floor
included) per method, inside each method's range, then for "auto" on in-range vertical glazing
cases and on a mixed sweep of every orientation where about a third of the elements fall back
with a note.  Target: > 1e6 evaluations/s.
"""

from __future__ import annotations

import time

import numpy as np

import stillair

N = 1_000_000
REPEATS = 3
rng = np.random.default_rng(20240601)


def uniform(low, high):
    return rng.uniform(low, high, N)


def log_uniform(low, high):
    return 10.0 ** rng.uniform(np.log10(low), np.log10(high), N)


AIR = np.full(N, 0.71)
CASES = {  # method -> inputs inside its published range
    "catton": dict(ra=log_uniform(1e3, 1e10), pr=AIR, aspect=uniform(1, 10), tilt=uniform(65, 180)),
    "macgregor-emery": dict(ra=log_uniform(1e4, 1e7), pr=uniform(1, 20), aspect=uniform(10, 40),
                            tilt=uniform(70, 180)),
    "elsherbiny": dict(ra=log_uniform(1e2, 2e7), pr=AIR, aspect=uniform(5, 110), tilt=uniform(70, 180)),
    "wright": dict(ra=log_uniform(1, 1e6), pr=AIR, aspect=uniform(20, 200), tilt=uniform(70, 180)),
    "hollands": dict(ra=log_uniform(1, 1e5), pr=AIR, aspect=uniform(12, 100), tilt=uniform(0, 75)),
    "globe-dropkin": dict(ra=log_uniform(3e5, 7e9), pr=AIR, aspect=uniform(1, 100), tilt=np.zeros(N)),
    "en673": dict(ra=log_uniform(1, 1e7), pr=AIR, aspect=uniform(20, 200),
                  tilt=rng.choice([0.0, 45.0, 90.0], N)),
    "conduction": dict(ra=log_uniform(1e-2, 1e3), pr=AIR, aspect=uniform(1, 100), tilt=uniform(0, 180)),
    "auto (vertical glazing)": dict(ra=log_uniform(1e3, 1e6), pr=AIR, aspect=uniform(20, 200),
                                    tilt=np.full(N, 90.0)),
    "auto (mixed sweep)": dict(ra=log_uniform(1e1, 1e9), pr=AIR, aspect=log_uniform(1, 300),
                               tilt=uniform(0, 180)),
}


def best_time(method, inputs):
    best = np.inf
    for _ in range(REPEATS):
        start = time.perf_counter()
        result = stillair.nusselt("cavity", method, **inputs)
        best = min(best, time.perf_counter() - start)
    return best, result


def main():
    print(f"cavity correlations, {N:,} elements, best of {REPEATS}")
    print(f"{'method':28s} {'evals/s':>12s} {'out of range':>13s}")
    for label, inputs in CASES.items():
        method = label.split(" ")[0]
        seconds, result = best_time(method, inputs)
        outside = np.count_nonzero(~result.in_range) / N
        print(f"{label:28s} {N / seconds:12.3e} {outside:12.1%}")
    methods = stillair.cavity_method(**CASES["auto (mixed sweep)"])
    names, counts = np.unique(methods.astype(str), return_counts=True)
    print("auto choices in the mixed sweep: " + ", ".join(f"{n} {c / N:.1%}" for n, c in zip(names, counts)))


if __name__ == "__main__":
    main()
