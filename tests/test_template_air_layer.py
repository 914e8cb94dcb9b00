"""air-layer template: engine agreement, the ISO 6946 table, input directions.

Outside reference: ISO 6946 (2007 Table 2 / 2017 Table 8) thermal resistances of unventilated air
layers with high-emissivity faces, and its annex formulas -- both from memory, kept in
tests/test_network_references.py and imported from there.
"""

from __future__ import annotations

import warnings

import pytest

import stillair
from stillair.addin.templates.air_layer import DEFAULTS, SWEEP_MM, TILT
from template_support import assert_direction, evaluate_template, named
from test_network_references import (CORRELATION_TOLERANCE, ISO6946_DELTA_T, ISO6946_EPS, ISO6946_MEAN,
                                     ISO6946_TABLE, ISO6946_THICKNESS_MM, iso6946_annex_h_a)

NAME = "air-layer"
SIGMA = 5.670374419e-8


def _direct(v):
    """R from stillair.h_cavity + stillair.h_rad, and the annex formula, for inputs ``v``."""
    warm, cold = v["t_mean"] + v["delta_t"] / 2, v["t_mean"] - v["delta_t"] / 2
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", stillair.CorrelationRangeWarning)   # the sheet shows the note instead
        h_conv = stillair.h_cavity(warm, cold, v["thickness"], v["layer_extent"], TILT[v["direction"]], "air",
                                 v["pressure"])
    h_rad = stillair.h_rad(warm, cold, v["eps_warm"], v["eps_cold"])
    e = 1 / (1 / v["eps_warm"] + 1 / v["eps_cold"] - 1)
    h_r = e * 4 * SIGMA * (v["t_mean"] + 273.15) ** 3
    return 1 / (h_conv + h_rad), 1 / (iso6946_annex_h_a(v["thickness"], v["direction"]) + h_r)


CASES = [{}, {"direction": "up"}, {"direction": "down", "thickness": 0.1}, {"direction": "up", "thickness": 0.008}]


@pytest.mark.parametrize("sets", CASES, ids=["default", "up", "down-100mm", "up-8mm"])
def test_results_equal_a_direct_engine_calculation(sets):
    evaluation = evaluate_template(NAME, **sets)
    v = dict(DEFAULTS, **sets)
    r_corr, r_iso = _direct(v)
    assert named(evaluation, "r_layer") == pytest.approx(r_corr, rel=1e-9)
    assert named(evaluation, "r_standard") == pytest.approx(r_iso, rel=1e-9)
    assert named(evaluation, "r_difference") == pytest.approx(r_corr - r_iso, rel=1e-9)
    assert named(evaluation, "validity_note").startswith("in range")
    bad = [(s, r, x) for s, cells in evaluation.values.items() for r, x in cells.items()
           if isinstance(x, str) and (x.startswith("#") or x.split(":")[0].isupper() and ":" in x)]
    assert not bad and evaluation.notes == []


ISO_CONDITIONS = dict(eps_warm=ISO6946_EPS, eps_cold=ISO6946_EPS, t_mean=ISO6946_MEAN, delta_t=ISO6946_DELTA_T,
                      layer_extent=1.0)


@pytest.mark.parametrize("direction", list(ISO6946_TABLE))
def test_simplified_column_reproduces_the_iso6946_table_exactly(direction):
    """The standard's annex formulas reproduce its own table to its rounding (0.01 m²·K/W)."""
    rows = {int(r[0]): r for r in named(evaluate_template(NAME, direction=direction, **ISO_CONDITIONS),
                                        "thickness_sweep")}
    assert set(ISO6946_THICKNESS_MM) <= set(SWEEP_MM)
    for mm, r_table in zip(ISO6946_THICKNESS_MM, ISO6946_TABLE[direction]):
        assert round(rows[mm][2], 2) == pytest.approx(r_table, abs=1e-12), (direction, mm, rows[mm][2])


@pytest.mark.parametrize("direction", list(ISO6946_TABLE))
def test_correlation_column_within_the_justified_tolerance_of_the_table(direction):
    """Correlations + radiation against the table, tolerances justified in test_network_references.py
    (table rounding + correlation spread: 0.008 horizontal/down, 0.022 up)."""
    rows = {int(r[0]): r for r in named(evaluate_template(NAME, direction=direction, **ISO_CONDITIONS),
                                        "thickness_sweep")}
    for mm, r_table in zip(ISO6946_THICKNESS_MM, ISO6946_TABLE[direction]):
        assert abs(rows[mm][1] - r_table) <= CORRELATION_TOLERANCE[direction], (direction, mm, rows[mm][1])


@pytest.mark.parametrize("direction, thickness, r_table", [("up", 0.015, 0.16), ("horizontal", 0.025, 0.18),
                                                           ("down", 0.05, 0.21)])
def test_main_results_against_the_table(direction, thickness, r_table):
    evaluation = evaluate_template(NAME, direction=direction, thickness=thickness, **ISO_CONDITIONS)
    assert named(evaluation, "r_standard_rounded") == pytest.approx(r_table, abs=1e-12)
    assert abs(named(evaluation, "r_layer") - r_table) <= CORRELATION_TOLERANCE[direction]


def test_heat_flow_down_is_pure_conduction():
    """Heated from above, the layer is stable: Nu = 1 (conduction), whatever the thickness."""
    evaluation = evaluate_template(NAME, direction="down", thickness=0.1)
    assert named(evaluation, "nu") == pytest.approx(1.0)


DIRECTIONS = [
    ("thickness", 0.012, "r_layer", -1, "below about 20 mm the layer conducts: thinner, lower R"),
    ("thickness", 0.012, "r_standard", -1, "0.025/d exceeds 1.25 below 20 mm"),
    ("direction", "down", "r_layer", +1, "heated from above: no convection"),
    ("direction", "up", "r_standard", -1, "heat flow up: h_a 1.95 instead of 1.25"),
    ("eps_warm", 0.5, "r_layer", +1, "less radiation"),
    ("eps_cold", 0.9, "r_standard", -1, "more radiation"),
    ("t_mean", 25.0, "r_layer", -1, "radiation grows with T³"),
    ("t_mean", 25.0, "r_standard", -1, "h_r0 = 4 sigma Tm³ grows"),
    ("delta_t", 15.0, "r_layer", -1, "stronger convection at larger dT"),
    ("delta_t", 15.0, "r_standard", 0, "the simplified h_a does not depend on dT (for dT <= 5 K)"),
    ("layer_extent", 0.5, "r_standard", 0, "the simplified formulas have no aspect ratio"),
    ("pressure", 70000.0, "r_layer", +1, "thinner air, lower Ra, less convection"),
    ("pressure", 70000.0, "r_standard", 0, "the simplified formulas ignore pressure"),
]


@pytest.mark.parametrize("input_name, value, result, direction, why", DIRECTIONS,
                         ids=[f"{d[0]}={d[1]}->{d[2]}" for d in DIRECTIONS])
def test_input_moves_result_the_expected_way(input_name, value, result, direction, why):
    assert_direction(NAME, input_name, value, result, direction)


def test_layer_extent_changes_only_the_correlation_value():
    """A shorter layer (aspect ratio 19 instead of 74): the ElSherbiny aspect term changes Nu; the
    direction depends on which of its three terms governs, so only the agreement with the engine
    is asserted."""
    evaluation = evaluate_template(NAME, layer_extent=0.5)
    r_corr, _ = _direct(dict(DEFAULTS, layer_extent=0.5))
    assert named(evaluation, "r_layer") == pytest.approx(r_corr, rel=1e-9)


@pytest.mark.parametrize("sets", [{}, {"direction": "up", "thickness": 0.05}], ids=["default", "up"])
def test_resistance_spread_equals_the_engine_spread(sets):
    """R at the lowest and highest covering Nu (stillair.nu_spread): h scales with Nu at the
    layer's fixed properties, so R = 1/(h_conv Nu_x/Nu + h_rad)."""
    evaluation = evaluate_template(NAME, **sets)
    ra, pr, aspect, tilt = (named(evaluation, n) for n in ("ra", "pr", "aspect", "tilt"))
    spread = stillair.nu_spread("cavity", ra, pr, tilt=tilt, aspect=aspect)
    h_conv, h_rad, nu = (named(evaluation, n) for n in ("h_conv", "h_radiation", "nu"))
    assert named(evaluation, "r_layer_high") == pytest.approx(1 / (h_conv * spread.low / nu + h_rad), rel=1e-9)
    assert named(evaluation, "r_layer_low") == pytest.approx(1 / (h_conv * spread.high / nu + h_rad), rel=1e-9)
    assert named(evaluation, "r_layer_low") <= named(evaluation, "r_layer_high")
