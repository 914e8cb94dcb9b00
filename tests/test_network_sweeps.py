"""Convergence sweeps: ordinary cavity networks solve for every boundary temperature and size.

A node balance whose convection coefficient jumps where "auto" passes from one correlation to the
next can have no root at all (h dT falls across the step); with a continuous "auto" every one of
these well-posed networks has a solution, and the solver must find it.  Each case must converge
and balance every node (energy conservation), and the cavity must carry heat from warm to cold
(second law).  The networks are scenarios of our own (demo data).
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest

from stillair.network import NetworkConvergenceError, solve_network

pytestmark = pytest.mark.slow  # long sweeps of network sizes and tilts


def assert_solved(result):
    """The solver's acceptance, checked from the reported values: every node balanced to 1e-9 of
    the heat through it, or settled (its imbalance would move it less than 1e-11 K through its
    weakest branch; 2e-11 here, the branch's secant conductance standing in for its slope)."""
    assert result.residual <= result.tolerance
    for node, imbalance in result.balance().items():
        joined = [r for r in result.branches.values() if node in (r.source, r.target)]
        through = (sum(abs(r.heat) for r in joined) + abs(result.heat_inputs.get(node, 0.0))) / 2
        weakest = min(1.0 / r.R for r in joined)
        assert abs(imbalance) <= max(1e-9 * through * 1.000001, 2e-11 * weakest), (node, imbalance)


def wall_with_cavity(gap, height, t_in, t_out, tilt=90.0, radiation=True):
    """Room - inside film - board - cavity (and radiation) - board - outside film - outdoors, 1 m²."""
    branches = [
        ["in-film", "room", "s1", "film", 7.7, 1.0],
        ["board-1", "s1", "c1", "conduction", 0.0125, 0.21, 1.0],
        ["gap", "c1", "c2", "cavity", gap, height, 1.0, tilt, None],
        ["board-2", "c2", "s2", "conduction", 0.0125, 0.21, 1.0],
        ["out-film", "s2", "outdoor", "film", 25.0, 1.0],
    ]
    if radiation:
        branches.append(["gap-rad", "c1", "c2", "radiation", 0.9, 0.9, 1.0])
    return branches, [["room", "T", t_in], ["outdoor", "T", t_out]]


OUTDOOR = np.arange(-20.0, 20.0, 0.5)   # °C, the room at 20 °C


def solves_for_every_outdoor_temperature(gap, height, tilt, radiation):
    unsolved = []
    for t_out in OUTDOOR:
        branches, boundaries = wall_with_cavity(gap, height, 20.0, float(t_out), tilt=tilt, radiation=radiation)
        try:
            result = solve_network(branches, boundaries, use_cache=False)
        except NetworkConvergenceError:
            unsolved.append(float(t_out))
            continue
        assert_solved(result)
        assert result.heat["gap"] > 0
    assert not unsolved, f"no solution for outdoor temperatures {unsolved}"


# a wide vertical cavity behind a surface film: gaps 20-200 mm, heights 0.5-3 m
@pytest.mark.parametrize("gap, height, radiation", list(itertools.product(
    (0.02, 0.05, 0.1, 0.2), (0.5, 1.0, 3.0), (False, True))))
def test_wide_vertical_cavity_behind_a_film_solves(gap, height, radiation):
    solves_for_every_outdoor_temperature(gap, height, 90.0, radiation)


# tilted layers (roofs, sloped glazing), heated from below (tilt < 90) and from above (> 90)
@pytest.mark.parametrize("gap, tilt", list(itertools.product(
    (0.016, 0.05), (0.0, 30.0, 60.0, 70.0, 75.0, 89.99, 100.0, 135.0, 170.0))))
def test_tilted_cavity_solves(gap, tilt):
    solves_for_every_outdoor_temperature(gap, 1.5, tilt, False)


# a small cavity at a small temperature difference: gaps 6-25 mm, 0.001-30 K across the wall
@pytest.mark.parametrize("gap", (0.006, 0.01, 0.013, 0.016, 0.02, 0.025))
def test_small_cavity_at_a_small_difference_solves(gap):
    for delta_t in np.geomspace(0.001, 30.0, 40):
        branches, boundaries = wall_with_cavity(gap, 1.0, 10.0 + delta_t / 2, 10.0 - delta_t / 2,
                                                radiation=False)
        result = solve_network(branches, boundaries, use_cache=False)
        assert_solved(result)
        assert result.heat["gap"] > 0


# a dissipating surface in still air and radiating to a room, from a trickle to a hot surface
@pytest.mark.parametrize("kind, size, flux", list(itertools.product(
    ("vplate", "hcyl", "sphere"), (0.01, 0.1, 1.0), (0.01, 1.0, 100.0, 1500.0))))
def test_dissipating_surface_solves_from_a_trickle_to_a_hot_surface(kind, size, flux):
    area = size * size if kind != "hcyl" else np.pi * size
    power = flux * area
    branches = [["surface", "s", "air", kind, size, area], ["rad", "s", "room", "radiation", 0.8, None, area]]
    result = solve_network(branches, [["s", "Q", power], ["air", "T", 20.0], ["room", "T", 20.0]],
                           use_cache=False)
    assert_solved(result)
    assert result.heat["surface"] + result.heat["rad"] == pytest.approx(power, rel=1e-8)
