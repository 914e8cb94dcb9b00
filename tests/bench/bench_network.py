"""Benchmark of stillair.solve_network (a plain script, not collected by pytest).

    python tests/bench/bench_network.py

Prints the median solve time of a 10-branch and a 100-branch network (cache bypassed), the
iterations and property evaluations per solve, and the time of a cache hit.  Targets (issue 3):
10 branches < 5 ms, 100 branches < 100 ms.  The networks are invented demo data.
"""

from __future__ import annotations

import statistics
import time

import stillair
from stillair.network import clear_network_cache


def cabinet():
    """A sealed cabinet (10 branches): a dissipating board, inside air, walls, roof, ambient."""
    branches = [
        ["board-air", "board", "inside", "vplate", 0.3, 0.12, None, None, None, None],
        ["board-wall", "board", "wall-in", "radiation", 0.9, 0.9, 0.12, None, None, None],
        ["air-wall", "wall-in", "inside", "vplate", 0.6, 1.2, None, None, None, None],
        ["air-roof", "roof-in", "inside", "hplate", 0.15, 0.24, "down", None, None, None],
        ["wall", "wall-in", "wall-out", "conduction", 0.002, 16.0, 1.2, None, None, None],
        ["roof", "roof-in", "roof-out", "conduction", 0.002, 16.0, 0.24, None, None, None],
        ["wall-conv", "wall-out", "ambient", "vplate", 0.6, 1.2, None, None, None, None],
        ["roof-conv", "roof-out", "ambient", "hplate", 0.15, 0.24, "up", None, None, None],
        ["wall-rad", "wall-out", "room", "radiation", 0.85, None, 1.2, None, None, None],
        ["roof-rad", "roof-out", "room", "radiation", 0.85, None, 0.24, None, None, None],
    ]
    boundaries = [["board", "Q", 60.0], ["ambient", "T", 25.0], ["room", "T", 25.0]]
    return branches, boundaries


def glazing_wall(panes: int = 20):
    """A long chain (100 branches): 20 glazing-like cells in series, each conduction + cavity +
    radiation + two films to a shared guard node, between a warm and a cold room."""
    branches = []
    previous = "warm"
    for k in range(panes):
        a, b = f"p{k}a", f"p{k}b"
        branches += [
            [f"film{k}", previous, a, "film", 8.0, 1.0],
            [f"glass{k}", a, b, "conduction", 0.004, 1.0, 1.0],
            [f"gap{k}", b, f"p{k}c", "cavity", 0.012, 1.0, 1.0, 90, None],
            [f"rad{k}", b, f"p{k}c", "radiation", 0.84, 0.84, 1.0],
            [f"edge{k}", f"p{k}c", "guard", "resistance", 50.0],
        ]
        previous = f"p{k}c"
    boundaries = [["warm", "T", 20.0], ["guard", "T", 0.0], [previous, "T", -10.0]]
    return branches, boundaries


def median_time(branches, boundaries, repeat, use_cache=False):
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        result = stillair.solve_network(branches, boundaries, use_cache=use_cache)
        times.append(time.perf_counter() - start)
    return statistics.median(times), result


def main():
    for label, (branches, boundaries), target, repeat in (
            ("10-branch cabinet", cabinet(), 5e-3, 200),
            ("100-branch glazing chain", glazing_wall(), 100e-3, 30)):
        stillair.solve_network(branches, boundaries, use_cache=False)  # warm-up (property tables)
        median, result = median_time(branches, boundaries, repeat)
        print(f"{label}: {len(result.heat)} branches, median {median * 1e3:.2f} ms "
              f"(target < {target * 1e3:.0f} ms), {result.iterations} iterations, "
              f"{result.property_evaluations} property evaluations, solver {result.solver}, "
              f"residual {result.residual:.2e} W")
        clear_network_cache()
        stillair.solve_network(branches, boundaries)
        hit, _ = median_time(branches, boundaries, repeat, use_cache=True)
        print(f"{label}: cache hit median {hit * 1e6:.0f} us")


if __name__ == "__main__":
    main()
