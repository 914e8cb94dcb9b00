"""solve_network(..., band=True) and NET_BAND: the network between the published correlations.

Physical laws, not outside values: in a network where every convection branch carries the heat
of a source to a fixed ambient, lowering every conductance raises every free node (the network's
balance is monotone in its conductances), so the nominal ("auto") solution, whose every branch
lies between its lowest and highest correlation, lies inside the band; each band solution
balances energy; with one covering correlation per branch the band is a single temperature.
"""

from __future__ import annotations

import numpy as np
import pytest

import stillair
from stillair.addin.cells.callpath import call
from stillair.network import solve_network

# A sealed enclosure (demo data): a 25 W board, inside air, walls and a lid to a 22 °C room.
ENCLOSURE = [
    ["board-air", "board", "inside", "vplate", 0.25, 0.1],
    ["board-rad", "board", "wall-in", "radiation", 0.9, 0.9, 0.1],
    ["air-wall", "wall-in", "inside", "vplate", 0.5, 0.9],
    ["air-lid", "lid-in", "inside", "hplate", 0.12, 0.2, "down"],
    ["wall", "wall-in", "wall-out", "conduction", 0.003, 0.2, 0.9],
    ["lid", "lid-in", "lid-out", "conduction", 0.003, 0.2, 0.2],
    ["wall-conv", "wall-out", "room", "vplate", 0.5, 0.9],
    ["lid-conv", "lid-out", "room", "hplate", 0.12, 0.2, "up"],
    ["pipe", "lid-out", "room", "hcyl", 0.03, 0.05],
]
ENCLOSURE_BOUNDARIES = [["board", "Q", 25.0], ["room", "T", 22.0]]


def balanced(result, relative=1e-9):
    for node, imbalance in result.balance().items():
        through = sum(abs(r.heat) for r in result.branches.values() if node in (r.source, r.target)) / 2
        through += abs(result.heat_inputs.get(node, 0.0))
        if abs(imbalance) > relative * through * 1.000001:
            return False
    return True


def test_the_nominal_solution_lies_within_the_band_at_every_node():
    result = solve_network(ENCLOSURE, ENCLOSURE_BOUNDARIES, band=True)
    assert set(result.band) == set(result.temperatures)
    for node, t in result.temperatures.items():
        low, high = result.band[node]
        assert low - 1e-9 <= t <= high + 1e-9, (node, low, t, high)
    # the correlations disagree here: the board's band is wider than a hundredth of a kelvin
    low, high = result.band["board"]
    assert high - low > 0.01
    assert result.band["room"] == (22.0, 22.0)


def test_each_band_solution_balances_energy_and_uses_the_extreme_correlations():
    result = solve_network(ENCLOSURE, ENCLOSURE_BOUNDARIES, band=True)
    for side, solution in zip((0, -1), result.band_solutions):
        assert solution.residual <= solution.tolerance
        assert balanced(solution)
        assert sum(solution.heat[b] for b in ("wall-conv", "lid-conv", "pipe")) == pytest.approx(25.0, rel=1e-8)
        # every convection branch uses the correlation nu_spread names lowest (highest) at
        # that solution's own Ra: the choice is settled, not taken from the nominal solution
        for name, record in solution.branches.items():
            if np.isnan(record.Ra):
                continue
            spread = stillair.nu_spread(record.kind, record.Ra, record.Pr, case=record.case or None)
            assert record.method == spread.methods[side], (name, record.method, spread.methods)
            assert record.Nu == pytest.approx(spread.low if side == 0 else spread.high, rel=1e-12)
    # lower Nu everywhere -> the heated board is hotter
    low, high = result.band_solutions
    assert low.temperatures["board"] > high.temperatures["board"]


def test_the_band_collapses_when_one_correlation_covers_each_branch():
    # the sphere has one correlation (Churchill); a linear branch has none
    branches = [["knob", "part", "air", "sphere", 0.05, 0.008], ["lead", "part", "base", "resistance", 40.0]]
    boundaries = [["part", "Q", 2.0], ["air", "T", 20.0], ["base", "T", 25.0]]
    result = solve_network(branches, boundaries, band=True)
    for node, t in result.temperatures.items():
        assert result.band[node] == (t, t)
    assert [s.branches["knob"].method for s in result.band_solutions] == ["churchill", "churchill"]


def test_a_network_without_correlations_has_a_band_of_zero_width():
    result = solve_network([["r", "m", "A", "resistance", 0.5]], [["A", "T", 0.0], ["m", "Q", 4.0]], band=True)
    assert result.band["m"] == (2.0, 2.0)


def test_band_false_gives_no_band_and_the_nominal_answer_is_shared():
    stillair.clear_network_cache()
    plain = solve_network(ENCLOSURE, ENCLOSURE_BOUNDARIES)
    assert plain.band is None and plain.band_solutions is None
    banded = solve_network(ENCLOSURE, ENCLOSURE_BOUNDARIES, band=True)
    assert dict(banded.temperatures) == dict(plain.temperatures)
    assert solve_network(ENCLOSURE, ENCLOSURE_BOUNDARIES, band=True) is banded


def test_net_band_spills_low_and_high():
    sheet = [row + [None] * (10 - len(row)) for row in ENCLOSURE]   # a range is rectangular
    row = call("NET_BAND", sheet, ENCLOSURE_BOUNDARIES, "board")
    expected = solve_network(ENCLOSURE, ENCLOSURE_BOUNDARIES, band=True).band["board"]
    assert row == [[pytest.approx(expected[0], rel=1e-12), pytest.approx(expected[1], rel=1e-12)]]
    assert call("NET_BAND", sheet, ENCLOSURE_BOUNDARIES, "bord") == (
        "NET_BAND: node must be one of 'board', 'inside', 'wall-in', 'lid-in', 'wall-out', 'lid-out', "
        "'room', got 'bord'")
