"""finned-heatsink template: engine agreement, energy balance, a textbook optimum, input directions.

Outside reference: Cengel, Heat and Mass Transfer: A Practical Approach, 3rd ed. (2007), ch. 9,
example "Optimum fin spacing of a heat sink" (from memory): 18 cm long vertical fins, base at
80 degC in 30 degC air, S_opt = 7.45 mm.  Physics: the heat balance of the solved sink closes.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest

import stillair
from stillair.addin.templates.finned_heatsink import DEFAULTS, SWEEP_ROWS
from template_support import assert_direction, evaluate_template, named

NAME = "finned-heatsink"


def _sink(v, count=None):
    return (v["base_width"], v["fin_height"], v["fin_length"], v["fin_thickness"],
            v["fin_count"] if count is None else count, v["fin_k"], v["emissivity"], "air",
            stillair.altitude_pressure(v["altitude"]))


CASES = [{}, {"fin_count": 6, "emissivity": 0.1}, {"dissipation": 60.0, "altitude": 2000.0, "fin_k": 120.0}]


@pytest.mark.parametrize("sets", CASES, ids=["default", "few-bare-fins", "hot-high-site"])
def test_results_equal_a_direct_engine_calculation(sets):
    evaluation = evaluate_template(NAME, **sets)
    v = dict(DEFAULTS, **sets)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", stillair.CorrelationRangeWarning)  # the sheet shows the notes
        t_base = stillair.heatsink_tbase(v["dissipation"], v["ambient_t"], *_sink(v))
        parts = stillair.heatsink(t_base, v["ambient_t"], *_sink(v)).scalar()
    assert named(evaluation, "res_t_base") == pytest.approx(t_base, rel=1e-12)
    assert named(evaluation, "res_q_fins") == pytest.approx(parts.q_fins, rel=1e-9)
    assert named(evaluation, "res_q_base") == pytest.approx(parts.q_base, rel=1e-9)
    assert named(evaluation, "res_q_rad") == pytest.approx(parts.q_radiation, rel=1e-9)
    assert named(evaluation, "res_eta") == pytest.approx(parts.fin_efficiency, rel=1e-12)
    # the written-out model closes the heat balance on the dissipation
    assert abs(named(evaluation, "res_balance")) < 1e-8 * v["dissipation"]
    assert named(evaluation, "res_check") == ("OK" if t_base <= v["max_base_t"] else "EXCEEDS LIMIT")
    assert named(evaluation, "res_gap_opt") == pytest.approx(
        stillair.channel_spacing(t_base, v["ambient_t"], v["fin_length"], pressure=_sink(v)[-1]), rel=1e-12)
    assert evaluation.notes == []


def test_sweep_and_its_optimum_equal_the_engine():
    evaluation = evaluate_template(NAME)
    rows = [r for r in named(evaluation, "fin_sweep") if r[1] != ""]
    counts = np.array([r[0] for r in rows])
    assert len(named(evaluation, "fin_sweep")) == SWEEP_ROWS and counts[0] == 2
    engine = stillair.heatsink_tbase(DEFAULTS["dissipation"], DEFAULTS["ambient_t"], *_sink(DEFAULTS, counts))
    np.testing.assert_allclose([r[1] for r in rows], engine, rtol=1e-12)
    best = counts[int(np.argmin(engine))]
    assert named(evaluation, "res_count_best") == best
    assert 2 < best < counts[-1]  # an interior optimum: too many fins choke the channels


def test_optimum_gap_of_the_textbook_heat_sink():
    """Cengel 3rd ed. (from memory): fins 18 cm long, base 80 degC, air 30 degC -> S_opt = 7.45 mm.
    The template solves the base temperature from a dissipation, so the dissipation is chosen
    (by the engine) to put the base at 80 degC."""
    v = dict(DEFAULTS, fin_length=0.18, fin_height=0.024, fin_thickness=0.001, fin_count=14,
             base_width=14 * 0.001 + 13 * 0.00745, ambient_t=30.0, altitude=0.0)
    v["dissipation"] = stillair.heatsink_q(80.0, 30.0, *_sink(v))
    evaluation = evaluate_template(NAME, **{k: v[k] for k in ("fin_length", "fin_height", "fin_thickness",
                                                              "fin_count", "base_width", "ambient_t",
                                                              "dissipation")})
    assert named(evaluation, "res_t_base") == pytest.approx(80.0, abs=1e-8)
    assert named(evaluation, "res_gap_opt") == pytest.approx(0.00745, rel=0.015)


@pytest.mark.parametrize("input_name, value, direction", [
    ("base_width", 0.13, -1), ("fin_height", 0.05, -1), ("fin_length", 0.2, -1),
    ("fin_thickness", 0.004, +1),   # gap 7.5 -> 5.3 mm, below the optimum: the channels choke
    ("fin_count", 20, +1),           # the same, by crowding
    ("fin_k", 60.0, +1), ("emissivity", 0.1, +1), ("dissipation", 40.0, +1), ("ambient_t", 45.0, +1),
    ("altitude", 3000.0, +1),        # thinner air convects less
    ("max_base_t", 70.0, 0),         # the limit does not change the temperature...
])
def test_every_input_moves_the_base_temperature_the_expected_way(input_name, value, direction):
    assert_direction(NAME, input_name, value, "res_t_base", direction)


def test_limit_moves_the_margin_and_the_verdict():
    assert_direction(NAME, "max_base_t", 70.0, "res_margin", -1)   # ...only the margin
    assert named(evaluate_template(NAME, max_base_t=60.0), "res_check") == "EXCEEDS LIMIT"
