"""Benchmark of the questions turned round (a plain script, not collected by pytest).

    python tests/bench/bench_inverse.py

1. heat_for_temperature on a sealed cabinet (10 branches): the allowed dissipation for a 55 °C
   board, and the heater holding the roof at 12 °C on a cold night, against the anchor of one
   solve_network of the same network measured in the same run.  Target: one answer costs at
   most 15 cold solves' time (measured about 6: a dozen solves, each warm-started from the
   last).
2. dew_point on 1e5 points against the anchor saturation_pressure on the same points (the
   Newton inversion's cost).  Target: at most 15 x (measured about 11).
3. insulation_thickness for one pipe against the anchor h_hcyl at one point.  Target: at most
   40 x (measured about 19: a bracketing root-finder over the insulated diameter, each step one
   correlation).

Times are process CPU times, the best of several repeats; only the ratios are targets.  The
cases are demo data of our own.
"""

from __future__ import annotations

import time

import numpy as np

import stillair
from stillair.network import clear_network_cache

from bench_network import cabinet


def best(function, repeats: int = 7) -> float:
    times = []
    for _ in range(repeats):
        start = time.process_time()
        function()
        times.append(time.process_time() - start)
    return min(times)


def main() -> int:
    branches, boundaries = cabinet()
    night = [["board", "Q", 5.0], ["ambient", "T", 2.0], ["room", "T", -10.0]]

    def solve_once():
        clear_network_cache()
        stillair.solve_network(branches, boundaries)

    anchor = best(solve_once)
    allowed = best(lambda: stillair.heat_for_temperature(branches, boundaries, "board", 55.0))
    heater = best(lambda: stillair.heat_for_temperature(branches, night, "board", 12.0, at="roof-in"))
    solves = stillair.heat_for_temperature(branches, boundaries, "board", 55.0).solves
    print(f"one solve_network (anchor)      {1e3 * anchor:8.2f} ms")
    print(f"allowed dissipation, 55 °C      {1e3 * allowed:8.2f} ms  = {allowed / anchor:5.1f} solves "
          f"({solves} warm-started solves)")
    print(f"night heater, roof at 12 °C     {1e3 * heater:8.2f} ms  = {heater / anchor:5.1f} solves")
    failures = [name for name, ratio in (("allowed", allowed / anchor), ("heater", heater / anchor)) if ratio > 15]

    rng = np.random.default_rng(1)
    t, rh = rng.uniform(-40.0, 80.0, 100_000), rng.uniform(0.05, 1.0, 100_000)
    anchor = best(lambda: stillair.saturation_pressure(t))
    dew = best(lambda: stillair.dew_point(t, rh))
    print(f"saturation_pressure, 1e5 points (anchor) {1e3 * anchor:8.2f} ms")
    print(f"dew_point, 1e5 points                    {1e3 * dew:8.2f} ms  = {dew / anchor:5.1f} x")
    failures += ["dew_point"] if dew / anchor > 15 else []

    anchor = best(lambda: stillair.h_hcyl(20.1, 25.0, 0.08))
    thickness = best(lambda: stillair.insulation_thickness(6.0, 25.0, 20.1, 0.035, 0.9, "hcyl", 0.0603))
    print(f"h_hcyl, one point (anchor)               {1e6 * anchor:8.1f} µs")
    print(f"insulation_thickness, one pipe           {1e6 * thickness:8.1f} µs  = {thickness / anchor:5.1f} x")
    failures += ["insulation_thickness"] if thickness / anchor > 40 else []
    print("targets met" if not failures else "targets missed: " + ", ".join(failures))
    return 1 if failures else 0


if __name__ == "__main__":
    raise SystemExit(main())
