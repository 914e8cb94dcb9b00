"""Benchmark of stillair.solve_transient (a plain script, not collected by pytest).

    python tests/bench/bench_transient.py

A sealed outdoor cabinet through a day (the cabinet-day template's network at its default
inputs, stillair.addin.templates.cabinet_day.day_network: 7 nodes, 8 branches, 5 with a
capacity; sun and ambient as hourly series) solved at 5-minute output steps (289 output times)
from the steady start, against an anchor measured in the same run: one steady solve_network of
the same network at peak sun.  Target (issue 23): the day under 0.5 s.  Also shown: the same day
as a periodic day (initial="periodic"; the template's case), which integrates it twice or more.

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


def timed(call, repeats=REPEATS):
    times = []
    for _ in range(repeats):
        clear_network_cache()
        start = time.process_time()
        result = call()
        times.append(time.process_time() - start)
    return min(times), statistics.median(times), result


def main() -> None:
    from stillair.addin.templates.cabinet_day import day_network

    day = day_network()
    times = np.arange(0.0, 86400.0 + 1.0, 300.0)
    steady_best, steady_median, _ = timed(lambda: stillair.solve_network(
        day.branches, day.peak_boundaries, pressure=day.pressure, use_cache=False))
    best, median, result = timed(lambda: stillair.solve_transient(
        day.branches, day.boundaries, day.capacities, times, series=day.series, pressure=day.pressure,
        use_cache=False))
    periodic_best, periodic_median, periodic = timed(lambda: stillair.solve_transient(
        day.branches, day.boundaries, day.capacities, times, series=day.series, pressure=day.pressure,
        initial="periodic", use_cache=False))
    peak, when = result.peak["air_in"]
    print(f"anchor: one steady solve_network of the cabinet   best {steady_best * 1e3:8.2f} ms   "
          f"median {steady_median * 1e3:8.2f} ms")
    print(f"cabinet day, {times.size} output times (5 min)      best {best * 1e3:8.2f} ms   "
          f"median {median * 1e3:8.2f} ms   ratio {best / steady_best:6.0f}x   "
          f"target < 500 ms: {'met' if best < 0.5 else 'NOT met'}")
    print(f"  {result.method}, rtol {result.rtol:g}, atol {result.atol:g} K: {result.steps} evaluations, "
          f"{result.jacobians} Jacobians; internal air peak {peak:.2f} °C at {when / 3600:.2f} h")
    print(f"the same day as a periodic day ({periodic.cycles} cycles)  best {periodic_best * 1e3:8.2f} ms   "
          f"median {periodic_median * 1e3:8.2f} ms   (the template's case)")


if __name__ == "__main__":
    main()
