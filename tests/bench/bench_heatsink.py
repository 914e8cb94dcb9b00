"""A 50-point fin-count sweep of the plate-fin heat-sink model (plain script, no asserts).

    python tests/bench/bench_heatsink.py

Evaluates stillair.heatsink_q for fin counts 2..51 in one vectorised call (channel h with
film-temperature properties, fin efficiencies, exposed base, envelope radiation) and, for
comparison, 50 scalar calls, then one heatsink_tbase solve (brentq).  Target: the sweep in
under 50 ms.  Prints the best time of several repeats (after one warm-up call).
"""

from __future__ import annotations

import time

import numpy as np

import stillair

REPEATS = 20
SINK = dict(t_ambient=25.0, base_width=0.15, fin_height=0.04, fin_length=0.12, fin_thickness=0.0015,
            conductivity=200.0, emissivity=0.85)
COUNTS = np.arange(2, 52)


def best_of(function, repeats=REPEATS):
    function()  # warm-up: gas tables loaded, caches filled
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        function()
        times.append(time.perf_counter() - start)
    return min(times)


def sweep():
    return stillair.heatsink_q(70.0, fin_count=COUNTS, **SINK)


def scalar_sweep():
    return [stillair.heatsink_q(70.0, fin_count=int(n), **SINK) for n in COUNTS]


def solve():
    return stillair.heatsink_tbase(30.0, fin_count=20, **SINK)


def main():
    q = sweep()
    best = int(np.argmax(q))
    print(f"sweep of {COUNTS.size} fin counts, one vectorised call: {best_of(sweep) * 1e3:8.2f} ms "
          f"(target < 50 ms); best count {COUNTS[best]} rejects {q[best]:.1f} W at 70 degC")
    print(f"the same sweep as {COUNTS.size} scalar calls:        {best_of(scalar_sweep, 5) * 1e3:8.2f} ms")
    print(f"one heatsink_tbase solve (brentq):            {best_of(solve, 5) * 1e3:8.2f} ms "
          f"-> {solve():.2f} degC for 30 W")


if __name__ == "__main__":
    main()
