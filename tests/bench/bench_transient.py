"""Benchmark of stillair.solve_transient (a plain script, not collected by pytest).

    python tests/bench/bench_transient.py

A sealed outdoor cabinet through a day (the cabinet-day template's network at its default
inputs: 7 nodes, 8 branches, 5 with a capacity; sun and ambient as hourly series) solved at
5-minute output steps (289 output times), against an anchor measured in the same run: one steady
solve_network of the same network at peak sun.  Target (issue 23): the day under 0.5 s.

Times are process CPU times (time.process_time), the best of several repeats (the median beside
it), caches bypassed.  Printed: both times, their ratio, the integrator's evaluations and the
default tolerances.
"""

from __future__ import annotations

import statistics
import time

import numpy as np

import stillair
from stillair.network import clear_network_cache

REPEATS = 5


def day_network():
    """The cabinet's day (until the template module provides it): hourly series, wall halves."""
    from types import SimpleNamespace

    from stillair.addin.templates.sealed_cabinet import branch_rows

    height, width, depth = 1.6, 0.8, 0.6
    side, top = 2 * (width + depth) * height, width * depth
    branches = branch_rows(height=height, side_area=side, top_area=top, top_length=top / (2 * (width + depth)),
                           wall_thickness=0.002, wall_k=45.0, emissivity=0.9, method=None)
    hours = np.arange(25)
    sun = np.where((hours > 6) & (hours < 18), np.sin(np.pi * (hours - 6) / 12), 0.0)
    ambient = 26.0 + 6.0 * np.cos(2 * np.pi * (hours - 15) / 24)
    series = [row for h, s, a in zip(hours, sun, ambient) for row in (
        ["sun_top", h * 3600.0, 0.3 * 900.0 * s * top], ["sun_side", h * 3600.0, 0.3 * 200.0 * s * side],
        ["ambient", h * 3600.0, a], ["sky", h * 3600.0, a - 12.0])]
    boundaries = [["air_in", "Q", 150.0], ["side_out", "Q", "sun_side"], ["top_out", "Q", "sun_top"],
                  ["ambient", "T", "ambient"], ["sky", "T", "sky"]]
    peak = [["air_in", "Q", 150.0], ["side_out", "Q", 0.3 * 200.0 * side], ["top_out", "Q", 0.3 * 900.0 * top],
            ["ambient", "T", 32.0], ["sky", "T", 20.0]]
    wall = 7850.0 * 470.0 * 0.002 / 2       # half a 2 mm steel skin on each face, J/(m²·K)
    capacities = [["air_in", 40_000.0], ["side_in", wall * side], ["side_out", wall * side],
                  ["top_in", wall * top], ["top_out", wall * top]]
    return SimpleNamespace(branches=branches, boundaries=boundaries, peak_boundaries=peak,
                           capacities=capacities, series=series)


def timed(call, repeats=REPEATS):
    times = []
    for _ in range(repeats):
        clear_network_cache()
        start = time.process_time()
        result = call()
        times.append(time.process_time() - start)
    return min(times), statistics.median(times), result


def main() -> None:
    day = day_network()
    times = np.arange(0.0, 86400.0 + 1.0, 300.0)
    steady_best, steady_median, _ = timed(lambda: stillair.solve_network(
        day.branches, day.peak_boundaries, use_cache=False))
    best, median, result = timed(lambda: stillair.solve_transient(
        day.branches, day.boundaries, day.capacities, times, series=day.series, use_cache=False))
    peak, when = result.peak["air_in"]
    print(f"anchor: one steady solve_network of the cabinet   best {steady_best * 1e3:8.2f} ms   "
          f"median {steady_median * 1e3:8.2f} ms")
    print(f"cabinet day, {times.size} output times (5 min)      best {best * 1e3:8.2f} ms   "
          f"median {median * 1e3:8.2f} ms   ratio {best / steady_best:6.0f}x   "
          f"target < 500 ms: {'met' if best < 0.5 else 'NOT met'}")
    print(f"  {result.method}, rtol {result.rtol:g}, atol {result.atol:g} K: {result.steps} evaluations, "
          f"{result.jacobians} Jacobians; internal air peak {peak:.2f} °C at {when / 3600:.2f} h")


if __name__ == "__main__":
    main()
