"""Robustness of stillair.solve_network on generated networks (hypothesis).

Chains and meshes of 2-30 branches, convection-, cavity- or radiation-dominated or mixed, fixed
temperatures from -40 to +400 °C and heat inputs.  Every network either converges or raises the
solver's clear error; every converged one satisfies the physical laws checked here:

* energy balance at every solved node (to the solver's stated tolerance),
* each branch carries heat from its hotter to its colder end (second law, every kind here),
* maximum principle: with no heat inputs every node lies between the coldest and hottest fixed
  temperature; with non-negative inputs no node is colder than the coldest fixed one.
"""

from __future__ import annotations

import math

import pytest

from hypothesis import HealthCheck, event, given, settings, strategies as st

from stillair.network import NetworkConvergenceError, solve_network

pytestmark = pytest.mark.slow  # hundreds of generated networks

CONVECTION_ROWS = {
    "vplate": lambda d: ["vplate", d(st.floats(0.05, 2.0)), d(st.floats(0.01, 4.0))],
    "hplate": lambda d: ["hplate", d(st.floats(0.02, 1.0)), d(st.floats(0.01, 4.0)),
                         d(st.sampled_from(["up", "down"]))],
    "tplate": lambda d: ["tplate", d(st.floats(0.02, 1.0)), d(st.floats(0.01, 4.0)),
                         d(st.floats(0.0, 90.0)), d(st.sampled_from(["up", "down"]))],
    "hcyl": lambda d: ["hcyl", d(st.floats(0.005, 0.5)), d(st.floats(0.01, 2.0))],
    "sphere": lambda d: ["sphere", d(st.floats(0.005, 0.5)), d(st.floats(0.001, 1.0))],
}


def cavity_row(d):
    return ["cavity", d(st.floats(0.003, 0.15)), d(st.floats(0.1, 2.0)), d(st.floats(0.05, 4.0)),
            d(st.floats(0.0, 180.0)), d(st.sampled_from([None, "argon", "air"]))]


def radiation_row(d):
    return ["radiation", d(st.floats(0.05, 1.0)), d(st.one_of(st.none(), st.floats(0.05, 1.0))),
            d(st.floats(0.01, 4.0))]


def linear_row(d):
    kind = d(st.sampled_from(["conduction", "resistance", "film"]))
    if kind == "conduction":
        return ["conduction", d(st.floats(0.001, 0.3)), d(st.floats(0.02, 200.0)),
                d(st.floats(0.01, 4.0))]
    if kind == "resistance":
        return ["resistance", d(st.floats(0.01, 20.0))]
    return ["film", d(st.floats(0.5, 50.0)), d(st.floats(0.01, 4.0))]


FLAVOURS = {
    "convection": lambda d: CONVECTION_ROWS[d(st.sampled_from(sorted(CONVECTION_ROWS)))](d),
    "cavity": cavity_row,
    "radiation": radiation_row,
}


@st.composite
def networks(draw):
    flavour = draw(st.sampled_from(["convection", "cavity", "radiation", "mixed"]))
    shape = draw(st.sampled_from(["chain", "mesh"]))
    n_fixed = draw(st.integers(1, 3))
    n_free = draw(st.integers(1, 12))
    fixed = [f"F{k}" for k in range(n_fixed)]
    free = [f"n{k}" for k in range(n_free)]

    def row():
        roll = draw(st.integers(0, 9))
        if flavour == "mixed":
            maker = draw(st.sampled_from([FLAVOURS["convection"], cavity_row, radiation_row, linear_row]))
        else:
            maker = FLAVOURS[flavour] if roll < 8 else linear_row   # the flavour dominates
        return maker(draw)

    # chain: first fixed node - every free node and any further fixed nodes in a drawn order -
    # last fixed node (or back to the first when only one is fixed)
    if n_fixed > 1:
        path = [fixed[0]] + draw(st.permutations(free + fixed[1:-1])) + [fixed[-1]]
    else:
        path = [fixed[0]] + free + [fixed[0]]
    pairs = list(zip(path[:-1], path[1:]))
    pairs = [p for p in pairs if p[0] != p[1]]
    if shape == "mesh":
        nodes = fixed + free
        extra = draw(st.integers(1, max(1, 30 - len(pairs))))
        for _ in range(min(extra, 30 - len(pairs))):
            a = draw(st.sampled_from(nodes))
            b = draw(st.sampled_from([n for n in nodes if n != a]))
            pairs.append((a, b))
    pairs = pairs[:30]
    branches = []
    for k, (a, b) in enumerate(pairs):
        if draw(st.booleans()):
            a, b = b, a
        branches.append([f"b{k}", a, b] + row())

    boundaries = [[node, "T", draw(st.floats(-40.0, 400.0))] for node in fixed]
    for node in free:
        if draw(st.integers(0, 3)) == 0:
            boundaries.append([node, "Q", draw(st.floats(0.0, 200.0))])
    return flavour, shape, branches, boundaries


def passing_through(result) -> dict[str, float]:
    """Heat passing through each solved node: half the sum of its branches' |q| and its |Q|, the
    scale of the solver's stated acceptance (DEVELOPERS.md, "Solution").  A node fed by several
    branches passes more than the largest single flow in the network."""
    through = {node: abs(result.heat_inputs.get(node, 0.0)) for node in result.balance()}
    for record in result.branches.values():
        for end in (record.source, record.target):
            if end in through:
                through[end] += abs(record.heat)
    return {node: total / 2.0 for node, total in through.items()}


def check_laws(result, boundaries):
    scale = max([1.0] + [abs(q) for q in result.heat.values()] + [abs(q) for q in result.heat_inputs.values()])
    through = passing_through(result)
    for node, imbalance in result.balance().items():
        # 1e-9 of the heat through the node (the solver's acceptance), never less than 1e-9 of
        # the largest flow or of 1 W (a nanowatt is no finding; the solver also accepts a node
        # whose imbalance would move it by less than 1e-11 K)
        allowed = 1e-9 * max(scale, through[node]) * (1 + 1e-6)
        assert abs(imbalance) <= allowed, (node, imbalance, through[node])
    t = result.temperatures
    for record in result.branches.values():
        dt = t[record.source] - t[record.target]
        assert record.heat * dt >= 0.0 or abs(record.heat) <= 1e-9 * scale, record
        assert math.isfinite(record.h) or record.kind == "resistance"
    fixed_t = [value for _, kind, value in boundaries if kind == "T"]
    slack = 1e-9 * max(1.0, max(abs(v) for v in fixed_t))
    coldest, hottest = min(fixed_t), max(fixed_t)
    for node, value in t.items():
        assert value >= coldest - slack, (node, value, coldest)
        if not any(q > 0 for q in result.heat_inputs.values()):
            assert value <= hottest + slack, (node, value, hottest)


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(networks())
def test_generated_networks_converge_and_obey_the_laws(case):
    flavour, shape, branches, boundaries = case
    assert 2 <= len(branches) <= 30
    event(f"{flavour} {shape}")
    try:
        result = solve_network(branches, boundaries, use_cache=False)
    except NetworkConvergenceError as error:
        # the only acceptable failure: the clear message with residual and worst node
        event("did not converge")
        assert str(error).startswith("solve_network: ")
        assert error.worst_node is None or f"at node {error.worst_node!r}" in str(error)
        assert "The balance needs temperatures where the branches cannot be evaluated" in str(error) \
            or "A correlation that changes steeply with the temperature difference" in str(error) \
            or "The network has no correlation branches" in str(error)
        return
    assert result.residual <= result.tolerance
    check_laws(result, boundaries)
