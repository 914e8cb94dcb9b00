"""stillair.solve_transient: the network through time.

Checks: the lumped-capacitance exponential (a body of capacity C cooled through a conductance G
to a fixed ambient: T = T_a + (T0 - T_a) exp(-G t / C); Incropera et al., Fundamentals of Heat
and Mass Transfer, 6th ed., eq. 5.6, from memory), energy conservation (stored energy = the
integral of the heat exchanged with the boundaries), the long-time limit (= solve_network),
convergence in the integration tolerance, the reduced Jacobian against finite differences of the
rate, and exact error texts.  The networks are demo scenarios of our own.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings, strategies as st
from scipy.integrate import cumulative_simpson, simpson
from scipy.linalg import expm

import stillair
from stillair.network import NetworkError, solve_network, solve_transient
from stillair.network.transient import DEFAULT_ATOL, DEFAULT_RTOL

HOUR = 3600.0


def block(h=10.0, area=0.5):
    return [["film", "block", "air", "film", h, area]]


# ----------------------------------------------------------------------------------------------
# The exact exponential


@pytest.mark.parametrize("method", ["BDF", "Radau"])
def test_one_node_follows_the_lumped_capacitance_exponential(method):
    capacity, conductance = 5000.0, 10.0 * 0.5
    times = np.linspace(0.0, 5 * capacity / conductance, 101)
    result = solve_transient(block(), [["air", "T", 20.0]], [["block", capacity]], times,
                             initial={"block": 80.0}, method=method)
    exact = 20.0 + 60.0 * np.exp(-conductance * times / capacity)
    # the defaults: 1e-6 of the initial difference (module docstring)
    assert np.max(np.abs(result.temperatures["block"] - exact)) <= 1e-6 * 60.0
    # the flow is G (T - T_a) at every output time
    np.testing.assert_allclose(result.heat["film"], conductance * (result.temperatures["block"] - 20.0),
                               rtol=1e-12, atol=1e-12)
    assert result.peak["block"] == (80.0, 0.0)
    assert result.minimum["block"] == (pytest.approx(float(exact[-1]), abs=1e-4), times[-1])


def test_a_quasi_steady_node_in_series_is_eliminated_exactly():
    # block -- film (G1 = 5 W/K) -- skin (no capacity) -- resistance 0.3 K/W -- air: the block sees
    # the series conductance 1 / (1/5 + 0.3) = 2 W/K, and the skin divides the difference.
    branches = [["film", "block", "skin", "film", 10.0, 0.5], ["wall", "skin", "air", "resistance", 0.3]]
    times = np.linspace(0.0, 10_000.0, 51)
    result = solve_transient(branches, [["air", "T", 20.0]], {"block": 4000.0}, times, initial=70.0)
    exact = 20.0 + 50.0 * np.exp(-2.0 * times / 4000.0)
    assert result.quasi_steady == ("skin",)
    assert np.max(np.abs(result.temperatures["block"] - exact)) <= 1e-6 * 50.0
    skin = 20.0 + (exact - 20.0) * 0.3 / (0.2 + 0.3)
    assert np.max(np.abs(result.temperatures["skin"] - skin)) <= 1e-6 * 50.0
    np.testing.assert_allclose(result.heat["film"], result.heat["wall"], rtol=1e-8)


# ----------------------------------------------------------------------------------------------
# A cabinet through a day (nonlinear: natural convection and radiation, sun and ambient series)


def cabinet(*, quasi_steady_air=False):
    height, width, depth = 1.5, 0.7, 0.5
    side, top = 2 * (width + depth) * height, width * depth
    branches = [
        ["in_side", "wall", "air", "vplate", height, side],
        ["in_top", "roof", "air", "hplate", top / (2 * (width + depth)), top, "down"],
        ["out_side", "wall", "outdoor", "vplate", height, side],
        ["rad_side", "wall", "outdoor", "radiation", 0.9, None, side],
        ["out_top", "roof", "outdoor", "hplate", top / (2 * (width + depth)), top, "up"],
        ["rad_top", "roof", "sky", "radiation", 0.9, None, top],
    ]
    boundaries = [["air", "Q", 120.0], ["wall", "Q", "sun_side"], ["roof", "Q", "sun_top"],
                  ["outdoor", "T", "outdoor"], ["sky", "T", "sky"]]
    series = []
    for hour in range(25):
        sun = math.sin(math.pi * (hour - 6) / 12) if 6 < hour < 18 else 0.0
        outdoor = 24.0 + 6.0 * math.cos(2 * math.pi * (hour - 15) / 24)
        series += [["sun_side", hour * HOUR, 0.4 * 150.0 * sun * side], ["sun_top", hour * HOUR, 0.4 * 850.0 * sun * top],
                   ["outdoor", hour * HOUR, outdoor], ["sky", hour * HOUR, outdoor - 10.0]]
    steel = 7850.0 * 470.0 * 0.0015      # J/(m²·K) of a 1.5 mm steel skin (demo values)
    capacities = [["wall", steel * side], ["roof", steel * top]]
    if not quasi_steady_air:
        capacities.append(["air", 30_000.0])    # air and equipment
    return branches, boundaries, capacities, series


def exchanged(result, series, branches_out, inputs):
    """(heat gained from the boundaries since the start at every output time, heat exchanged in
    both directions over the whole time), J, by Simpson's rule from the reported flows and the series."""
    def at(label):
        points = [(row[1], row[2]) for row in series if row[0] == label]
        return np.interp(result.times, *zip(*points))
    gain = sum(np.asarray(value) if np.ndim(value) else np.full(result.times.size, value) for value in
               (at(i) if isinstance(i, str) else i for i in inputs))
    loss = sum(result.heat[name] for name in branches_out)
    return (cumulative_simpson(gain - loss, x=result.times, initial=0.0),
            simpson(np.abs(gain) + np.abs(loss), x=result.times))


@pytest.mark.parametrize("quasi_steady_air", [False, True])
def test_stored_energy_equals_the_heat_exchanged_with_the_boundaries(quasi_steady_air):
    branches, boundaries, capacities, series = cabinet(quasi_steady_air=quasi_steady_air)
    times = np.arange(0.0, 24 * HOUR + 1, 150.0)
    result = solve_transient(branches, boundaries, capacities, times, series=series)
    net, both_ways = exchanged(result, series, ["out_side", "rad_side", "out_top", "rad_top"],
                               [120.0, "sun_side", "sun_top"])
    assert np.max(np.abs(result.stored_energy - net)) <= 1e-6 * both_ways
    assert np.max(np.abs(result.stored_energy)) > 5e-3 * both_ways      # the check has something to check
    assert result.quasi_steady == (("air",) if quasi_steady_air else ())


@pytest.mark.slow  # solves the same day three times, once 1,000x tighter
def test_the_default_tolerances_are_converged_to_two_ten_thousandths_of_a_kelvin():
    branches, boundaries, capacities, series = cabinet()
    times = np.arange(0.0, 24 * HOUR + 1, 300.0)
    default = solve_transient(branches, boundaries, capacities, times, series=series)
    assert (default.rtol, default.atol) == (DEFAULT_RTOL, DEFAULT_ATOL) == (1e-7, 1e-5)
    tighter = solve_transient(branches, boundaries, capacities, times, series=series, rtol=1e-9, atol=1e-7)
    tightest = solve_transient(branches, boundaries, capacities, times, series=series, rtol=1e-10, atol=1e-9)
    radau = solve_transient(branches, boundaries, capacities, times, series=series, method="Radau")

    def deviation(result):
        return max(np.max(np.abs(result.temperatures[n] - tightest.temperatures[n])) for n in tightest.temperatures)

    assert deviation(default) <= 2e-4
    assert deviation(radau) <= 2e-4
    assert deviation(tighter) <= 0.1 * deviation(default)
    # the day is a real transient: the air peaks after the sun (12:00) and the ambient (15:00)
    peak, when = default.peak["air"]
    assert 12 * HOUR < when <= 18 * HOUR and peak > np.max(default.temperatures["outdoor"])


def test_constant_boundaries_settle_to_the_steady_network():
    branches, _, capacities, _ = cabinet(quasi_steady_air=True)
    boundaries = [["air", "Q", 120.0], ["wall", "Q", 60.0], ["roof", "Q", 40.0],
                  ["outdoor", "T", 27.0], ["sky", "T", 15.0]]
    steady = solve_network(branches, boundaries)
    times = np.array([0.0, 2e5, 4e5, 6e5])      # about 40 of the walls' time constants
    result = solve_transient(branches, boundaries, capacities, times, initial={"wall": 5.0, "roof": 60.0})
    for node, value in steady.temperatures.items():
        assert result.temperatures[node][-1] == pytest.approx(value, abs=1e-6)
    # and the default start is that steady solution: nothing moves
    still = solve_transient(branches, boundaries, capacities, times)
    for node, value in steady.temperatures.items():
        np.testing.assert_allclose(still.temperatures[node], value, atol=1e-6)


def test_the_reduced_jacobian_equals_finite_differences_of_the_rate():
    from stillair.network.model import compile_network
    from stillair.network.solver import Solver
    from stillair.network.tables import parse_boundaries, parse_branches
    from stillair.network.transient import _Reduced, _Schedule

    branches, _, capacities, _ = cabinet(quasi_steady_air=True)
    boundaries = [["air", "Q", 120.0], ["wall", "Q", 60.0], ["roof", "Q", 40.0],
                  ["outdoor", "T", 27.0], ["sky", "T", 15.0]]
    parsed = parse_boundaries(boundaries)
    net = compile_network(parse_branches(branches), parsed, gas="air", pressure=101325.0,
                          property_temperature=None, ideal_expansion=False)
    solver = Solver(net)
    found = solver.solve()
    start = solver.temperatures(found[1])[0]
    cap = [net.nodes.index("wall"), net.nodes.index("roof")]
    system = _Reduced(net, _Schedule(net, parsed, {}, {}), cap, [c for _, c in capacities], start)
    y = np.array([45.0, 38.0])
    analytic = system.jacobian(0.0, y)
    numeric = np.empty((2, 2))
    for k in range(2):
        step = np.zeros(2)
        step[k] = 1e-3
        numeric[:, k] = (system.rate(0.0, y + step) - system.rate(0.0, y - step)) / 2e-3
    np.testing.assert_allclose(analytic, numeric, rtol=1e-4)
    assert np.all(np.diag(analytic) < 0)      # each node relaxes towards its surroundings


# ----------------------------------------------------------------------------------------------
# Series, tables and mappings, results


def test_series_are_linear_between_points_and_held_outside():
    series = [["amb", 100.0, 10.0], ["amb", 200.0, 30.0]]
    times = [0.0, 100.0, 150.0, 200.0, 300.0]
    result = solve_transient(block(), [["air", "T", "amb"], ["block", "Q", 5.0]], [], times, series=series)
    np.testing.assert_array_equal(result.temperatures["air"], [10.0, 10.0, 20.0, 30.0, 30.0])
    # no capacity at all: every node is quasi-steady and follows its boundaries at once
    # (5 W through h A = 5 W/K: 1 K above the air)
    np.testing.assert_allclose(result.temperatures["block"], result.temperatures["air"] + 1.0, atol=1e-9)


def test_heat_input_series_and_mappings_give_the_table_result():
    branches = [["film", "block", "air", "film", 8.0, 0.25]]
    as_tables = solve_transient(branches, [["air", "T", 20.0], ["block", "Q", "heater"]],
                                [["node", "C"], ["block", 2000.0]], [0.0, 600.0, 1200.0, 1800.0],
                                series=[["series", "time", "value"], ["heater", 0.0, 0.0], ["heater", 900.0, 50.0]])
    as_mappings = solve_transient(branches, [["air", "T", 20.0], ["block", "Q", "heater"]], {"block": 2000.0},
                                  [0.0, 600.0, 1200.0, 1800.0], series={"heater": [(0.0, 0.0), (900.0, 50.0)]})
    np.testing.assert_array_equal(as_tables.temperatures["block"], as_mappings.temperatures["block"])
    # a ramp then a constant input: the block warms monotonically from the ambient
    assert as_tables.temperatures["block"][0] == pytest.approx(20.0, abs=1e-9)
    assert np.all(np.diff(as_tables.temperatures["block"]) > 0)
    assert as_tables.peak["block"] == (as_tables.temperatures["block"][-1], 1800.0)


def test_a_periodic_start_gives_the_steady_periodic_response_of_a_first_order_body():
    """A body of time constant tau = C/G under an ambient A cos(w t) settles to
    T = A (cos w t + w tau sin w t) / (1 + (w tau)^2) (the steady periodic solution of
    tau dT/dt = T_a - T, from memory); tau = 6 h makes several cycles necessary."""
    day, amplitude, tau = 86400.0, 10.0, 6 * HOUR
    omega = 2 * math.pi / day
    points = np.arange(0.0, day + 1, 120.0)
    series = {"outdoor": list(zip(points, amplitude * np.cos(omega * points)))}
    capacity = 5.0 * tau              # the film's conductance is 10 W/(m²·K) x 0.5 m² = 5 W/K
    times = np.arange(0.0, day + 1, 1800.0)
    result = solve_transient(block(), [["air", "T", "outdoor"]], {"block": capacity}, times, series=series,
                             initial="periodic")
    exact = amplitude * (np.cos(omega * times) + omega * tau * np.sin(omega * times)) / (1 + (omega * tau) ** 2)
    assert result.cycles > 2 and result.notes == ()
    assert np.max(np.abs(result.temperatures["block"] - exact)) <= 1e-3
    # the default start (steady at the first time: 10 °C) is 6.1 K above the periodic one
    plain = solve_transient(block(), [["air", "T", "outdoor"]], {"block": capacity}, times, series=series)
    assert plain.cycles == 1 and plain.temperatures["block"][0] == pytest.approx(amplitude, abs=1e-9)


def test_a_cycle_that_does_not_repeat_is_noted():
    series = {"outdoor": [(0.0, 0.0), (43200.0, 10.0), (86400.0, 0.0)]}
    result = solve_transient(block(), [["air", "T", "outdoor"]], {"block": 1e9}, [0.0, 43200.0, 86400.0],
                             series=series, initial="periodic")
    assert result.cycles == 30
    assert len(result.notes) == 1 and result.notes[0].startswith(
        "the cycle did not repeat itself after 30 repetitions: the end differs from the start by ")


def test_a_header_row_in_the_boundaries_is_not_a_series_name():
    result = solve_transient(block(), [["node", "T or Q", "value"], ["air", "T", "amb"]], {"block": 100.0},
                             [0.0, 10.0], series=[["amb", 0.0, 15.0]])
    assert result.temperatures["air"].tolist() == [15.0, 15.0]


def test_two_heat_series_at_one_node_add_up():
    both = solve_transient(block(), [["air", "T", 20.0], ["block", "Q", "a"], ["block", "Q", "b"]], {"block": 500.0},
                           [0.0, 300.0, 600.0], series={"a": [(0.0, 3.0)], "b": [(0.0, 0.0), (600.0, 6.0)]})
    one = solve_transient(block(), [["air", "T", 20.0], ["block", "Q", "ab"]], {"block": 500.0},
                          [0.0, 300.0, 600.0], series={"ab": [(0.0, 3.0), (600.0, 9.0)]})
    np.testing.assert_allclose(both.temperatures["block"], one.temperatures["block"], rtol=1e-12)
    assert both.temperatures["block"][0] == pytest.approx(20.0 + 3.0 / 5.0, rel=1e-12)


def test_a_start_outside_the_gas_tables_names_the_time():
    with pytest.raises(stillair.NetworkConvergenceError) as caught:
        solve_transient([["conv", "block", "air", "vplate", 0.5, 0.5]], [["air", "T", 20.0]], {"block": 1000.0},
                        [0.0, 10.0], initial=5000.0)
    assert str(caught.value).startswith("solve_transient: at t = 0 s a branch could not be evaluated (t must be ")
    assert str(caught.value).endswith("got 2510): check the capacities, start temperatures, heat inputs and series")


def test_an_integration_that_does_not_end_is_stopped_with_a_message(monkeypatch):
    """A huge conductance on a small capacity can make the steps vanish; a solve never runs for
    ever (the limit lowered here so that an ordinary day meets it)."""
    import stillair.network.transient as transient

    monkeypatch.setattr(transient, "MAX_EVALUATIONS", 10)
    monkeypatch.setattr(transient, "MAX_EVALUATIONS_PER_TIME", 0)
    branches, boundaries, capacities, series = cabinet()
    with pytest.raises(stillair.NetworkConvergenceError) as caught:
        solve_transient(branches, boundaries, capacities, [0.0, 24 * HOUR], series=series, use_cache=False)
    assert str(caught.value).startswith("solve_transient: the integration needed more than 10 evaluations "
                                        "and stopped at t = ")


def test_results_are_read_only_and_cached():
    arguments = (block(), [["air", "T", 20.0]], {"block": 1000.0}, [0.0, 10.0])
    first = solve_transient(*arguments, initial=30.0)
    assert solve_transient(*arguments, initial=30.0) is first
    with pytest.raises(ValueError):
        first.temperatures["block"][0] = 0.0


def test_an_unused_series_is_noted():
    result = solve_transient(block(), [["air", "T", 20.0]], {"block": 1000.0}, [0.0, 10.0],
                             series=[["spare", 0.0, 1.0]])
    assert result.notes == ("series 'spare' is not used by any boundary row",)


def test_a_correlation_out_of_range_is_noted_with_its_time():
    # a 12 m face 10 K warm: Ra above the vertical-plate correlations' range (1e12)
    with pytest.warns(stillair.CorrelationRangeWarning):
        expected = stillair.h_vplate(30.0, 20.0, 12.0)
    result = solve_transient([["conv", "plate", "air", "vplate", 12.0, 24.0]], [["air", "T", 20.0]],
                             {"plate": 2e6}, [0.0, 60.0, 120.0], initial=30.0)
    assert len(result.notes) == 1
    assert result.notes[0].startswith("branch conv: ") and "(at t = 0 s; out of range at 3 of 3 output times)" in result.notes[0]
    assert result.heat["conv"][0] == pytest.approx(expected * 24.0 * 10.0, rel=1e-9)


# ----------------------------------------------------------------------------------------------
# Messages


BAD = [
    (dict(capacities=[["Block", 100.0]]),
     "solve_transient: capacity row 1 (Block), column node must be a node that some branch connects "
     "(did you mean 'block'?), got 'Block'"),
    (dict(capacities=[["air", 100.0]]),
     "solve_transient: capacity row 1 (air), column node must be a node whose temperature is solved (a boundary "
     "row fixes this one, so a capacity there would have no effect), got 'air'"),
    (dict(capacities=[["block", 100.0], ["block", 50.0]]),
     "solve_transient: capacity row 2 (block), column node must be listed once (row 1 already gives its "
     "capacity), got 'block'"),
    (dict(capacities=[["block", -5.0]]),
     "solve_transient: capacity row 1 (block), column C must be >= 0 J/K (0 or no row: quasi-steady), got -5"),
    (dict(capacities=[["block", "heavy"]]),
     "solve_transient: capacity row 1 (block), column C must be a number in J/K, not text, got 'heavy'"),
    (dict(boundaries=[["air", "T", "ambeint"]], series=[["ambient", 0.0, 20.0]]),
     "solve_transient: boundary row 1 (air), column value must be a number or the name of a series in the "
     "series table (did you mean 'ambient'?), got 'ambeint'"),
    (dict(boundaries=[["air", "T", "ambient"]]),
     "solve_transient: boundary row 1 (air), column value must be a number or the name of a series in the "
     "series table (no series table was given), got 'ambient'"),
    (dict(boundaries=[["air", "T", "cold"]], series=[["cold", 0.0, 20.0], ["cold", 10.0, -300.0]]),
     "solve_transient: boundary row 1 (air), column value must be a series of temperatures above -273.15 °C "
     "(it reaches -300), got 'cold'"),
    (dict(series=[["s", 0.0, 20.0], ["s", 0.0, 25.0]]),
     "solve_transient: series row 2 (s), column time must be later than 0 s (row 1): the times of a series "
     "increase down the table, got 0"),
    (dict(series=[["s", None, 20.0]]),
     "solve_transient: series row 1 (s), column time must be a number in s, got blank"),
    (dict(times=[0.0, 10.0, 5.0]),
     "solve_transient: times, entry 3 must be later than the entry before it (10 s): times increase, got 5"),
    (dict(times=[0.0]), "solve_transient: times must be at least two times in s, got 1 value(s)"),
    (dict(times=[0.0, None, 5.0]),
     "solve_transient: times, entry 2 must be a time in s (blanks only after the last time), got blank"),
    (dict(initial={"air": 30.0}),
     "solve_transient: initial must be a node with a capacity (a quasi-steady node's temperature follows from "
     "the others, a fixed one's from its boundary); nodes with a capacity: block, got 'air'"),
    (dict(initial=-400.0), "solve_transient: initial must be a finite temperature above -273.15 °C, got -400"),
    (dict(initial="periodc"), 'solve_transient: initial must be a temperature in °C or "periodic", got \'periodc\''),
    (dict(times=[0.0, "10 s"]), "solve_transient: times, entry 2 must be a finite time in s, got '10 s'"),
    (dict(times=[0.0, "#N/A"]), "solve_transient: times, entry 2 must be a finite time in s, got #N/A"),
    (dict(times=[0.0, math.inf]), "solve_transient: times, entry 2 must be a finite time in s, got inf"),
    (dict(boundaries=[["air", "T", "#REF!"]]),
     "solve_transient: boundary row 1, column value must be a value, not a spreadsheet error value "
     "(correct the cell the error comes from), got #REF!"),
    (dict(method="euler"), "solve_transient: method must be one of BDF, Radau, got 'euler'"),
    (dict(atol=0.0), "solve_transient: atol must be > 0 K and at most 0.01 K, got 0"),
    (dict(branches=[["conv", "block", "air", "vplate", 0.5, 0.5]], gas="argn"),
     "solve_transient: gas must be one of air, argon, krypton, xenon, sf6, co2, nitrogen or a mixture of them "
     'such as "argon:0.9, air:0.1", got \'argn\''),
    (dict(branches=[["film", "block", "air", "film", -1.0, 0.5]]),
     "solve_transient: branch row 1 (film), column p1 (h) must be > 0 W/(m²·K), got -1"),
]


@pytest.mark.parametrize("change, message", BAD, ids=[m.split(": ", 1)[1][:40] for _, m in BAD])
def test_bad_input_names_the_table_row_and_value(change, message):
    arguments = dict(branches=block(), boundaries=[["air", "T", 20.0]], capacities={"block": 1000.0},
                     times=[0.0, 10.0])
    arguments.update(change)
    with pytest.raises(stillair.InputError) as caught:
        solve_transient(**arguments)
    assert str(caught.value) == message


# ----------------------------------------------------------------------------------------------
# A sweep: linear networks against the matrix exponential


@settings(max_examples=25, deadline=None)
@given(data=st.data())
def test_linear_networks_follow_the_matrix_exponential(data):
    """Chains of resistances with heat inputs and a capacity on some nodes: the exact solution of
    C dT/dt = -L T + b (quasi-steady nodes eliminated) is T_s + expm(-M t) (T0 - T_s)."""
    n = data.draw(st.integers(2, 5))
    resistance = data.draw(st.lists(st.floats(0.05, 5.0), min_size=n + 1, max_size=n + 1))
    capacity = data.draw(st.lists(st.one_of(st.just(0.0), st.floats(100.0, 1e5)), min_size=n, max_size=n))
    if not any(capacity):
        capacity[0] = 1000.0
    heat = data.draw(st.lists(st.floats(-50.0, 50.0), min_size=n, max_size=n))
    start = data.draw(st.lists(st.floats(-20.0, 90.0), min_size=n, max_size=n))
    nodes = ["left"] + [f"n{k}" for k in range(n)] + ["right"]
    branches = [[f"r{k}", nodes[k], nodes[k + 1], "resistance", resistance[k]] for k in range(n + 1)]
    boundaries = [["left", "T", 10.0], ["right", "T", 30.0]] + [[f"n{k}", "Q", heat[k]] for k in range(n)]
    # the exact solution
    laplacian = np.zeros((n, n))
    b = np.array(heat, dtype=float)
    for k in range(n + 1):
        g = 1.0 / resistance[k]
        for i in (k - 1, k):
            if 0 <= i < n:
                laplacian[i, i] += g
        if 1 <= k <= n - 1:
            laplacian[k - 1, k] -= g
            laplacian[k, k - 1] -= g
    b[0] += 10.0 / resistance[0]
    b[-1] += 30.0 / resistance[-1]
    steady = np.linalg.solve(laplacian, b)
    assume(np.all(steady > -200.0))     # heat drawn out below absolute zero: no physical network
    c = np.flatnonzero(np.array(capacity) > 0)
    a = np.flatnonzero(np.array(capacity) == 0)
    reduced = laplacian[np.ix_(c, c)]
    if a.size:
        reduced = reduced - laplacian[np.ix_(c, a)] @ np.linalg.solve(laplacian[np.ix_(a, a)], laplacian[np.ix_(a, c)])
    rates = reduced / np.array(capacity)[c][:, None]
    slowest = 1.0 / np.min(np.abs(np.linalg.eigvals(rates)))
    times = np.linspace(0.0, 3.0 * slowest, 7)
    result = solve_transient(branches, boundaries, {f"n{k}": capacity[k] for k in c},
                             times, initial={f"n{k}": start[k] for k in c})
    deviation = np.array(start)[c] - steady[c]
    exact_c = steady[c][None, :] + np.array([expm(-rates * t) @ deviation for t in times])
    # the global error: within ten times the local tolerance per step (atol + rtol |T|)
    allowed = 10 * (DEFAULT_ATOL + DEFAULT_RTOL * float(np.max(np.abs(exact_c))))
    for j, k in enumerate(c):
        assert np.max(np.abs(result.temperatures[f"n{k}"] - exact_c[:, j])) <= allowed
    # the quasi-steady nodes balance at every time: their flows in and out agree
    for k in a:
        inflow = result.heat[f"r{k}"] - result.heat[f"r{k + 1}"] + heat[k]
        assert np.max(np.abs(inflow)) <= 1e-6 * (1.0 + np.max(np.abs(result.heat[f"r{k}"])))


# ----------------------------------------------------------------------------------------------
# The right-hand side's flows (no derivatives) are the model's own


def test_the_flows_alone_equal_the_full_evaluation_for_every_kind():
    """Network.flows (the integrator's right-hand side) and Network.evaluate give the same heat
    flows for a network holding every branch kind (a vent and a fan carry air between two air nodes)."""
    from stillair.network import BRANCH_KINDS
    from stillair.network.model import compile_network
    from stillair.network.tables import parse_boundaries, parse_branches

    rows = {
        "conduction": [0.01, 0.5, 0.2], "resistance": [0.4], "film": [6.0, 0.2], "vplate": [0.5, 0.2],
        "hplate": [0.2, 0.2, "up"], "tplate": [0.3, 0.2, 30.0, "up"], "hcyl": [0.05, 0.2], "sphere": [0.1, 0.03],
        "vcyl": [0.5, 0.05, 0.08], "cavity": [0.02, 0.5, 0.2, 90.0, None], "radiation": [0.9, 0.8, 0.2],
        "channel": [0.01, 0.15, 0.2, None], "vent": [0.004, 0.004, 0.6, None, None], "airflow": [0.002],
    }
    assert set(rows) == set(BRANCH_KINDS)      # a new kind joins this test
    air_kinds = ("vent", "airflow")
    branches = [[kind, "inside" if kind in air_kinds else "hot", "outside" if kind in air_kinds else "cold",
                 kind, *columns] for kind, columns in rows.items()]
    branches += [["warm", "hot", "inside", "resistance", 0.5]]
    boundaries = [["hot", "Q", 60.0], ["cold", "T", 10.0], ["outside", "T", 10.0]]
    net = compile_network(parse_branches(branches), parse_boundaries(boundaries), gas="air", pressure=101325.0,
                          property_temperature=None, ideal_expansion=False)
    t = np.array([{"hot": 55.0, "cold": 10.0, "inside": 35.0, "outside": 10.0}[node] for node in net.nodes])
    np.testing.assert_allclose(net.flows(t), net.evaluate(t, np.zeros_like(t)).q, rtol=1e-12, atol=0)
