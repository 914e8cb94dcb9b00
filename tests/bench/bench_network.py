"""Benchmark of stillair.solve_network (a plain script, not collected by pytest).

    python tests/bench/bench_network.py

1. A 10-branch network (a sealed cabinet) and a 100-branch chain: best and median solve time,
   cache bypassed, with iterations and property evaluations.  Target (issue 11): 10 branches
   under 2 ms.
2. The wall chain (a double-glazed wall: inside convection and radiation, two panes, a cavity
   with radiation across it, outside convection and radiation) solved by stillair and by the way
   it is done by hand: scipy.optimize.fsolve on the same node balances with every gas property
   from CoolProp's PropsSI at the film temperature and the same published correlations (called
   as the bare formulas, without any registry).  Target: stillair at least 10x faster.  The two
   answers are compared (they differ only by the property tables' interpolation, < 1e-6).

Times are process CPU times (time.process_time), the best of several repeats, so that other work
on a shared machine disturbs them as little as possible; the median is shown beside the best.
The networks are invented demo data.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

import numpy as np

import stillair
from stillair.network import clear_network_cache

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from test_network_sparse import plate_grid  # noqa: E402  (the same invented grid as the test)


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


# ---- the wall chain ---------------------------------------------------------------------------

HEIGHT, GAP, GLASS, K_GLASS, EPS = 1.2, 0.016, 0.004, 1.0, 0.84
T_ROOM, T_OUT = 20.0, 0.0


def wall_chain():
    """1 m² of a double-glazed wall: room - s1 - s2 - cavity - s3 - s4 - outdoors."""
    branches = [
        ["in-conv", "s1", "room", "vplate", HEIGHT, 1.0, None, None, None, "churchill-chu"],
        ["in-rad", "s1", "room", "radiation", EPS, None, 1.0],
        ["pane-1", "s1", "s2", "conduction", GLASS, K_GLASS, 1.0],
        ["gap", "s2", "s3", "cavity", GAP, HEIGHT, 1.0, 90, None, "elsherbiny"],
        ["gap-rad", "s2", "s3", "radiation", EPS, EPS, 1.0],
        ["pane-2", "s3", "s4", "conduction", GLASS, K_GLASS, 1.0],
        ["out-conv", "s4", "outdoor", "vplate", HEIGHT, 1.0, None, None, None, "churchill-chu"],
        ["out-rad", "s4", "outdoor", "radiation", EPS, None, 1.0],
    ]
    return branches, [["room", "T", T_ROOM], ["outdoor", "T", T_OUT]]


def wall_chain_by_hand():
    """The same wall solved the usual way: fsolve, PropsSI properties at each film temperature,
    the bare correlation formulas.  Returns the heat flow through the wall (W)."""
    from CoolProp.CoolProp import PropsSI
    from scipy.optimize import fsolve

    from stillair.correlations import CORRELATIONS
    from stillair.radiation import SIGMA

    vertical_plate = CORRELATIONS[("vplate", "churchill-chu")].function
    cavity = CORRELATIONS[("cavity", "elsherbiny")].function
    g = 9.80665

    def film(t1, t2):
        t = 0.5 * (t1 + t2) + 273.15
        k = PropsSI("conductivity", "T", t, "P", 101325.0, "Air")
        mu = PropsSI("viscosity", "T", t, "P", 101325.0, "Air")
        rho = PropsSI("Dmass", "T", t, "P", 101325.0, "Air")
        cp = PropsSI("Cpmass", "T", t, "P", 101325.0, "Air")
        beta = PropsSI("isobaric_expansion_coefficient", "T", t, "P", 101325.0, "Air")
        nu, alpha = mu / rho, k / (rho * cp)
        return k, nu, alpha, nu / alpha, beta

    def plate_q(ts, tf):
        k, nu, alpha, pr, beta = film(ts, tf)
        ra = g * beta * abs(ts - tf) * HEIGHT ** 3 / (nu * alpha)
        return float(vertical_plate(np.array([ra]), np.array([pr]))[0]) * k / HEIGHT * (ts - tf)

    def cavity_q(t1, t2):
        k, nu, alpha, pr, beta = film(t1, t2)
        ra = g * beta * abs(t1 - t2) * GAP ** 3 / (nu * alpha)
        nu = cavity(np.array([ra]), np.array([pr]), np.array([HEIGHT / GAP]), np.array([90.0]))[0]
        return max(1.0, float(nu)) * k / GAP * (t1 - t2)

    def radiation(t1, t2, factor):
        return factor * SIGMA * ((t1 + 273.15) ** 4 - (t2 + 273.15) ** 4)

    parallel = 1.0 / (1.0 / EPS + 1.0 / EPS - 1.0)

    def balances(t):
        s1, s2, s3, s4 = t
        inside = plate_q(s1, T_ROOM) + radiation(s1, T_ROOM, EPS)
        pane1 = K_GLASS / GLASS * (s1 - s2)
        across = cavity_q(s2, s3) + radiation(s2, s3, parallel)
        pane2 = K_GLASS / GLASS * (s3 - s4)
        outside = plate_q(s4, T_OUT) + radiation(s4, T_OUT, EPS)
        return [-inside - pane1, pane1 - across, across - pane2, pane2 - outside]

    start = np.linspace(T_ROOM, T_OUT, 6)[1:-1]
    solution = fsolve(balances, start, xtol=1e-12)
    return K_GLASS / GLASS * (solution[0] - solution[1])


def large_networks():
    """Targets (issue 21): 10,000 nodes under 2 s; close to linear from 1,000 to 10,000 nodes;
    100 nodes under 10 ms of CPU however many BLAS threads the machine offers."""
    times = {}
    for side, repeat in ((10, 10), (32, 3), (100, 2)):
        branches, boundaries = plate_grid(side)
        stillair.solve_network(branches, boundaries, use_cache=False)
        best, median, result = timed(lambda: stillair.solve_network(branches, boundaries, use_cache=False),
                                     repeat)
        times[side * side] = best
        print(f"plate grid {side * side:>6} nodes, {len(branches):>6} branches: best {best * 1e3:8.1f} ms "
              f"CPU (median {median * 1e3:.1f}); {result.iterations} iterations")
    print(f"10,000 against 1,024 nodes: {times[10000] / times[1024]:.1f}x the time for "
          f"{10000 / 1024:.1f}x the nodes (linear would be {10000 / 1024:.1f}x)")


def timed(function, repeat, inner=1):
    times = []
    for _ in range(repeat):
        start = time.process_time()
        for _ in range(inner):
            value = function()
        times.append((time.process_time() - start) / inner)
    return min(times), statistics.median(times), value


def main():
    for label, (branches, boundaries), target, repeat in (
            ("10-branch cabinet", cabinet(), 2e-3, 30),
            ("100-branch glazing chain", glazing_wall(), None, 10)):
        stillair.solve_network(branches, boundaries, use_cache=False)  # warm-up (property tables)
        best, median, result = timed(lambda: stillair.solve_network(branches, boundaries, use_cache=False),
                                     repeat, inner=10)
        goal = f" (target < {target * 1e3:.0f} ms)" if target else ""
        print(f"{label}: {len(result.heat)} branches, best {best * 1e3:.2f} ms, median "
              f"{median * 1e3:.2f} ms{goal}; {result.iterations} iterations, "
              f"{result.property_evaluations} property evaluations, solver {result.solver}")
        clear_network_cache()
        stillair.solve_network(branches, boundaries)
        hit, _, _ = timed(lambda: stillair.solve_network(branches, boundaries), repeat, inner=10)
        print(f"{label}: cache hit {hit * 1e6:.0f} us")

    branches, boundaries = wall_chain()
    stillair.solve_network(branches, boundaries, use_cache=False)
    ours, ours_median, result = timed(lambda: stillair.solve_network(branches, boundaries, use_cache=False),
                                      30, inner=10)
    wall_chain_by_hand()  # warm-up (CoolProp loads its fluid)
    hand, hand_median, q_hand = timed(wall_chain_by_hand, 5)
    q_ours = result.heat["pane-1"]
    print(f"wall chain, stillair: best {ours * 1e3:.2f} ms (median {ours_median * 1e3:.2f} ms), "
          f"q = {q_ours:.6f} W")
    print(f"wall chain, fsolve + PropsSI: best {hand * 1e3:.2f} ms (median {hand_median * 1e3:.2f} ms), "
          f"q = {q_hand:.6f} W")
    print(f"wall chain: stillair {hand / ours:.0f}x faster (target >= 10x); answers differ by "
          f"{abs(q_ours - q_hand) / abs(q_hand):.1e} (relative)")
    large_networks()


if __name__ == "__main__":
    main()
