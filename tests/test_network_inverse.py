"""heat_for_temperature: the heat input that brings a node to a temperature.

Checks: exact laws (Ohm's law of a resistance chain, the Stefan-Boltzmann law, the one-call h
of the same correlation), the defining property (solving the network again with the returned
heat puts the node on the target to 1e-6 K), monotonicity in the target, and the errors.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.constants import Stefan_Boltzmann, zero_Celsius

import stillair
from stillair import InputError, NetworkConvergenceError, heat_for_temperature, solve_network

# a sealed outdoor cabinet of our own (1.6 m x 0.8 m x 0.6 m, 2 mm steel, painted)
CABINET = [
    ["conv_side_in", "side_in", "air_in", "vplate", 1.6, 4.48],
    ["conv_top_in", "top_in", "air_in", "hplate", 0.48 / 2.8, 0.48, "down"],
    ["cond_side", "side_in", "side_out", "conduction", 0.002, 45.0, 4.48],
    ["cond_top", "top_in", "top_out", "conduction", 0.002, 45.0, 0.48],
    ["conv_side_out", "side_out", "ambient", "vplate", 1.6, 4.48],
    ["rad_side", "side_out", "ambient", "radiation", 0.9, None, 4.48],
    ["conv_top_out", "top_out", "ambient", "hplate", 0.48 / 2.8, 0.48, "up"],
    ["rad_top", "top_out", "sky", "radiation", 0.9, None, 0.48],
]


def _bounds(dissipation, sun_side, sun_top, ambient, sky):
    return [["air_in", "Q", dissipation], ["side_out", "Q", sun_side], ["top_out", "Q", sun_top],
            ["ambient", "T", ambient], ["sky", "T", sky]]


DAY = _bounds(150.0, 161.28, 115.2, 30.0, 15.0)
NIGHT = _bounds(0.0, 0.0, 0.0, 2.0, -18.0)


def test_a_resistance_chain_follows_ohms_law():
    branches = [["r1", "box", "mid", "resistance", 0.5], ["r2", "mid", "room", "resistance", 0.25]]
    answer = heat_for_temperature(branches, [["room", "T", 20.0]], "box", 65.0)
    assert answer.heat == pytest.approx((65.0 - 20.0) / 0.75, rel=1e-12)
    # a target at another node: the same heat flows through r2 only
    answer = heat_for_temperature(branches, [["room", "T", 20.0]], "box", 30.0, at="mid")
    assert answer.heat == pytest.approx((30.0 - 20.0) / 0.25, rel=1e-12)
    assert answer.solution.temperatures["box"] == pytest.approx(30.0 + 40.0 * 0.5, rel=1e-12)


def test_a_radiating_plate_follows_the_stefan_boltzmann_law():
    branches = [["rad", "plate", "sky", "radiation", 0.85, None, 2.0]]
    answer = heat_for_temperature(branches, [["sky", "T", -10.0]], "plate", 60.0)
    expected = 0.85 * Stefan_Boltzmann * 2.0 * ((60.0 + zero_Celsius) ** 4 - (-10.0 + zero_Celsius) ** 4)
    assert answer.heat == pytest.approx(expected, rel=1e-9)


def test_a_convecting_plate_takes_the_one_call_coefficient():
    branches = [["conv", "plate", "air", "vplate", 0.5, 0.3]]
    answer = heat_for_temperature(branches, [["air", "T", 20.0]], "plate", 70.0)
    assert answer.heat == pytest.approx(stillair.h_vplate(70.0, 20.0, 0.5) * 0.3 * 50.0, rel=1e-7)


@pytest.mark.parametrize("target", [35.0, 48.0, 55.0, 80.0])
def test_solving_again_with_the_answer_gives_the_target(target):
    answer = heat_for_temperature(CABINET, DAY, "air_in", target)
    stillair.clear_network_cache()
    again = solve_network(CABINET, answer.boundaries())
    assert again.temperatures["air_in"] == pytest.approx(target, abs=1e-6)
    assert answer.solution.temperatures["air_in"] == pytest.approx(target, abs=1e-6)
    # the sun's Q rows at the other nodes stay; the node's own row is replaced
    assert [row for row in answer.boundaries() if row[0] == "air_in"] == [["air_in", "Q", answer.heat]]
    assert again.heat_inputs["top_out"] == 115.2


def test_the_heat_rises_with_the_target_and_turns_to_cooling_below_the_free_temperature():
    heats = [heat_for_temperature(CABINET, DAY, "air_in", t).heat for t in (40.0, 45.0, 50.0, 55.0, 60.0, 70.0)]
    assert np.all(np.diff(heats) > 0)
    free = solve_network(CABINET, DAY).temperatures["air_in"]
    assert heat_for_temperature(CABINET, DAY, "air_in", free - 1.0).heat < 150.0
    # the sun alone puts the air above 35 °C: keeping it at 35 °C needs cooling (heat < 0)
    assert heat_for_temperature(CABINET, DAY, "air_in", 35.0).heat < 0.0


def test_the_answer_is_the_total_heat_at_the_node_whatever_its_rows():
    split = [row for row in DAY if row[0] != "air_in"] + [["air_in", "Q", 100.0], ["air_in", "Q", 40.0]]
    assert heat_for_temperature(CABINET, split, "air_in", 55.0).heat == pytest.approx(
        heat_for_temperature(CABINET, DAY, "air_in", 55.0).heat, rel=1e-9)
    # a node without a Q row gets one
    assert heat_for_temperature(CABINET, DAY, "side_in", 50.0).heat > 0.0


def test_a_heater_in_the_air_keeps_the_coldest_wall_at_a_target():
    answer = heat_for_temperature(CABINET, NIGHT, "air_in", 6.0, at="top_in")
    assert answer.heat > 0.0
    assert answer.solution.temperatures["top_in"] == pytest.approx(6.0, abs=1e-6)
    # energy balance: the heater's power leaves through the outer branches
    out = sum(answer.solution.heat[b] for b in ("conv_side_out", "rad_side", "conv_top_out", "rad_top"))
    assert out == pytest.approx(answer.heat, rel=1e-8)
    assert answer.notes == answer.solution.notes


def test_a_target_the_network_cannot_reach_is_a_clear_error():
    # "mid" sits between the heated box and a fixed 20 °C room: holding it at -200 °C needs the box
    # below absolute zero, so no heat input reaches it
    branches = [["r1", "box", "mid", "resistance", 1.0], ["r2", "mid", "room", "resistance", 1.0]]
    with pytest.raises(NetworkConvergenceError, match=r"heat_for_temperature: no heat input at node 'box' brings "
                                                      r"node 'mid' to -200 °C: heat inputs from "):
        heat_for_temperature(branches, [["room", "T", 20.0]], "box", -200.0, at="mid")
    # above the air tables' 800 °C
    with pytest.raises(NetworkConvergenceError, match=r"no heat input at node 'air_in' brings node 'air_in' to "
                                                      r"2000 °C: .*cannot be solved"):
        heat_for_temperature(CABINET, DAY, "air_in", 2000.0)


@pytest.mark.parametrize("kwargs, message", [
    (dict(node="ambient", temperature=50.0),
     "heat_for_temperature: node must be a node whose temperature is solved (boundary row 4 fixes it at 30 °C), "
     "got 'ambient'"),
    (dict(node="air_inn", temperature=50.0),
     "heat_for_temperature: node must be a node of the network (did you mean 'air_in'?), got 'air_inn'"),
    (dict(node="air_in", temperature=50.0, at="sky"),
     "heat_for_temperature: at must be a node whose temperature is solved (boundary row 5 fixes it at 15 °C), "
     "got 'sky'"),
    (dict(node="air_in", temperature=-300.0), "heat_for_temperature: temperature must be above -273.15 °C, got -300"),
    (dict(node="air_in", temperature="hot"), "heat_for_temperature: temperature must be a number in °C, got 'hot'"),
    (dict(node="air_in", temperature=50.0, pressure=-1.0), "heat_for_temperature: pressure must be > 0 Pa, got -1"),
    (dict(node=True, temperature=50.0), "heat_for_temperature: node must be a node name, got True"),
    (dict(node="air_in", temperature=50.0, at=" "), None),
])
def test_bad_input_names_the_argument(kwargs, message):
    if message is None:   # a blank "at" is the node itself
        assert heat_for_temperature(CABINET, DAY, **kwargs).at == "air_in"
        return
    with pytest.raises(InputError) as caught:
        heat_for_temperature(CABINET, DAY, **kwargs)
    assert str(caught.value) == message


def test_a_target_node_behind_a_fixed_node_is_refused():
    branches = [["a_r", "a", "room", "resistance", 1.0], ["b_r", "room", "b", "resistance", 1.0],
                ["b_r2", "b", "out", "resistance", 1.0]]
    bounds = [["room", "T", 20.0], ["out", "T", 0.0]]
    with pytest.raises(InputError, match="at must be a node the heat input at 'a' reaches through free nodes"):
        heat_for_temperature(branches, bounds, "a", 30.0, at="b")


def test_table_errors_are_the_solvers():
    with pytest.raises(InputError, match=r"solve_network: branch row 1 \(r1\), column kind"):
        heat_for_temperature([["r1", "a", "b", "resistor", 1.0]], [["b", "T", 0.0]], "a", 10.0)


@settings(max_examples=40, deadline=None)
@given(height=st.floats(0.05, 2.0), area=st.floats(0.01, 5.0), eps=st.floats(0.05, 1.0),
       ambient=st.floats(-30.0, 50.0), rise=st.floats(-40.0, 150.0), resistance=st.floats(1e-4, 2.0))
def test_any_plate_behind_a_wall_reaches_its_target(height, area, eps, ambient, rise, resistance):
    """Property sweep: a heated node behind a resistance to a convecting, radiating plate; the
    answer re-solved puts the node on the target, and its heat has the sign of the rise."""
    branches = [["wall", "inside", "plate", "resistance", resistance],
                ["conv", "plate", "air", "vplate", height, area],
                ["rad", "plate", "room", "radiation", eps, None, area]]
    bounds = [["air", "T", ambient], ["room", "T", ambient]]
    target = ambient + rise
    answer = heat_for_temperature(branches, bounds, "inside", target)
    assert answer.solution.temperatures["inside"] == pytest.approx(target, abs=1e-6)
    assert isinstance(answer.heat, float)
    assert np.sign(answer.heat) == np.sign(rise) or abs(rise) < 1e-6
    assert answer.solution.heat["conv"] + answer.solution.heat["rad"] == pytest.approx(answer.heat, rel=1e-8,
                                                                                         abs=1e-9)


def test_a_large_network_solved_with_sparse_systems_is_turned_round_too():
    """A chain of 60 free nodes (the solver's sparse linear systems): Ohm's law end to end."""
    nodes = [f"n{k}" for k in range(60)]
    branches = [[f"r{k}", a, b, "resistance", 0.01] for k, (a, b) in enumerate(zip(nodes, nodes[1:] + ["sink"]))]
    answer = heat_for_temperature(branches, [["sink", "T", 10.0]], "n0", 70.0, at="n30")
    assert answer.heat == pytest.approx((70.0 - 10.0) / (30 * 0.01), rel=1e-10)
    assert answer.solution.temperatures["n0"] == pytest.approx(10.0 + answer.heat * 0.6, rel=1e-10)
