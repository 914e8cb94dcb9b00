"""A 50-point fin-count sweep of the plate-fin heat-sink model (plain script, no asserts).

    python tests/bench/bench_heatsink.py

Evaluates stillair.heatsink_q for fin counts 2..51 in one vectorised call (channel h with
film-temperature properties, fin efficiencies, exposed base, envelope radiation) and, for
comparison, 50 scalar calls, then one heatsink_tbase solve (brentq), given as a multiple of
one scalar heatsink_q call measured in the same run (how many model evaluations a solve
costs).  Target: the sweep in under 50 ms.  Prints the best time of several repeats (after one warm-up call).
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


_STEP = iter(range(10**9))


def one_call():
    # a new base temperature each call, as each brentq step has (no cache can answer)
    return stillair.heatsink_q(52.98 + 1e-6 * next(_STEP), fin_count=20, **SINK)


def interleaved(solve_once, call_once, rounds=10, calls=10):
    """Mean times of a solve and of one call, taken in alternation so that the load of a busy
    machine weighs on both alike (their ratio is the figure to compare between runs)."""
    solve_once(), call_once()
    solving = calling = 0.0
    for _ in range(rounds):
        start = time.perf_counter()
        solve_once()
        solving += time.perf_counter() - start
        start = time.perf_counter()
        for _ in range(calls):
            call_once()
        calling += time.perf_counter() - start
    return solving / rounds, calling / (rounds * calls)


def main():
    q = sweep()
    best = int(np.argmax(q))
    print(f"sweep of {COUNTS.size} fin counts, one vectorised call: {best_of(sweep) * 1e3:8.2f} ms "
          f"(target < 50 ms); best count {COUNTS[best]} rejects {q[best]:.1f} W at 70 degC")
    print(f"the same sweep as {COUNTS.size} scalar calls:        {best_of(scalar_sweep, 5) * 1e3:8.2f} ms")
    one_solve, one_model = interleaved(solve, one_call)
    print(f"one heatsink_tbase solve (brentq):            {one_solve * 1e3:8.2f} ms "
          f"-> {solve():.2f} degC for 30 W")
    print(f"  = {one_solve / one_model:.1f} x one scalar heatsink_q call near the root "
          f"({one_model * 1e3:.2f} ms, the anchor, timed in alternation with the solves)")

if __name__ == "__main__":
    main()
