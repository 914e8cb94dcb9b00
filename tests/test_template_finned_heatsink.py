"""finned-heatsink template: engine agreement, energy balance, a textbook optimum, input directions.

Outside reference: Cengel, Heat and Mass Transfer: A Practical Approach, 3rd ed. (2007), ch. 9,
example "Optimum fin spacing of a heat sink" (from memory): 18 cm long vertical fins, base at
80 degC in 30 degC air, S_opt = 7.45 mm.  Physics: the heat balance of the solved sink closes;
the correlation spread's first-order base temperatures agree with a full re-solve.
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


def _count_giving_the_optimum_gap(v, t_base):
    gap = stillair.channel_spacing(t_base, v["ambient_t"], v["fin_length"],
                                   pressure=stillair.altitude_pressure(v["altitude"]))
    return max(2, round((v["base_width"] + gap) / (gap + v["fin_thickness"])))


def test_sweep_and_its_optimum_equal_the_engine():
    evaluation = evaluate_template(NAME)
    rows = named(evaluation, "fin_sweep")
    counts = np.array([r[0] for r in rows])
    v = DEFAULTS
    count_max = int((v["base_width"] + 0.002) // (v["fin_thickness"] + 0.002))
    around = _count_giving_the_optimum_gap(v, named(evaluation, "res_t_base"))
    first = max(2, min(around - (SWEEP_ROWS // 2 - 1), count_max - (SWEEP_ROWS - 1)))
    np.testing.assert_array_equal(counts, np.arange(first, first + SWEEP_ROWS))  # whole counts, in steps of 1
    assert counts[-1] <= count_max and first < v["fin_count"] < counts[-1]
    engine = stillair.heatsink_tbase(v["dissipation"], v["ambient_t"], *_sink(v, counts))
    np.testing.assert_allclose([r[2] for r in rows], engine, rtol=1e-12)
    np.testing.assert_allclose([r[1] for r in rows],
                               1000 * (v["base_width"] - counts * v["fin_thickness"]) / (counts - 1), rtol=1e-12)
    assert [r[5] for r in rows] == ["yes" if t <= v["max_base_t"] else "no" for t in engine]
    best = counts[int(np.argmin(engine))]
    assert named(evaluation, "res_count_best") == best
    assert named(evaluation, "res_t_best") == pytest.approx(engine.min(), rel=1e-12)
    # an interior optimum (too many fins choke the channels), and the sheet says so
    assert counts[0] < best < counts[-1]
    assert named(evaluation, "res_best_where").startswith("a true optimum")
    # the best count beats its neighbours outside the sweep too: the engine's own check
    assert stillair.heatsink_tbase(v["dissipation"], v["ambient_t"], *_sink(v, best)) <= engine.min()


def test_sweep_repeats_its_last_count_when_few_fins_fit_and_marks_failing_counts():
    evaluation = evaluate_template(NAME, fin_thickness=0.004, fin_count=8, max_base_t=75.0)  # 17 fit at most
    rows = named(evaluation, "fin_sweep")
    counts = [r[0] for r in rows]
    assert counts[0] == 2 and counts[-1] == 17 and counts[15:] == [17] * 5   # repeats, none is blank
    assert "no" in [r[5] for r in rows] and "yes" in [r[5] for r in rows]


def test_an_optimum_at_the_edge_of_the_sweep_is_reported():
    """The sweep's first count replaced (a calculated cell, set by name) so that it starts past
    the optimum: the lowest of the sweep is its first row, and the sheet must not call it optimal."""
    evaluation = evaluate_template(NAME, count_first=14)
    counts = [r[0] for r in named(evaluation, "fin_sweep")]
    assert counts[0] == 14 and named(evaluation, "res_count_best") == 14
    assert named(evaluation, "res_best_where") == "at the edge of the sweep: the optimum may lie beyond it"


def _model_with_scaled_h(t_base, v, channel_factor, face_factor):
    """The heat-sink model (stillair.heatsink, written out as its docstring states) at ``t_base``
    with both convection coefficients scaled: the spread's test double."""
    parts = stillair.heatsink(t_base, v["ambient_t"], *_sink(v)).scalar()
    h_in, h_out = parts.h_channel * channel_factor, parts.h_outer * face_factor
    h_mix = (h_in + h_out) / 2
    length, t, height, k, n = v["fin_length"], v["fin_thickness"], v["fin_height"], v["fin_k"], v["fin_count"]
    lc = height + t / 2

    def eta(h):
        m = np.sqrt(h * 2 * (length + t) / (k * length * t))
        return np.tanh(m * lc) / (m * lc)
    excess = t_base - v["ambient_t"]
    fins = ((n - 2) * eta(h_in) * h_in + 2 * eta(h_mix) * h_mix) * 2 * (length + t) * lc * excess
    return fins + (n - 1) * parts.spacing * length * h_in * excess + parts.q_radiation


def test_correlation_spread_of_the_base_temperature():
    """The spread's base temperatures agree with a full re-solve of the model with the coefficients
    scaled by NU_SPREAD's extremes (held at their ratios at the solved point): a Newton step is
    first-order, so they agree to a small fraction of the shift."""
    from scipy.optimize import brentq

    evaluation = evaluate_template(NAME)
    v = DEFAULTS
    t_base = named(evaluation, "res_t_base")
    cool, hot = named(evaluation, "res_t_base_cool"), named(evaluation, "res_t_base_hot")
    assert cool < t_base < hot
    pressure = _sink(v)[-1]
    parts = stillair.heatsink(t_base, v["ambient_t"], *_sink(v)).scalar()
    groups = stillair.film_properties(t_base, v["ambient_t"], "air", pressure)[0]
    ra_gap = stillair.rayleigh(t_base, v["ambient_t"], parts.spacing, "air", pressure)
    ra_face = stillair.rayleigh(t_base, v["ambient_t"], v["fin_length"], "air", pressure)
    pr = groups.prandtl
    gap = stillair.nu_spread("channel", ra_gap, pr, case="isothermal", aspect=v["fin_length"] / parts.spacing)
    face = stillair.nu_spread("vplate", ra_face, pr)
    assert gap.count == 2 and set(gap.methods) == {"bar-cohen-rohsenow", "elenbaas"}
    nu_gap = stillair.nu_channel(ra_gap, pr, v["fin_length"] / parts.spacing)
    nu_face = stillair.nu_vplate(ra_face, pr)
    for value, which in ((hot, "low"), (cool, "high")):
        factors = getattr(gap, which) / nu_gap, getattr(face, which) / nu_face
        exact = brentq(lambda t: _model_with_scaled_h(t, v, *factors) - v["dissipation"], v["ambient_t"] + 1, 200)
        assert value == pytest.approx(exact, abs=0.05 * abs(exact - t_base) + 1e-6)


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


@pytest.mark.parametrize("count", ["count_gap", "count_face"])
def test_no_covering_correlation_gives_no_spread_rather_than_a_number(count):
    """NU_SPREAD's count set to 0 by name (a calculated cell): the spread rows say why, the base
    temperature itself stands."""
    evaluation = evaluate_template(NAME, **{count: 0})
    assert named(evaluation, "res_t_base") == named(evaluate_template(NAME), "res_t_base")
    for name in ("res_t_base_hot", "res_t_base_cool"):
        assert named(evaluation, name) == "no correlation covers the case"
    assert named(evaluation, "res_check_hot") == "no correlation covers the case: no spread"


def _validation_admits(formula: str, cell: str, value: float, names: dict) -> bool:
    """Evaluate an input's custom validation formula, AND(...) of comparisons, as Excel would."""
    import re

    text = formula.lstrip("=")
    assert text.startswith("AND(") and text.endswith(")")
    expression = re.sub(r"\b" + cell + r"\b", repr(float(value)), text[4:-1])
    for name, number in names.items():
        expression = re.sub(r"\b" + name + r"\b", repr(float(number)), expression)
    expression = (expression.replace("ISNUMBER", "_isnumber").replace("INT(", "math.floor(")
                  .replace("<=", "@le@").replace(">=", "@ge@").replace("=", "==")
                  .replace("@le@", "<=").replace("@ge@", ">="))
    import math
    return all(eval("(" + expression + ",)", {"math": math, "_isnumber": lambda x: True}))


@pytest.mark.parametrize("name, value, admitted", [
    ("fin_count", 12, True), ("fin_count", 12.5, False), ("fin_count", 1, False), ("fin_count", 2, True),
    ("fin_count", 67, False),            # 67 x 1.5 mm fins do not fit on 100 mm
    ("fin_thickness", 0.0015, True), ("fin_thickness", 0.0, False),
    ("fin_thickness", 0.0044, False),    # 12 fins of 4.4 mm leave gaps of 4.3 mm: thinner than the fin
    ("fin_thickness", 0.004, True),      # gaps of 4.7 mm
])
def test_inputs_refuse_a_fractional_fin_count_and_fins_wider_than_their_gap(name, value, admitted):
    import openpyxl

    from stillair.addin.templates import template_by_name

    book = openpyxl.load_workbook(template_by_name(NAME).path)
    cell = book.defined_names[name].attr_text.split("!")[1].replace("$", "")
    validation = next(v for v in book["Inputs"].data_validations.dataValidation if str(v.sqref) == cell)
    others = {k: DEFAULTS[k] for k in ("base_width", "fin_count", "fin_thickness") if k != name}
    assert _validation_admits(validation.formula1, cell, value, others) is admitted
