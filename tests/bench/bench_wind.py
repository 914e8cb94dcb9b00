"""What the wind costs (plain script, no asserts; ratios against the still-air call of the same run).

    python tests/bench/bench_wind.py

1. A scalar ``h_vplate`` with ``wind=`` against the same call in still air.  Target: <= 6x (the
   forced part is a second property look-up, a registry call and the cube sum).
2. ``h_hcyl`` over 1e5 points with a wind against still air.  Target: <= 3x.
3. ``h_vplate(..., wind=0)`` against the call without the keyword: the still-air path itself.
   Target: <= 1.1x.
4. A network of a sealed box (four walls, a roof, radiation) with a wind column against the same
   network in still air (``use_cache=False``).  Target: <= 2x.

The two sides are timed alternately in small batches and the best batch of each is kept, so load
from other processes on the machine affects both alike.
"""

from __future__ import annotations

import time

import numpy as np

import stillair

ROUNDS = 7


def best(function, repeat):
    started = time.perf_counter()
    for _ in range(repeat):
        function()
    return (time.perf_counter() - started) / repeat


def alternate(first, second, repeat):
    a, b = [], []
    for _ in range(ROUNDS):
        a.append(best(first, repeat))
        b.append(best(second, repeat))
    return min(a), min(b)


def report(label, still, windy, target):
    print(f"{label}: still {still * 1e6:9.1f} us, wind {windy * 1e6:9.1f} us -> {windy / still:5.2f}x "
          f"(target <= {target}x)")


def main():
    still, windy = alternate(lambda: stillair.h_vplate(45.0, 12.0, 0.8),
                             lambda: stillair.h_vplate(45.0, 12.0, 0.8, wind=3.0, wind_length=1.2), 200)
    report("scalar h_vplate", still, windy, 6)

    rng = np.random.default_rng(3)
    ts, wind = rng.uniform(20.0, 90.0, 100_000), rng.uniform(0.5, 8.0, 100_000)
    still, windy = alternate(lambda: stillair.h_hcyl(ts, 10.0, 0.06), lambda: stillair.h_hcyl(ts, 10.0, 0.06, wind=wind), 3)
    report("h_hcyl over 1e5 points", still, windy, 3)

    still, zero = alternate(lambda: stillair.h_vplate(45.0, 12.0, 0.8),
                            lambda: stillair.h_vplate(45.0, 12.0, 0.8, wind=0.0), 200)
    report("scalar h_vplate, wind=0", still, zero, 1.1)

    def box(speed):
        walls = [[f"wall{k}", "skin", "out", "vplate", 1.8, 0.7, speed, 0.7, None, None] for k in range(4)]
        return walls + [
            ["roof", "top", "out", "hplate", 0.2, 0.5, "up", speed, 0.7, None],
            ["lid", "skin", "top", "conduction", 0.002, 50.0, 0.5, None, None, None],
            ["sky", "skin", "out", "radiation", 0.9, None, 2.8, None, None, None],
            ["load", "in", "skin", "resistance", 0.05, None, None, None, None, None]]

    bounds = [["in", "Q", 250.0], ["out", "T", 25.0]]
    still, windy = alternate(lambda: stillair.solve_network(box(None), bounds, use_cache=False),
                             lambda: stillair.solve_network(box(2.0), bounds, use_cache=False), 10)
    report("sealed-box network", still, windy, 2)


if __name__ == "__main__":
    main()
