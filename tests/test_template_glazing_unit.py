"""glazing-unit template: engine agreement, EN 673 references, dew point, input directions.

Outside references: EN 673 centre-of-glass U-values (the standard's own calculation rebuilt in
tests/test_network_references.py from its equations and gas table, and the rounded values it
tabulates -- from memory, see there); the dew point against CoolProp's humid-air functions
(CoolProp.HumidAirProp.HAPropsSI, an outside reference library).
"""

from __future__ import annotations

import math

import pytest
from CoolProp.HumidAirProp import HAPropsSI

import stillair
from stillair.addin.templates.glazing_unit import DEFAULTS, PASSES, SWEEP_GASES, SWEEP_MM
from template_support import assert_direction, evaluate_template, named
from test_network_references import BUILDS, EN673_TABULATED, GLASS_EPS, en673_standard_u

NAME = "glazing-unit"
OUR_FUNCTIONS = ("NET_", "H_", "NU_", "GAS_", "AIR_", "RAYLEIGH", "CAVITY_METHOD")


def _inputs(**sets):
    values = dict(DEFAULTS)
    values.update(sets)
    return values


def _gas_text(gas, fill):
    if gas == "air" or fill >= 1:
        return gas
    return f"{gas}:{round(fill, 6):g}, air:{round(1 - fill, 6):g}"


def standard_u(v):
    """EN 673 mode recomputed with stillair.h_cavity, the same explicit ΔT passes as the sheet."""
    sigma = 5.670374419e-8
    tm = 283.0
    mean, dt = tm - 273.15, 15.0
    h_e, h_i = 23.0, 3.6 + 4.4 * v["eps_indoor_face"] / 0.837
    triple = v["panes"] == 3
    hr = [4 * sigma * tm ** 3 / (1 / v["eps_gap1_outer"] + 1 / v["eps_gap1_inner"] - 1),
          4 * sigma * tm ** 3 / (1 / v["eps_gap2_outer"] + 1 / v["eps_gap2_inner"] - 1)]
    gaps = [(v["gap_1"], _gas_text(v["gas_1"], v["fill_1"])), (v["gap_2"], _gas_text(v["gas_2"], v["fill_2"]))]
    glass = (v["pane_1"] + v["pane_2"] + (v["pane_3"] if triple else 0)) / v["glass_k"]
    dt1 = dt / 2 if triple else dt
    for _ in range(PASSES):
        r = []
        for k, split in enumerate((dt1, dt - dt1)):
            gap, gas = gaps[k]
            h = stillair.h_cavity(mean + split / 2, mean - split / 2, gap, v["glass_height"], 90, gas, v["pressure"],
                                "en673")
            r.append(1 / (h + hr[k]))
        r[1] = r[1] if triple else 0.0
        dt1 = dt * r[0] / (r[0] + r[1])
    return 1 / (1 / h_e + 1 / h_i + glass + r[0] + r[1])


def actual_network(v, **options):
    """Mode (b) rebuilt as stillair.solve_network rows from the inputs alone."""
    triple = v["panes"] == 3
    method = None if v["gap_method"] == "auto" else v["gap_method"]
    indoor = "s6" if triple else "s4"
    rows = [["out-conv", "s1", "outdoor", "film", v["h_outdoor"], 1.0],
            ["out-rad", "s1", "outdoor", "radiation", v["eps_outdoor_face"], None, 1.0],
            ["pane-1", "s1", "s2", "conduction", v["pane_1"], v["glass_k"], 1.0],
            ["gap-1", "s2", "s3", "cavity", v["gap_1"], v["glass_height"], 1.0, 90.0,
             _gas_text(v["gas_1"], v["fill_1"]), method],
            ["gap-1-rad", "s2", "s3", "radiation", v["eps_gap1_outer"], v["eps_gap1_inner"], 1.0],
            ["pane-2", "s3", "s4", "conduction", v["pane_2"], v["glass_k"], 1.0],
            ["in-conv", indoor, "indoor", "vplate", v["glass_height"], 1.0],
            ["in-rad", indoor, "indoor", "radiation", v["eps_indoor_face"], None, 1.0]]
    if triple:
        rows += [["gap-2", "s4", "s5", "cavity", v["gap_2"], v["glass_height"], 1.0, 90.0,
                  _gas_text(v["gas_2"], v["fill_2"]), method],
                 ["gap-2-rad", "s4", "s5", "radiation", v["eps_gap2_outer"], v["eps_gap2_inner"], 1.0],
                 ["pane-3", "s5", "s6", "conduction", v["pane_3"], v["glass_k"], 1.0]]
    result = stillair.solve_network(rows, [["outdoor", "T", v["t_outdoor"]], ["indoor", "T", v["t_indoor"]]],
                                  pressure=v["pressure"], **options)
    return result, indoor


CASES = [{}, {"panes": 3}, {"gap_method": "en673"}, {"panes": 3, "gas_2": "krypton", "fill_2": 0.95, "gap_2": 0.01}]


@pytest.mark.parametrize("sets", CASES, ids=["double", "triple", "double-en673", "triple-krypton"])
def test_results_equal_a_direct_engine_calculation(sets):
    evaluation = evaluate_template(NAME, **sets)
    v = _inputs(**sets)
    assert named(evaluation, "gas_mix_1") == _gas_text(v["gas_1"], v["fill_1"])
    assert named(evaluation, "u_standard") == pytest.approx(standard_u(v), rel=1e-9)
    result, indoor = actual_network(v)
    q = -(result.heat["in-conv"] + result.heat["in-rad"])
    assert named(evaluation, "heat_loss") == pytest.approx(q, rel=1e-9)
    assert named(evaluation, "u_actual") == pytest.approx(q / (v["t_indoor"] - v["t_outdoor"]), rel=1e-9)
    assert named(evaluation, "indoor_face_t") == pytest.approx(result.temperatures[indoor], rel=1e-9)
    assert named(evaluation, "outdoor_face_t") == pytest.approx(result.temperatures["s1"], rel=1e-9)
    # the gap-1 coefficients at the solved faces carry the network's heat flow (energy balance)
    assert named(evaluation, "energy_check") == pytest.approx(0.0, abs=1e-6)
    assert named(evaluation, "network_check").startswith("OK")
    assert named(evaluation, "std_convergence") == pytest.approx(0.0, abs=1e-4)


def test_no_cell_shows_an_error_message():
    for sets in CASES:
        evaluation = evaluate_template(NAME, **sets)
        bad = [(sheet, ref, value) for sheet, cells in evaluation.values.items() for ref, value in cells.items()
               if isinstance(value, str) and (value.startswith("#") or value.startswith(OUR_FUNCTIONS))]
        assert not bad, (sets, bad[:3])
        assert evaluation.notes == [], (sets, evaluation.notes[:3])


def _sweep(evaluation):
    rows = named(evaluation, "gap_sweep")
    return {gas: {int(row[0]): row[j] for row in rows} for j, gas in enumerate(SWEEP_GASES, start=1)}


UNCOATED = dict(pane_1=0.004, pane_2=0.004, eps_gap1_outer=GLASS_EPS, eps_gap1_inner=GLASS_EPS,
                eps_indoor_face=GLASS_EPS)
LOW_E = dict(UNCOATED, eps_gap1_inner=0.1)


@pytest.mark.parametrize("gap, gas, eps", BUILDS)
def test_sweep_matches_en673_standard_calculation(gap, gas, eps):
    """EN 673 (its equations and declared gas table, rebuilt in test_network_references.py):
    4-12-4 and 4-16-4, air/argon/krypton, uncoated and low-e 0.1, within 0.05 W/(m²·K)."""
    sweep = _sweep(evaluate_template(NAME, **(UNCOATED if eps == GLASS_EPS else LOW_E)))
    assert abs(sweep[gas][round(gap * 1000)] - en673_standard_u(gap, gas, eps)) <= 0.05


@pytest.mark.parametrize("gap, gas, eps, u_tabulated", EN673_TABULATED)
def test_standard_mode_rounds_to_the_tabulated_u_value(gap, gas, eps, u_tabulated):
    """The main result u_standard via --set, against EN 673's rounded tabulated values (from memory,
    see test_network_references.py): within the rounding 0.05 + 0.01 for the gas-property difference,
    and within 0.05 of the standard's own calculation."""
    sets = dict(UNCOATED if eps == GLASS_EPS else LOW_E, gap_1=gap, gas_1=gas, fill_1=1.0)
    u = named(evaluate_template(NAME, **sets), "u_standard")
    assert abs(u - u_tabulated) <= 0.06
    assert abs(u - en673_standard_u(gap, gas, eps)) <= 0.05


def test_sweep_shows_an_optimum_gap_per_gas():
    """U falls while the gas conducts and rises once convection starts; the heavier the gas, the
    narrower the optimum (common practice: krypton about 10-12 mm, argon and air about 15-18 mm)."""
    evaluation = evaluate_template(NAME)
    sweep = _sweep(evaluation)
    optimum = {row[0]: (row[1], row[2]) for row in named(evaluation, "gap_optimum")}
    for gas in SWEEP_GASES:
        gap, u_min = optimum[gas]
        assert u_min == min(sweep[gas].values())
        assert sweep[gas][gap] == u_min
        below = [sweep[gas][mm] for mm in SWEEP_MM if mm <= gap]
        above = [sweep[gas][mm] for mm in SWEEP_MM if mm >= gap]
        assert below == sorted(below, reverse=True) and above == sorted(above)
        assert SWEEP_MM[0] < gap < SWEEP_MM[-1]
    assert optimum["krypton"][0] < optimum["argon"][0] <= optimum["air"][0]
    assert 9 <= optimum["krypton"][0] <= 12 and 13 <= optimum["argon"][0] <= 18 and 13 <= optimum["air"][0] <= 19
    assert optimum["krypton"][1] < optimum["argon"][1] < optimum["air"][1]


@pytest.mark.parametrize("t, rh", [(20.0, 55.0), (22.0, 40.0), (18.0, 75.0)])
def test_dew_point_against_coolprop_humid_air(t, rh):
    """DEW_POINT against CoolProp.HumidAirProp.HAPropsSI("D", ...) (ASHRAE RP-1485 humid air, with
    the enhancement factor): within 0.02 K (measured 0.002 K here, tests/test_humid.py)."""
    evaluation = evaluate_template(NAME, t_indoor=t, rh_indoor=rh)
    dew = named(evaluation, "indoor_dew_point")
    reference = HAPropsSI("D", "T", t + 273.15, "P", 101325.0, "R", rh / 100) - 273.15
    assert abs(dew - reference) <= 0.02
    assert dew == stillair.dew_point(t, rh / 100, named(evaluation, "pressure"))


def test_face_humidity_and_temperature_factor_equal_the_engine():
    evaluation = evaluate_template(NAME)
    face, t_in, t_out = (named(evaluation, n) for n in ("indoor_face_t", "t_indoor", "t_outdoor"))
    rh = named(evaluation, "rh_indoor") / 100
    assert named(evaluation, "face_rh_result") == pytest.approx(
        stillair.surface_rh(t_in, rh, face, named(evaluation, "pressure")), rel=1e-12)
    assert named(evaluation, "face_factor_result") == pytest.approx((face - t_out) / (t_in - t_out), rel=1e-12)
    # a face above the dew point keeps the air below saturation, and the factor lies between 0 and 1
    assert named(evaluation, "dew_margin_result") > 0 and named(evaluation, "face_rh_result") < 1
    assert 0 < named(evaluation, "face_factor_result") < 1


def test_condensation_check_turns_on_above_the_dew_point():
    dry = evaluate_template(NAME)
    wet = evaluate_template(NAME, rh_indoor=90)
    assert named(dry, "dew_margin_result") > 0 and named(dry, "condensation_check").startswith("no condensation")
    assert named(wet, "dew_margin_result") < 0 and named(wet, "condensation_check").startswith("CONDENSATION")


# (input, new value, result, expected direction, why) -- every defined input
DIRECTIONS = [
    ("panes", 3, "u_standard", -1, "a second gas layer adds resistance"),
    ("panes", 3, "u_actual", -1, "a second gas layer adds resistance"),
    ("pane_1", 0.010, "u_standard", -1, "more glass conduction resistance"),
    ("pane_2", 0.008, "u_actual", -1, "more glass conduction resistance"),
    ("pane_3", 0.008, "u_standard", 0, "no third pane in the default double unit"),
    ("glass_k", 1.4, "u_standard", +1, "a better-conducting glass"),
    ("gap_1", 0.010, "u_standard", +1, "narrower than the optimum: more conduction"),
    ("gap_1", 0.022, "u_standard", +1, "wider than argon's optimum (15 mm): convection grows"),
    ("gas_1", "krypton", "u_standard", -1, "a less conductive gas"),
    ("gas_1", "air", "u_actual", +1, "a more conductive gas"),
    ("fill_1", 0.5, "u_standard", +1, "more air in the argon fill"),
    ("gap_2", 0.02, "u_standard", 0, "no second gap in the default double unit"),
    ("gas_2", "krypton", "u_standard", 0, "no second gap in the default double unit"),
    ("fill_2", 0.5, "u_actual", 0, "no second gap in the default double unit"),
    ("eps_outdoor_face", 0.2, "u_actual", -1, "less radiation from the outdoor face"),
    ("eps_outdoor_face", 0.2, "u_standard", 0, "EN 673 fixes h_e = 23 whatever the face"),
    ("eps_gap1_outer", 0.1, "u_standard", -1, "both gap faces low-e: less radiation"),
    ("eps_gap1_inner", 0.2, "u_standard", +1, "a poorer low-e coating"),
    ("eps_gap2_outer", 0.1, "u_standard", 0, "no second gap in the default double unit"),
    ("eps_gap2_inner", 0.2, "u_actual", 0, "no second gap in the default double unit"),
    ("eps_indoor_face", 0.2, "u_standard", -1, "lower h_i = 3.6 + 4.4 eps/0.837"),
    ("eps_indoor_face", 0.2, "u_actual", -1, "less radiation to the room"),
    ("glass_height", 2.5, "u_standard", 0, "the EN 673 Nu has no aspect-ratio term"),
    ("glass_height", 2.5, "u_actual", -1, "a taller face: lower natural-convection h (laminar h ~ H^-1/4)"),
    ("pressure", 80000, "u_standard", -1, "lower gas density: less convection in the 16 mm argon gap"),
    ("t_indoor", 24, "heat_loss", +1, "larger indoor-outdoor difference"),
    ("t_indoor", 24, "u_standard", 0, "the standard fixes its own conditions"),
    ("t_outdoor", -15, "indoor_face_t", -1, "colder outside, colder indoor face"),
    ("t_outdoor", -15, "heat_loss", +1, "larger indoor-outdoor difference"),
    ("rh_indoor", 70, "indoor_dew_point", +1, "moister room air"),
    ("rh_indoor", 70, "u_actual", 0, "humidity does not enter the heat balance"),
    ("h_outdoor", 35, "u_actual", +1, "more wind, larger outdoor film"),
    ("h_outdoor", 35, "u_standard", 0, "EN 673 fixes h_e"),
    ("gap_method", "en673", "u_standard", 0, "mode (a) always uses the standard's Nu"),
]


@pytest.mark.parametrize("input_name, value, result, direction, why", DIRECTIONS,
                         ids=[f"{d[0]}={d[1]}->{d[2]}" for d in DIRECTIONS])
def test_input_moves_result_the_expected_way(input_name, value, result, direction, why):
    assert_direction(NAME, input_name, value, result, direction)


TRIPLE_DIRECTIONS = [("pane_3", 0.008, -1), ("gap_2", 0.010, +1), ("gas_2", "krypton", -1), ("fill_2", 0.5, +1),
                     ("eps_gap2_outer", 0.1, -1), ("eps_gap2_inner", 0.2, +1)]


@pytest.mark.parametrize("input_name, value, direction", TRIPLE_DIRECTIONS, ids=[d[0] for d in TRIPLE_DIRECTIONS])
def test_triple_only_inputs_act_in_a_triple_unit(input_name, value, direction):
    base = named(evaluate_template(NAME, panes=3), "u_standard")
    changed = named(evaluate_template(NAME, panes=3, **{input_name: value}), "u_standard")
    assert (changed - base) * direction > 0


def test_gap_method_choice_reaches_the_network():
    evaluation = evaluate_template(NAME, gap_method="en673")
    assert named(evaluation, "gap1_method") == "en673"
    assert named(evaluation, "u_actual") != named(evaluate_template(NAME), "u_actual")
    assert math.isfinite(named(evaluation, "u_actual"))


@pytest.mark.parametrize("sets", [{}, {"panes": 3}], ids=["double", "triple"])
def test_indoor_face_spread_equals_the_engine_band(sets):
    evaluation = evaluate_template(NAME, **sets)
    result, indoor = actual_network(_inputs(**sets), band=True)
    low, high = result.band[indoor]
    assert named(evaluation, "indoor_face_low") == pytest.approx(low, rel=1e-9)
    assert named(evaluation, "indoor_face_high") == pytest.approx(high, rel=1e-9)
    assert named(evaluation, "condensation_check_low").startswith(
        "no condensation" if low > named(evaluation, "t_dew") else "CONDENSATION")


def _profile(evaluation):
    """The printed profile table (point, position, temperature) and the chart's points."""
    from openpyxl.utils.cell import range_boundaries

    ref = next(name.text for name in evaluation.book.names if name.name == "glz_profile")
    sheet, cells = ref.split("!")
    first_col, first_row, _, last_row = range_boundaries(cells.replace("$", ""))
    values = {**evaluation.book.sheet(sheet).values, **evaluation.values[sheet]}   # constants, formulas

    def column(col):
        letter = chr(ord("A") + col - 1)
        return [values.get(f"{letter}{row}") for row in range(first_row, last_row + 1)]
    table = list(zip(column(first_col), column(first_col + 1), column(first_col + 2)))
    chart = list(zip(column(7), column(8)))    # G and H: the chart's points beside the table
    return table, chart


@pytest.mark.parametrize("panes", [2, 3])
def test_the_profile_table_names_every_point_once_and_the_chart_draws_them(panes):
    """The table printed a double unit's indoor air three times; it shows each point once, the two
    triple-only rows empty, and the chart's points are the table's (a double unit repeating its
    last point, so the line has no gap)."""
    table, chart = _profile(evaluate_template(NAME, panes=panes))
    labels = [label for label, _, _ in table]
    assert labels.count("indoor air") == 1 and labels.count("indoor face") == 1
    assert labels.count("(triple only)") == (2 if panes == 2 else 0)
    shown = [(x, t) for label, x, t in table if label != "(triple only)"]
    assert all(x == "" and t == "" for label, x, t in table if label == "(triple only)")
    assert [point for point in chart if point not in shown] == []
    assert chart[:len(shown) - 1] == shown[:-1] and chart[-1] == shown[-1]
    positions = [x for x, _ in shown]
    assert positions == sorted(positions)              # outdoor to indoor


def test_the_profile_chart_prints_on_the_page_of_its_table():
    """The chart had a page of its own, two thirds blank: it now starts its page with the profile
    table it draws (the page break is at the table's section bar, none before the chart)."""
    import openpyxl

    from stillair.addin.templates.glazing_unit import TEMPLATE
    from stillair.addin.templates.pages import PAGE_CAPACITY, ROW_HEIGHT

    ws = openpyxl.load_workbook(TEMPLATE.path)["Calculation"]
    chart = next(c for c in ws._charts if "Temperature through the unit" in str(c.title.tx.rich.p[0].r[0].t))
    top, bottom = chart.anchor._from.row, chart.anchor.to.row          # 0-based
    section = next(r for r in range(top, 0, -1) if str(ws.cell(r, 1).value or "").startswith("Temperature profile"))
    breaks = {brk.id for brk in ws.row_breaks.brk}
    assert section - 1 in breaks and not any(section - 1 < b <= top for b in breaks)
    height = sum(ws.row_dimensions[r].height or ROW_HEIGHT for r in range(section, bottom + 2))
    assert PAGE_CAPACITY / 2 < height <= PAGE_CAPACITY       # the page is mostly used, and holds both
