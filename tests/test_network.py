"""stillair.solve_network: table reading, error messages, physical laws of the solution.

Checks are analytic (series/parallel resistances: Incropera et al., Fundamentals of Heat and Mass
Transfer, 6th ed., sec. 3.1, eqs. 3.18-3.19 - common practice), physical laws (energy balance,
antisymmetry of a branch, mirror symmetry) or exact error texts.
"""

from __future__ import annotations

import math

import pytest
from scipy.optimize import brentq

import stillair
from stillair.convection import cavity_convection, surface_convection
from stillair.gases import gas_properties
from stillair.network import NetworkConvergenceError, NetworkError, clear_network_cache, solve_network
from stillair.radiation import SIGMA


def assert_balanced(result, relative=1e-9):
    """Every solved node's heat input + inflow - outflow is zero to the solver's tolerance."""
    scale = max([1.0] + [abs(q) for q in result.heat.values()] + [abs(q) for q in result.heat_inputs.values()])
    for node, imbalance in result.balance().items():
        assert abs(imbalance) <= relative * scale * 1.0000001, (node, imbalance)


# ----------------------------------------------------------------------------------------------
# Linear networks against the analytic series/parallel result


def test_series_wall_equals_series_resistances():
    # inside film 7.7, 0.2 m of k = 0.8, 50 mm of k = 0.035, outside film 25, area 12 m²
    branches = [
        ["in-film", "room", "s1", "film", 7.7, 12.0],
        ["brick", "s1", "s2", "conduction", 0.2, 0.8, 12.0],
        ["insulation", "s2", "s3", "conduction", 0.05, 0.035, 12.0],
        ["out-film", "s3", "outdoor", "film", 25.0, 12.0],
    ]
    boundaries = [["room", "T", 20.0], ["outdoor", "T", -5.0]]
    result = solve_network(branches, boundaries)
    resistances = [1 / (7.7 * 12), 0.2 / (0.8 * 12), 0.05 / (0.035 * 12), 1 / (25 * 12)]
    q = 25.0 / sum(resistances)
    for name in ("in-film", "brick", "insulation", "out-film"):
        assert result.heat[name] == pytest.approx(q, rel=1e-12)
    expected_s2 = 20.0 - q * (resistances[0] + resistances[1])
    assert result.temperatures["s2"] == pytest.approx(expected_s2, rel=1e-12)
    assert result.branches["brick"].R == pytest.approx(resistances[1], rel=1e-12)
    assert result.iterations == 0 and result.notes == ()
    assert_balanced(result)


def test_parallel_paths_and_heat_input_equal_analytic_result():
    # node m: heat input 40 W, to A (fixed 10 °C) through R1 = 0.5 K/W in parallel with a film
    # h = 4, A = 0.5 (R = 0.5 K/W), and to B (fixed 30 °C) through R3 = 2 K/W.
    branches = [
        ["r1", "m", "A", "resistance", 0.5],
        ["f2", "m", "A", "film", 4.0, 0.5],
        ["r3", "B", "m", "resistance", 2.0],
    ]
    boundaries = [["A", "T", 10.0], ["B", "T", 30.0], ["m", "Q", 40.0]]
    result = solve_network(branches, boundaries)
    g_a, g_b = 1 / 0.5 + 4.0 * 0.5, 1 / 2.0
    t_m = (40.0 + g_a * 10.0 + g_b * 30.0) / (g_a + g_b)
    assert result.temperatures["m"] == pytest.approx(t_m, rel=1e-12)
    assert result.heat["r1"] == pytest.approx((t_m - 10.0) / 0.5, rel=1e-12)
    assert result.heat["r3"] == pytest.approx((30.0 - t_m) / 2.0, rel=1e-12)
    assert_balanced(result)


def test_two_heat_inputs_at_one_node_add_up():
    branches = [["r", "m", "A", "resistance", 0.25]]
    result = solve_network(branches, [["A", "T", 0.0], ["m", "Q", 10.0], ["m", "Q", 30.0]])
    assert result.temperatures["m"] == pytest.approx(40.0 * 0.25, rel=1e-12)


# ----------------------------------------------------------------------------------------------
# Nonlinear networks: balance, antisymmetry, symmetry


CABINET = [
    ["board-air", "board", "inside", "vplate", 0.3, 0.12],
    ["board-wall", "board", "wall-in", "radiation", 0.9, 0.9, 0.12],
    ["air-wall", "wall-in", "inside", "vplate", 0.6, 1.2],
    ["air-roof", "roof-in", "inside", "hplate", 0.15, 0.24, "down"],
    ["wall", "wall-in", "wall-out", "conduction", 0.002, 16.0, 1.2],
    ["roof", "roof-in", "roof-out", "conduction", 0.002, 16.0, 0.24],
    ["wall-conv", "wall-out", "ambient", "vplate", 0.6, 1.2],
    ["roof-conv", "roof-out", "ambient", "hplate", 0.15, 0.24, "up"],
    ["wall-rad", "wall-out", "room", "radiation", 0.85, None, 1.2],
    ["roof-rad", "roof-out", "room", "radiation", 0.85, None, 0.24],
    ["gap", "wall-in", "liner", "cavity", 0.02, 0.6, 0.3, 90, None],
    ["liner-air", "liner", "inside", "tplate", 0.2, 0.3, 30, "up"],
    ["pipe", "liner", "inside", "hcyl", 0.03, 0.05],
    ["knob", "board", "inside", "sphere", 0.02, 0.0013],
]
CABINET_BOUNDARIES = [["board", "Q", 60.0], ["ambient", "T", 25.0], ["room", "T", 22.0]]


def test_every_kind_in_one_network_balances_and_reports_every_branch():
    result = solve_network(CABINET, CABINET_BOUNDARIES)
    assert_balanced(result)
    assert result.residual <= result.tolerance
    assert set(result.heat) == {row[0] for row in CABINET}
    # the dissipated 60 W leaves through the outer surfaces
    outer = sum(result.heat[b] for b in ("wall-conv", "roof-conv", "wall-rad", "roof-rad"))
    assert outer == pytest.approx(60.0, rel=1e-8)
    assert result.branches["air-roof"].case == "cold-down"     # roof colder than the air under it
    assert result.branches["roof-conv"].case == "hot-up"
    assert result.branches["gap"].method in stillair.methods_for("cavity")
    assert result.property_evaluations > 0 and result.iterations > 0


def test_branch_records_agree_with_the_one_call_coefficients_at_the_solution():
    result = solve_network(CABINET, CABINET_BOUNDARIES)
    t = result.temperatures
    wall = result.branches["wall-conv"]
    one_call = surface_convection("vplate", t["wall-out"], t["ambient"], 0.6).scalar()
    assert wall.h == pytest.approx(one_call.h, rel=1e-12)
    assert wall.Ra == pytest.approx(one_call.ra, rel=1e-12)
    assert wall.heat == pytest.approx(one_call.h * 1.2 * (t["wall-out"] - 25.0), rel=1e-12)
    gap = result.branches["gap"]
    cavity = cavity_convection(t["wall-in"], t["liner"], 0.02, 0.6).scalar()
    assert gap.Nu == pytest.approx(cavity.nu, rel=1e-12) and gap.method == cavity.method
    rad = result.branches["wall-rad"]
    assert rad.h == pytest.approx(stillair.radiation.h_rad(t["wall-out"], 22.0, 0.85), rel=1e-12)
    assert rad.heat == pytest.approx(0.85 * SIGMA * 1.2 * ((t["wall-out"] + 273.15) ** 4 - 295.15 ** 4),
                                     rel=1e-12)


def _swap(rows, name):
    swapped = []
    for row in rows:
        row = list(row)
        if row[0] == name:
            row[1], row[2] = row[2], row[1]
        swapped.append(row)
    return swapped


@pytest.mark.parametrize("name", ["board-wall", "wall", "wall-rad"])
def test_swapping_from_and_to_flips_the_sign_and_changes_nothing_else(name):
    # only branches whose equations are symmetric in their ends can be swapped (not the
    # convection kinds, whose from is the surface by definition)
    plain = solve_network(CABINET, CABINET_BOUNDARIES)
    swapped = solve_network(_swap(CABINET, name), CABINET_BOUNDARIES)
    for node, value in plain.temperatures.items():
        assert swapped.temperatures[node] == pytest.approx(value, rel=1e-9, abs=1e-9)
    for branch, value in plain.heat.items():
        expected = -value if branch == name else value
        assert swapped.heat[branch] == pytest.approx(expected, rel=1e-8, abs=1e-9)


def test_symmetric_chain_with_constant_properties_gives_mirror_temperatures():
    # hot - film - pane - cavity+radiation - pane - film - cold, mirror-symmetric about 10 °C
    # with properties fixed at 10 °C and a vertical cavity (same either way round)
    branches = [
        ["f1", "hot", "a", "film", 8.0, 1.0],
        ["g1", "a", "b", "conduction", 0.004, 1.0, 1.0],
        ["gap", "b", "c", "cavity", 0.016, 1.2, 1.0, 90, None],
        ["rad", "b", "c", "radiation", 0.84, 0.84, 1.0],
        ["g2", "c", "d", "conduction", 0.004, 1.0, 1.0],
        ["f2", "d", "cold", "film", 8.0, 1.0],
    ]
    result = solve_network(branches, [["hot", "T", 30.0], ["cold", "T", -10.0]], property_temperature=10.0)
    t = result.temperatures
    # radiation (T^4) is not mirror-symmetric about a Celsius mean, so compare with it removed
    no_radiation = solve_network(branches[:3] + branches[4:], [["hot", "T", 30.0], ["cold", "T", -10.0]],
                                 property_temperature=10.0)
    s = no_radiation.temperatures
    assert s["a"] - 10.0 == pytest.approx(10.0 - s["d"], rel=1e-10)
    assert s["b"] - 10.0 == pytest.approx(10.0 - s["c"], rel=1e-10)
    assert t["b"] > t["c"]
    assert_balanced(result)
    assert_balanced(no_radiation)


def test_property_temperature_reproduces_a_constant_property_hand_calculation():
    # a vertical plate 0.5 m high, 0.4 m², dissipating 30 W into air at 20 °C; hand calculation:
    # properties at 40 °C throughout, solve Q = h(dT) A dT by bisection
    props = gas_properties("air", 40.0, 101325.0)
    expansion = props.expansion

    def imbalance(dt):
        ra = 9.80665 * expansion * dt * 0.5 ** 3 / (props.kinvisc * props.diffusivity)
        nu = stillair.nusselt("vplate", "churchill-chu", ra=ra, pr=props.prandtl).nu
        return float(nu) * props.conductivity / 0.5 * 0.4 * dt - 30.0

    dt = brentq(imbalance, 0.1, 200.0, xtol=1e-14, rtol=1e-15)
    result = solve_network([["plate", "s", "air", "vplate", 0.5, 0.4, None, None, None, "churchill-chu"]],
                           [["air", "T", 20.0], ["s", "Q", 30.0]], property_temperature=40.0)
    assert result.temperatures["s"] - 20.0 == pytest.approx(dt, rel=1e-9)
    assert result.branches["plate"].t_film == 40.0


def test_zero_temperature_difference_gives_finite_coefficients():
    # both ends at 15 °C: every flow is zero, every coefficient is the correlation's finite limit
    branches = [
        ["v", "s", "air", "vplate", 0.5, 1.0],
        ["h", "s", "air", "hplate", 0.2, 1.0, "up"],
        ["c", "s", "air", "cavity", 0.02, 0.5, 1.0],
        ["r", "s", "air", "radiation", 0.9, None, 1.0],
    ]
    result = solve_network(branches, [["s", "T", 15.0], ["air", "T", 15.0]])
    for record in result.branches.values():
        assert record.heat == 0.0
        assert math.isfinite(record.h)
    # churchill-chu's Ra -> 0 limit: Nu = 0.825^2 (Churchill & Chu 1975, eq. 4 at Ra = 0)
    assert result.branches["v"].Nu == pytest.approx(0.825 ** 2, rel=1e-12)
    assert result.branches["c"].Nu == pytest.approx(1.0)      # conduction across the layer
    assert result.branches["r"].h == pytest.approx(4 * 0.9 * SIGMA * 288.15 ** 3, rel=1e-12)


def test_plate_case_follows_the_sign_of_the_temperature_difference():
    branches = [["top", "s", "air", "hplate", 0.2, 0.5, "up"], ["k", "s", "base", "resistance", 2.0]]
    warm = solve_network(branches, [["air", "T", 20.0], ["base", "T", 60.0]])
    cold = solve_network(branches, [["air", "T", 20.0], ["base", "T", -20.0]])
    assert warm.branches["top"].case == "hot-up" and warm.heat["top"] > 0
    assert cold.branches["top"].case == "cold-up" and cold.heat["top"] < 0
    assert warm.branches["top"].method == "lloyd-moran"
    assert cold.branches["top"].method == "raithby-hollands"


def test_cavity_heated_from_above_sees_the_flipped_tilt():
    # a horizontal layer (tilt 0) with its underside colder: stable, pure conduction (Nu = 1)
    branches = [["layer", "under", "over", "cavity", 0.05, 1.0, 1.0, 0, None]]
    result = solve_network(branches, [["under", "T", 0.0], ["over", "T", 30.0]])
    assert result.branches["layer"].Nu == pytest.approx(1.0)
    assert result.heat["layer"] < 0


def test_out_of_range_use_is_a_note_naming_the_branch():
    # a 5 m high, 5 mm deep vertical layer: aspect 1000, beyond every vertical-cavity correlation
    branches = [["slot", "a", "b", "cavity", 0.005, 5.0, 1.0, 90, None, "elsherbiny"]]
    result = solve_network(branches, [["a", "T", 20.0], ["b", "T", 0.0]])
    assert result.notes and result.notes[0].startswith("branch slot: elsherbiny:")
    assert result.branches["slot"].in_range is False


def test_several_fixed_nodes_and_cavity_gas_column():
    branches = [
        ["gap", "in", "out", "cavity", 0.016, 1.0, 1.0, 90, "argon"],
        ["gap-air", "in", "out", "cavity", 0.016, 1.0, 1.0, 90, None],
    ]
    result = solve_network(branches, [["in", "T", 20.0], ["out", "T", 0.0]])
    argon = cavity_convection(20.0, 0.0, 0.016, 1.0, gas="argon").scalar()
    assert result.branches["gap"].h == pytest.approx(argon.h, rel=1e-12)
    assert result.branches["gap"].h < result.branches["gap-air"].h   # argon conducts less


# ----------------------------------------------------------------------------------------------
# Table reading


def test_blank_cells_trailing_rows_and_a_header_are_tolerated():
    branches = [
        ["name", "from", "to", "kind", "p1", "p2", "p3", "p4", "p5", "method"],
        ["r", "m", "A", "resistance", 0.5, "", None, "", None, ""],
        [None] * 10,
        ["", "", "", "", "", "", "", "", "", ""],
    ]
    boundaries = [["node", "T or Q", "value"], ["A", "T", 0], ["m", "Q", 2], [None, None, None]]
    result = solve_network(branches, boundaries)
    assert result.temperatures["m"] == pytest.approx(1.0, rel=1e-12)


def test_numeric_node_names_are_read_as_text():
    result = solve_network([["r", 1.0, 2, "resistance", 1.0]], [[2, "T", 5.0], [1, "Q", 1.0]])
    assert result.temperatures["1"] == pytest.approx(6.0)


def test_identical_solves_hit_the_cache_and_the_result_is_immutable():
    clear_network_cache()
    first = solve_network(CABINET, CABINET_BOUNDARIES)
    again = solve_network([list(r) for r in CABINET], [list(r) for r in CABINET_BOUNDARIES])
    assert again is first
    other = solve_network(CABINET, CABINET_BOUNDARIES, pressure=90000.0)
    assert other is not first and other.temperatures["board"] != first.temperatures["board"]
    with pytest.raises(TypeError):
        first.temperatures["board"] = 0.0
    with pytest.raises(AttributeError):
        first.iterations = 0


ERRORS = [
    ([["wall-out", "a", "b", "conduction", 0.1, 0, 1.0]], [["b", "T", 0]],
     "solve_network: branch row 1 (wall-out), column p2 (conductivity) must be > 0 W/(m·K), got 0"),
    ([["x", "a", "b", "conduction", 0.1, 1.0, 1.0], ["y", "a", "b", "convect", 1.0]], [["b", "T", 0]],
     'solve_network: branch row 2 (y), column kind must be one of conduction, resistance, film, vplate, '
     'hplate, tplate, hcyl, sphere, vcyl, cavity, channel, radiation, vent, airflow, got \'convect\''),
    ([["v", "a", "b", "vplate", None, 1.0]], [["b", "T", 0]],
     "solve_network: branch row 1 (v), column p1 (height) must be a number in m, got blank"),
    ([["v", "a", "b", "vplate", "0.5", 1.0]], [["b", "T", 0]],
     "solve_network: branch row 1 (v), column p1 (height) must be a number in m, not text, got '0.5'"),
    ([["rad", "a", "b", "radiation", 1.2, None, 1.0]], [["b", "T", 0]],
     "solve_network: branch row 1 (rad), column p1 (emissivity of from) must be in (0, 1], got 1.2"),
    ([["rad", "a", "b", "radiation", 0.9, 0, 1.0]], [["b", "T", 0]],
     "solve_network: branch row 1 (rad), column p2 (emissivity of to) must be in (0, 1], got 0"),
    ([["v", "a", "b", "vplate", 0.5, 1.0, None, None, None, "bogus"]], [["b", "T", 0]],
     'solve_network: branch row 1 (v), column method must be blank or one of "auto", "churchill-chu", '
     '"churchill-chu-laminar", "mcadams", got \'bogus\''),
    ([["r", "a", "b", "resistance", 1.0, 2.0]], [["b", "T", 0]],
     "solve_network: branch row 1 (r), column p2 must be blank for kind resistance (it uses p1..p1), got 2"),
    ([["r", "a", "b", "resistance", 1.0], ["r", "b", "c", "resistance", 1.0]], [["b", "T", 0]],
     "solve_network: branch row 2 (r), column name must be unique (row 1 has the same name), got 'r'"),
    ([["r", "a", "b", "resistance", 1.0]], [["b", "T", 0], ["b", "T", 5]],
     "solve_network: boundary row 2 (b), column node must be fixed only once (row 1 already fixes its "
     "temperature), got 'b'"),
    ([["r", "a", "b", "resistance", 1.0]], [["b", "T", 0], ["z", "Q", 5]],
     "solve_network: boundary row 2, column node must be a node that some branch connects, got 'z'"),
    ([["r", "a", "b", "resistance", 1.0], ["s", "c", "d", "resistance", 1.0]], [["b", "T", 0]],
     "solve_network: the nodes 'c', 'd' (branch rows 2) must be connected through branches to a node with "
     "a fixed temperature (a boundary row of type T), got a group with no fixed temperature (its energy "
     "balance is singular)"),
    ([["r", "a", "a", "resistance", 1.0]], [["a", "T", 0]],
     "solve_network: branch row 1 (r), column to must be a node other than its from node, got 'a'"),
    ([["r", "a", "b", "resistance", 1.0]], [["b", "X", 0]],
     'solve_network: boundary row 1 (b), column T or Q must be "T" (fixed temperature, °C) or "Q" '
     '(heat input, W), got \'X\''),
    ([["r", "a", "b", "resistance", 1.0]], [["b", "T", -300]],
     "solve_network: boundary row 1 (b), column value must be above -273.15 °C, got -300"),
    ([["h", "a", "b", "hplate", 0.2, 1.0, "sideways"]], [["b", "T", 0]],
     'solve_network: branch row 1 (h), column p3 (facing) must be "up" or "down", got \'sideways\''),
    ([["t", "a", "b", "tplate", 0.2, 1.0, 120, "up"]], [["b", "T", 0]],
     "solve_network: branch row 1 (t), column p3 (tilt) must be in [0, 90]°, got 120"),
    ([["c", "a", "b", "cavity", 0.02, 1.0, 1.0, 90, "helium"]], [["b", "T", 0], ["a", "Q", 1]],
     None),  # message from the gas module, but naming the row and column
    ([["r", "a", "b", "resistance", 1.0]], [["b", "T", 0], ["b", "Q", 3]],
     "solve_network: boundary row 2 (b), column T or Q must be \"T\" only: the node's temperature is fixed "
     "by row 1, so a heat input there would have no effect, got 'Q'"),
    ([["f", "a", "b", "film", 5.0, 1.0, None, None, None, "mcadams"]], [["b", "T", 0]],
     "solve_network: branch row 1 (f), column method must be blank for kind film (it has no correlation), "
     "got 'mcadams'"),
]


@pytest.mark.parametrize("branches, boundaries, message", ERRORS)
def test_every_table_problem_names_row_and_column(branches, boundaries, message):
    with pytest.raises(NetworkError) as caught:
        solve_network(branches, boundaries)
    if message is None:
        assert str(caught.value).startswith("solve_network: branch row 1 (c), column p5 (gas) must be ")
        assert "got 'helium'" in str(caught.value)
    else:
        assert str(caught.value) == message
    assert isinstance(caught.value, stillair.InputError)


def test_network_error_is_rendered_with_the_cell_function_name():
    with pytest.raises(NetworkError) as caught:
        solve_network([["w", "a", "b", "film", -1, 1.0]], [["b", "T", 0]])
    assert caught.value.render("NET_SOLVE") == \
        "NET_SOLVE: branch row 1 (w), column p1 (h) must be > 0 W/(m²·K), got -1"


def test_a_plate_method_that_does_not_serve_the_final_case_is_an_error():
    # lloyd-moran serves hot-up/cold-down only; the surface ends up colder than the air above
    branches = [["top", "s", "air", "hplate", 0.2, 0.5, "up", None, None, "lloyd-moran"],
                ["k", "s", "base", "resistance", 2.0]]
    with pytest.raises(NetworkError) as caught:
        solve_network(branches, [["air", "T", 20.0], ["base", "T", -20.0]])
    assert str(caught.value) == (
        "solve_network: branch row 1 (top), column method must be a method for case cold-up at the "
        "solution (the surface is colder than the fluid); allowed: raithby-hollands, vdi, mcadams or blank, "
        "got 'lloyd-moran'")


def test_non_convergence_raises_with_residual_and_worst_node(monkeypatch):
    import stillair.network.solver as solver

    monkeypatch.setattr(solver, "MAX_NEWTON_ITERATIONS", 1)
    monkeypatch.setattr(solver.Solver, "scipy_root", lambda self, x, method: None)
    with pytest.raises(NetworkConvergenceError) as caught:
        solve_network(CABINET, CABINET_BOUNDARIES, use_cache=False)
    error = caught.value
    assert error.worst_node in {"board", "inside", "wall-in", "roof-in", "wall-out", "roof-out", "liner"}
    assert error.residual > 0
    assert str(error).startswith("solve_network: no converged solution after 1 iterations: energy residual ")
    assert f"at node {error.worst_node!r}" in str(error)


@pytest.mark.parametrize("method", ["hybr", "lm"])
def test_scipy_fallback_alone_reaches_the_same_solution(monkeypatch, method):
    import stillair.network.solver as solver

    newton = solve_network(CABINET, CABINET_BOUNDARIES, use_cache=False)
    monkeypatch.setattr(solver, "MAX_NEWTON_ITERATIONS", 0)
    if method == "lm":   # make "hybr" fail so that "lm" is the one that answers
        original = solver.Solver.scipy_root
        monkeypatch.setattr(solver.Solver, "scipy_root",
                            lambda self, x, m: None if m == "hybr" else original(self, x, m))
    fallback = solve_network(CABINET, CABINET_BOUNDARIES, use_cache=False)
    assert fallback.solver == method
    assert fallback.residual <= fallback.tolerance
    assert_balanced(fallback)
    for node, value in newton.temperatures.items():
        assert fallback.temperatures[node] == pytest.approx(value, rel=1e-7)


def test_the_cache_tells_a_logical_value_from_a_number():
    solve_network([["r", "m", "A", "resistance", 1]], [["A", "T", 0.0], ["m", "Q", 1.0]])
    with pytest.raises(NetworkError) as caught:
        solve_network([["r", "m", "A", "resistance", True]], [["A", "T", 0.0], ["m", "Q", 1.0]])
    assert str(caught.value) == ("solve_network: branch row 1 (r), column p1 (R) must be a number in K/W, "
                                 "not a logical value, got True")
    # blank written as "" or None is the same network: the parsed-table cache answers
    first = solve_network([["r", "m", "A", "resistance", 2.0, None]], [["A", "T", 0.0], ["m", "Q", 1.0]])
    second = solve_network([["r", "m", "A", "resistance", 2.0, ""]], [["A", "T", 0.0], ["m", "Q", 1.0]])
    assert second is first
