"""stillair.solve_network: stiff networks, whole-table checks, spreadsheet error values.

Checks are analytic (resistances in series: q = dT / (R1 + R2), Incropera et al., Fundamentals of
Heat and Mass Transfer, 6th ed., eq. 3.19 - common practice), physical laws (energy balance,
a branch of negligible resistance changes nothing) or exact error texts.
"""

from __future__ import annotations

import pytest

from stillair.network import NetworkConvergenceError, NetworkError, solve_network


def assert_balanced(result, relative=1e-9):
    for node, imbalance in result.balance().items():
        through = sum(abs(r.heat) for r in result.branches.values() if node in (r.source, r.target)) / 2
        assert abs(imbalance) <= relative * max(through, 1e-300) * 1.000001, (node, imbalance)


# ----------------------------------------------------------------------------------------------
# Stiff networks


@pytest.mark.parametrize("r1, r2", [(1e-9, 1e6), (1e6, 1e-9), (1e-9, 1e-9), (1e6, 1e6), (1e-12, 1e3)])
def test_two_resistances_in_series_carry_dt_over_their_sum(r1, r2):
    result = solve_network([["a", "hot", "m", "resistance", r1], ["b", "m", "cold", "resistance", r2]],
                           [["hot", "T", 20.0], ["cold", "T", 10.0]], use_cache=False)
    q = 10.0 / (r1 + r2)
    assert result.heat["a"] == pytest.approx(q, rel=1e-9)
    assert result.heat["b"] == pytest.approx(q, rel=1e-9)
    assert_balanced(result)


def test_a_long_stiff_chain_with_a_heat_input_balances_every_node():
    # 1e-9 and 1e6 K/W alternating, 40 W put in at the middle
    rows, previous = [], "left"
    for k in range(10):
        rows.append([f"r{k}", previous, f"n{k}", "resistance", 1e-9 if k % 2 else 1e6])
        previous = f"n{k}"
    rows.append(["r-end", previous, "right", "resistance", 1e-9])
    result = solve_network(rows, [["left", "T", 0.0], ["right", "T", 0.0], ["n4", "Q", 40.0]], use_cache=False)
    left = sum(1e-9 if k % 2 else 1e6 for k in range(5))
    right = sum(1e-9 if k % 2 else 1e6 for k in range(5, 10)) + 1e-9
    # the 40 W splits in inverse proportion to the two sides' resistances, to the solver's
    # acceptance (each node balanced to 1e-9 of the heat through it, so a few 1e-9 in a flow)
    assert -result.heat["r0"] == pytest.approx(40.0 * right / (left + right), rel=3e-9)
    assert result.heat["r-end"] == pytest.approx(40.0 * left / (left + right), rel=3e-9)
    assert_balanced(result)


def test_a_negligible_contact_resistance_before_a_convecting_plate_changes_nothing():
    # the same 30 W plate, once directly at the node with the heat input, once behind 1e-9 K/W
    plate = ["plate", "s", "air", "vplate", 0.5, 0.4]
    direct = solve_network([plate], [["air", "T", 20.0], ["s", "Q", 30.0]], use_cache=False)
    behind = solve_network([["contact", "chip", "s", "resistance", 1e-9], plate],
                           [["air", "T", 20.0], ["chip", "Q", 30.0]], use_cache=False)
    assert behind.heat["contact"] == pytest.approx(30.0, rel=1e-9)
    assert behind.heat["plate"] == pytest.approx(30.0, rel=1e-9)
    assert behind.temperatures["s"] == pytest.approx(direct.temperatures["s"], rel=1e-9)
    assert behind.temperatures["chip"] - behind.temperatures["s"] == pytest.approx(30e-9, rel=1e-6)


# ----------------------------------------------------------------------------------------------
# Failures say what they are


def test_a_network_without_correlations_that_cannot_balance_does_not_blame_correlations():
    # a surface drawing 1000 W by radiation alone from a 20 °C room: it would have to be below 0 K
    with pytest.raises(NetworkConvergenceError) as caught:
        solve_network([["rad", "cold", "room", "radiation", 0.9, None, 1.0]],
                      [["room", "T", 20.0], ["cold", "Q", -1000.0]], use_cache=False)
    text = str(caught.value)
    assert "node 'cold' fell to" in text and "at or below absolute zero" in text and "correlation" not in text


def test_an_unconverged_linear_network_says_it_has_no_correlations(monkeypatch):
    import stillair.network.solver as solver

    monkeypatch.setattr(solver, "MAX_NEWTON_ITERATIONS", 0)
    monkeypatch.setattr(solver.Solver, "scipy_root", lambda self, x, method: None)
    monkeypatch.setattr(solver.Solver, "start", lambda self: self.nominal_start() + 1.0)
    with pytest.raises(NetworkConvergenceError) as caught:
        solve_network([["a", "hot", "m", "resistance", 1.0], ["b", "m", "cold", "radiation", 0.9, None, 1.0]],
                      [["hot", "T", 40.0], ["cold", "T", 0.0]], use_cache=False)
    text = str(caught.value)
    assert text.startswith("solve_network: no converged solution after 0 iterations: energy residual ")
    assert text.endswith("The network has no correlation branches: check the heat inputs and any "
                         "conductances many orders of magnitude apart around that node.")
    assert "correlation that" not in text


# ----------------------------------------------------------------------------------------------
# Whole-table checks and spreadsheet error values

WALL = [["conv", "wall", "amb", "vplate", 1.0, 2.0], ["rad", "wall", "amb", "radiation", 0.9, None, 2.0]]

CHECKS = [
    # a mistyped node on one branch only: it would carry 0 W and look fine
    ([WALL[0], ["rad", "wall", "Amb", "radiation", 0.9, None, 2.0]], [["wall", "Q", 50], ["amb", "T", 20]],
     "solve_network: branch row 2 (rad), column to must be a node that another branch or a boundary row "
     "also names (a node on one branch only carries no heat; did you mean 'amb'?), got 'Amb'"),
    ([["k", "x", "wall", "resistance", 1.0]] + WALL, [["wall", "Q", 50], ["amb", "T", 20]],
     "solve_network: branch row 1 (k), column from must be a node that another branch or a boundary row "
     "also names (a node on one branch only carries no heat), got 'x'"),
    (WALL, [["wall", "Q", 50], ["amb", "T", 20], ["Wal", "T", 3]],
     "solve_network: boundary row 3, column node must be a node that some branch connects (did you mean "
     "'wall'?), got 'Wal'"),
    (WALL, [["wall", "Q", 50], ["ambient", "T", 20]],
     "solve_network: boundary row 2, column node must be a node that some branch connects (did you mean "
     "'amb'?), got 'ambient'"),
    ([WALL[0], ["rad", "wall", "#N/A", "radiation", 0.9, None, 2.0]], [["wall", "Q", 50], ["amb", "T", 20]],
     "solve_network: branch row 2, column to must be a node name, not a spreadsheet error value (correct "
     "the cell the error comes from), got #N/A"),
    ([["#REF!", "wall", "amb", "vplate", 1.0, 2.0]], [["wall", "Q", 50], ["amb", "T", 20]],
     "solve_network: branch row 1, column name must be a branch name, not a spreadsheet error value "
     "(correct the cell the error comes from), got #REF!"),
    ([["c", "wall", "amb", "vplate", "#VALUE!", 2.0]], [["wall", "Q", 50], ["amb", "T", 20]],
     "solve_network: branch row 1, column p1 must be a value, not a spreadsheet error value (correct the "
     "cell the error comes from), got #VALUE!"),
    (WALL, [["#N/A", "Q", 50], ["amb", "T", 20]],
     "solve_network: boundary row 1, column node must be a node name, not a spreadsheet error value "
     "(correct the cell the error comes from), got #N/A"),
    (WALL, [["wall", "Q", "#DIV/0!"], ["amb", "T", 20]],
     "solve_network: boundary row 1, column value must be a value, not a spreadsheet error value (correct "
     "the cell the error comes from), got #DIV/0!"),
    (WALL, [["wall", "Q", 50], ["amb", "T", "Err:502"]],
     "solve_network: boundary row 2, column value must be a value, not a spreadsheet error value (correct "
     "the cell the error comes from), got Err:502"),
]


@pytest.mark.parametrize("branches, boundaries, message", CHECKS)
def test_whole_table_checks_and_error_values_have_exact_messages(branches, boundaries, message):
    with pytest.raises(NetworkError) as caught:
        solve_network(branches, boundaries)
    assert str(caught.value) == message


def test_error_objects_of_a_formula_evaluator_are_refused_like_their_text():
    from formulas.tokens.operand import Error

    not_available = Error.errors["#N/A"]
    with pytest.raises(NetworkError) as caught:
        solve_network([WALL[0], ["rad", "wall", not_available, "radiation", 0.9, None, 2.0]],
                      [["wall", "Q", 50], ["amb", "T", 20]])
    assert str(caught.value) == CHECKS[4][2]


def test_a_node_with_a_heat_input_on_one_branch_is_fine():
    result = solve_network([["r", "m", "A", "resistance", 0.25]], [["A", "T", 0.0], ["m", "Q", 4.0]])
    assert result.temperatures["m"] == pytest.approx(1.0, rel=1e-12)
