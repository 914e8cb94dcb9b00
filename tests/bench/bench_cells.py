"""Benchmark: what the cell layer adds to an engine call (issue 21: at most 3 us).

    python tests/bench/bench_cells.py

For a scalar H_CAVITY and AIR_CONDUCTIVITY, ``callpath.evaluate`` with plain floats (as xlwings
and LibreOffice's extension pass a single cell) against the bare engine call with the same
values, timed alternately in small batches (process CPU time), best batch of each; the inputs
change from call to call so the gas-state cache does not answer.  Also the general coercion
(formulas-style 1x1 arrays) for comparison.  Reported: the load, us per call and the difference.
"""

from __future__ import annotations

import os
import time

import numpy as np

import stillair
from stillair.addin.cells.callpath import evaluate
from stillair.addin.cells.registry import BY_NAME

ROUNDS, BATCH = 30, 400


def alternate(*functions):
    best = [float("inf")] * len(functions)
    for _ in range(ROUNDS):
        for k, function in enumerate(functions):
            started = time.process_time()
            for i in range(BATCH):
                function(i)
            best[k] = min(best[k], (time.process_time() - started) / BATCH)
    return [b * 1e6 for b in best]


def main() -> None:
    print(f"load: {' '.join(f'{x:.2f}' for x in os.getloadavg())}")
    t = (15.0 + 1e-4 * np.arange(BATCH)).tolist()
    cavity, conductivity = BY_NAME["H_CAVITY"], BY_NAME["AIR_CONDUCTIVITY"]
    cases = {
        "H_CAVITY(t1, 5, 0.016, 1.2)": (
            lambda i: stillair.h_cavity(t[i], 5.0, 0.016, 1.2),
            lambda i: evaluate(cavity, t[i], 5.0, 0.016, 1.2),
            lambda i: evaluate(cavity, np.asarray([[t[i]]], dtype=object), 5.0, 0.016, 1.2)),
        "AIR_CONDUCTIVITY(t)": (
            lambda i: stillair.air_conductivity(t[i]),
            lambda i: evaluate(conductivity, t[i]),
            lambda i: evaluate(conductivity, np.asarray([[t[i]]], dtype=object))),
    }
    for label, functions in cases.items():
        engine, cell, general = alternate(*functions)
        print(f"{label:<30} engine {engine:6.1f} us, cell {cell:6.1f} us: the cell layer adds "
              f"{cell - engine:4.1f} us (target <= 3 us; general coercion {general - engine:4.1f} us)")


if __name__ == "__main__":
    main()
