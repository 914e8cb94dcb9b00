"""hot-surface template: equals the engine, reproduces a handbook worked example, and every input
moves the results the expected way."""

from __future__ import annotations

import math
import re

import numpy as np
import pytest
from scipy.constants import Stefan_Boltzmann, g as GRAVITY, zero_Celsius

import stillair
from stillair.addin.templates.spec import FAILED
from stillair.addin.templates import hot_surface
from template_support import assert_direction, evaluate_template, input_names, named

NAME = "hot-surface"
KIND = {"horizontal cylinder": "hcyl", "vertical face": "vplate", "horizontal top": "hplate",
        "horizontal bottom": "hplate"}


def _table(evaluation):
    """{k: (surface °C, heat loss W)} of the thickness table, found by its formulas."""
    sheet = evaluation.book.sheet("Tables")
    cells = evaluation.values["Tables"]
    table = {}
    for ref, cell in sheet.formulas.items():
        m = re.search(r'NET_(TEMP|HEAT)\(hs_branches, hs_bounds, "(surf|ins)_(\d+)"\)', cell.formula or "")
        if m:
            table.setdefault(int(m.group(3)), {})[m.group(1)] = cells[ref]
    return {k: (v["TEMP"], v["HEAT"]) for k, v in table.items()}


def _engine_case(evaluation, **options):
    v = {n: named(evaluation, n) for n in ("geometry", "hot_t", "pipe_od", "pipe_length", "face_height",
                                          "face_width", "eps_bare", "ambient_t", "surroundings_t", "ins_k",
                                          "eps_jacket", "ins_step", "wind_speed")}
    kind = KIND[v["geometry"]]
    facing = "down" if v["geometry"] == "horizontal bottom" else "up"
    h, w, d, length = v["face_height"], v["face_width"], v["pipe_od"], v["pipe_length"]
    plate_length = h * w / (2 * (h + w))
    wind = v["wind_speed"]
    along = {} if wind == 0 else {"wind_length": w}    # a face: the wind along its width
    if kind == "hcyl":
        bare_area, h_conv = math.pi * d * length, stillair.h_hcyl(v["hot_t"], v["ambient_t"], d, wind=wind)
    elif kind == "vplate":
        bare_area, h_conv = h * w, stillair.h_vplate(v["hot_t"], v["ambient_t"], h, wind=wind, **along)
    else:
        bare_area, h_conv = h * w, stillair.h_hplate(v["hot_t"], v["ambient_t"], plate_length, facing, wind=wind,
                                                     **along)
    h_rad = stillair.h_rad(v["hot_t"], v["surroundings_t"], v["eps_bare"])
    q_bare = bare_area * (h_conv * (v["hot_t"] - v["ambient_t"]) + h_rad * (v["hot_t"] - v["surroundings_t"]))
    rows = []
    for k in range(1, hot_surface.STEPS + 1):
        t = k * v["ins_step"]
        if kind == "hcyl":
            size = d + 2 * t
            area = math.pi * size * length
            resistance = math.log(size / d) / (2 * math.pi * v["ins_k"] * length)
        else:
            size = h if kind == "vplate" else plate_length
            area, resistance = bare_area, t / (v["ins_k"] * bare_area)
        rows.append((resistance, kind, size, area, hot_surface.outer_columns(kind, facing, wind, w), v["eps_jacket"]))
    result = stillair.solve_network(hot_surface.insulated_branch_rows(rows),
                                  hot_surface.boundary_rows(v["hot_t"], v["ambient_t"], v["surroundings_t"]),
                                  **options)
    return h_conv, h_rad, q_bare, result


@pytest.mark.parametrize("geometry", hot_surface.GEOMETRIES)
def test_results_equal_the_engine(geometry):
    evaluation = evaluate_template(NAME, geometry=geometry)
    h_conv, h_rad, q_bare, result = _engine_case(evaluation)
    assert named(evaluation, "res_h_conv_bare") == pytest.approx(h_conv, rel=1e-9)
    assert named(evaluation, "res_h_rad_bare") == pytest.approx(h_rad, rel=1e-9)
    assert named(evaluation, "res_q_bare") == pytest.approx(q_bare, rel=1e-9)
    table = _table(evaluation)
    assert sorted(table) == list(range(1, hot_surface.STEPS + 1))
    for k, (surface, heat) in table.items():
        assert surface == pytest.approx(result.temperatures[f"surf_{k}"], rel=1e-9)
        assert heat == pytest.approx(result.heat[f"ins_{k}"], rel=1e-9)
    assert named(evaluation, "h_conv_first_step") == pytest.approx(result.branches["conv_1"].h, rel=1e-9)


@pytest.mark.parametrize("geometry", hot_surface.GEOMETRIES)
def test_table_falls_with_thickness_and_first_thickness_is_the_first_below_the_limit(geometry):
    evaluation = evaluate_template(NAME, geometry=geometry)
    table = _table(evaluation)
    surfaces = [named(evaluation, "hot_t")] + [table[k][0] for k in sorted(table)]
    losses = [named(evaluation, "q_bare")] + [table[k][1] for k in sorted(table)]
    assert all(a > b for a, b in zip(surfaces, surfaces[1:]))
    assert all(a > b for a, b in zip(losses, losses[1:]))
    limit = named(evaluation, "touch_limit")
    first = next(i for i, t in enumerate(surfaces) if t <= limit)
    step_mm = 1000 * named(evaluation, "ins_step")
    assert named(evaluation, "res_first_ok_mm") == pytest.approx(first * step_mm, rel=1e-12)
    assert named(evaluation, "res_first_ok_t") == pytest.approx(surfaces[first], rel=1e-12)


def test_no_thickness_in_the_table_meets_an_impossible_limit():
    evaluation = evaluate_template(NAME, touch_limit=21)
    assert named(evaluation, "res_first_ok_mm") == "none in the table"


def test_handbook_example_hot_horizontal_pipe_in_still_air():
    """Incropera, DeWitt, Bergman, Lavine, Fundamentals of Heat and Mass Transfer, 6th ed.,
    Example 9.4 (from memory: a horizontal steam pipe, D = 0.1 m, surface 165 °C, emissivity 0.85,
    in a large room with air and walls at 23 °C; heat loss per metre by convection and radiation).

    The expected numbers are worked here by the book's own method rather than quoted: air
    properties at the film temperature 367 K interpolated in the book's Table A.4 (values from
    memory: 350 K nu 20.92e-6, k 30.0e-3, alpha 29.9e-6, Pr 0.700; 400 K nu 26.41e-6, k 33.8e-3,
    alpha 38.3e-6, Pr 0.690), beta = 1/Tf, Churchill-Chu eq. 9.34, radiation eq. 1.7.
    Tolerance: the template takes CoolProp properties instead of a table interpolated linearly
    over 50 K and the real-gas beta; these shift Ra by a few per cent and h (~ Ra^(1/4..1/3)) by
    about 1 %, so 2 % on h and 1 % on the total loss (radiation, 58 % of it, is exact).
    """
    evaluation = evaluate_template(NAME, geometry="horizontal cylinder", hot_t=165, ambient_t=23,
                                   surroundings_t=23, pipe_od=0.1, pipe_length=1, eps_bare=0.85)
    film = 367.0
    f = (film - 350.0) / 50.0
    nu, k, alpha, pr = (np.interp(f, [0, 1], pair) for pair in
                        ([20.92e-6, 26.41e-6], [30.0e-3, 33.8e-3], [29.9e-6, 38.3e-6], [0.700, 0.690]))
    ra = GRAVITY * (1 / film) * (165 - 23) * 0.1 ** 3 / (nu * alpha)
    nusselt = (0.60 + 0.387 * ra ** (1 / 6) / (1 + (0.559 / pr) ** (9 / 16)) ** (8 / 27)) ** 2
    h_book = nusselt * k / 0.1
    ts, tsur = 165 + zero_Celsius, 23 + zero_Celsius
    q_rad_book = 0.85 * math.pi * 0.1 * Stefan_Boltzmann * (ts ** 4 - tsur ** 4)
    q_book = h_book * math.pi * 0.1 * (165 - 23) + q_rad_book
    assert 4.5e6 < ra < 5.5e6  # the book's Ra_D ~ 5e6 (from memory)
    assert named(evaluation, "res_h_conv_bare") == pytest.approx(h_book, rel=0.02)
    assert named(evaluation, "q_rad_bare") == pytest.approx(q_rad_book, rel=1e-6)
    assert named(evaluation, "res_q_bare_unit") == pytest.approx(q_book, rel=0.01)


# input -> (new value, result, direction, why)
DIRECTIONS = {
    "wind_speed": (3.0, "res_surf_t_first_step", -1, "a wind cools the jacket (mixed convection)"),
    "hot_t": (200.0, "res_surf_t_first_step", +1, "a hotter pipe warms the jacket"),
    "pipe_od": (0.2, "res_q_bare", +1, "a larger pipe has more area"),
    "pipe_length": (20.0, "res_q_bare", +1, "a longer pipe has more area"),
    "face_height": (2.0, "res_q_bare", 0, "the default geometry is the cylinder: face sizes unused"),
    "face_width": (2.0, "res_q_bare", 0, "the default geometry is the cylinder: face sizes unused"),
    "eps_bare": (0.95, "res_q_bare", +1, "a higher emissivity radiates more"),
    "ambient_t": (30.0, "res_q_bare", -1, "warmer air takes less heat"),
    "surroundings_t": (40.0, "res_q_bare", -1, "warmer surroundings take less radiation"),
    "ins_k": (0.08, "res_surf_t_first_step", +1, "a poorer insulant lets more heat through"),
    "eps_jacket": (0.9, "res_surf_t_first_step", -1, "a jacket that radiates more runs cooler"),
    "ins_step": (0.02, "res_surf_t_first_step", -1, "more insulation lowers the surface temperature"),
    "touch_limit": (65.0, "res_first_ok_mm", -1, "a higher limit is met by thinner insulation"),
    "ambient_rh": (0.8, "res_dew_ambient", +1, "more humid air condenses at a higher temperature"),
    "dew_margin": (3.0, "res_t_dry_min", +1, "a larger margin wants a warmer surface"),
}


def test_every_input_has_a_direction_test():
    inputs = input_names(hot_surface.TEMPLATE)
    assert inputs == set(DIRECTIONS) | {"geometry"}


@pytest.mark.parametrize("input_name", sorted(DIRECTIONS))
def test_set_moves_the_result_the_expected_way(input_name):
    value, result, direction, _why = DIRECTIONS[input_name]
    assert_direction(NAME, input_name, value, result, direction)


def test_more_insulation_never_raises_the_surface_temperature_per_unit_length():
    assert_direction(NAME, "pipe_length", 20.0, "res_q_bare_unit", 0)  # per metre: length cancels
    assert_direction(NAME, "eps_bare", 0.95, "res_surf_t_first_step", 0)  # the jacket hides the bare finish


def test_face_sizes_act_on_a_face():
    base = evaluate_template(NAME, geometry="vertical face")
    wider = evaluate_template(NAME, geometry="vertical face", face_width=3.0)
    taller = evaluate_template(NAME, geometry="vertical face", face_height=2.0)
    assert named(wider, "res_q_bare") == pytest.approx(2 * named(base, "res_q_bare"), rel=1e-12)  # area only
    assert named(taller, "res_h_conv_bare") < named(base, "res_h_conv_bare")  # Churchill-Chu: h falls with height


def test_a_face_looking_down_loses_less_than_one_looking_up():
    """Common practice (and Lloyd-Moran vs Raithby-Hollands): a hot face looking down is the
    weakest convector of the three plate orientations."""
    h = {g: named(evaluate_template(NAME, geometry=g), "res_h_conv_bare")
         for g in ("horizontal top", "horizontal bottom", "vertical face")}
    assert h["horizontal bottom"] < h["vertical face"] < h["horizontal top"]


def test_a_failed_insulated_case_reads_as_failed_never_as_none_in_the_table():
    """An engine failure upstream (here a zero conductivity: every insulation resistance divides
    by zero) must not turn into the plausible answer "none in the table"."""
    evaluation = evaluate_template(NAME, ins_k=0)
    for name in ("res_first_ok_mm", "res_first_ok_t", "res_first_ok_q"):
        assert named(evaluation, name) == FAILED, name
    check = named(evaluation, "res_net_check")       # the network's own message names the bad cell
    assert check.startswith("NET_CHECK: branch row 1") and "p1" in check


@pytest.mark.parametrize("geometry", ["horizontal cylinder", "vertical face"])
def test_outer_surface_spread_equals_the_engine_band(geometry):
    evaluation = evaluate_template(NAME, geometry=geometry)
    low, high = _engine_case(evaluation, band=True)[3].band["surf_1"]
    assert named(evaluation, "res_surf_first_low") == pytest.approx(low, rel=1e-9)
    assert named(evaluation, "res_surf_first_high") == pytest.approx(high, rel=1e-9)
    assert named(evaluation, "ambient_t") < low <= high < named(evaluation, "hot_t")


# ---------------------------------------------------------------------------------------------
# Exact thicknesses (INSULATION_THICKNESS): the touch limit, and the cold mode's dew point

COLD = {"hot_t": 6.0, "ambient_t": 25.0, "surroundings_t": 25.0, "ambient_rh": 0.7, "eps_jacket": 0.9,
        "pipe_od": 0.0603}


def _exact_case(evaluation, surface_t):
    """(thickness, outer surface solved by the network at it) for the template's geometry."""
    v = {n: named(evaluation, n) for n in ("hot_t", "ambient_t", "surroundings_t", "ins_k", "eps_jacket",
                                           "pipe_od", "kind", "bare_length", "facing", "wind_speed", "face_width")}
    facing = v["facing"] if v["kind"] == "hplate" else None
    along = None if v["kind"] == "hcyl" else v["face_width"]
    thickness = stillair.insulation_thickness(v["hot_t"], v["ambient_t"], surface_t, v["ins_k"], v["eps_jacket"],
                                              v["kind"], v["bare_length"], facing, v["surroundings_t"],
                                              wind=v["wind_speed"], wind_length=along)
    if v["kind"] == "hcyl":
        outer = v["pipe_od"] + 2 * thickness
        area, resistance, length = math.pi * outer, math.log(outer / v["pipe_od"]) / (2 * math.pi * v["ins_k"]), outer
    else:
        area, resistance, length = 1.0, thickness / v["ins_k"], v["bare_length"]
    branches = [["ins", "hot", "surf", "resistance", resistance],
                ["conv", "surf", "ambient", v["kind"], length, area,
                 *hot_surface.outer_columns(v["kind"], facing, v["wind_speed"], along)],
                ["rad", "surf", "room", "radiation", v["eps_jacket"], None, area]]
    bounds = [["hot", "T", v["hot_t"]], ["ambient", "T", v["ambient_t"]], ["room", "T", v["surroundings_t"]]]
    return thickness, stillair.solve_network(branches, bounds).temperatures["surf"]


@pytest.mark.parametrize("geometry", ["horizontal cylinder", "vertical face", "horizontal bottom"])
def test_cold_mode_thickness_keeps_the_surface_at_dew_point_plus_margin(geometry):
    evaluation = evaluate_template(NAME, geometry=geometry, **COLD)
    assert named(evaluation, "res_mode") == "cold surface"
    dew = stillair.dew_point(25.0, 0.7)
    assert named(evaluation, "res_dew_ambient") == pytest.approx(dew, rel=1e-12)
    target = dew + named(evaluation, "dew_margin")
    thickness, surface = _exact_case(evaluation, target)
    assert named(evaluation, "res_x_dry_mm") == pytest.approx(1000 * thickness, rel=1e-9)
    assert surface == pytest.approx(target, abs=1e-6)     # the network agrees at that thickness
    assert named(evaluation, "res_bare_dry").startswith("CONDENSATION: bare surface ")
    # the heat gain per unit is what flows through that insulation
    if geometry == "horizontal cylinder":
        outer = 0.0603 + 2 * thickness
        gain = 2 * math.pi * named(evaluation, "ins_k") * (target - 6.0) / math.log(outer / 0.0603)
    else:
        gain = named(evaluation, "ins_k") * (target - 6.0) / thickness
    assert named(evaluation, "res_q_dry_unit") == pytest.approx(gain, rel=1e-9)
    assert gain > 0


def test_cold_mode_needs_more_insulation_in_more_humid_air():
    drier = named(evaluate_template(NAME, **{**COLD, "ambient_rh": 0.5}), "res_x_dry_mm")
    wetter = named(evaluate_template(NAME, **{**COLD, "ambient_rh": 0.8}), "res_x_dry_mm")
    assert 0 < drier < named(evaluate_template(NAME, **COLD), "res_x_dry_mm") < wetter


def test_a_hot_surface_needs_no_insulation_against_condensation():
    evaluation = evaluate_template(NAME)
    assert named(evaluation, "res_mode") == "hot surface"
    assert named(evaluation, "res_x_dry_mm") == 0.0
    assert named(evaluation, "res_bare_dry").startswith("OK: bare surface ")
    assert named(evaluation, "res_q_dry_unit") == pytest.approx(-named(evaluation, "res_q_bare_unit"), rel=1e-12)


def test_touch_limit_thickness_is_exact_and_within_the_table_step():
    evaluation = evaluate_template(NAME)
    thickness, surface = _exact_case(evaluation, named(evaluation, "touch_limit"))
    assert named(evaluation, "res_x_touch_mm") == pytest.approx(1000 * thickness, rel=1e-9)
    assert surface == pytest.approx(named(evaluation, "touch_limit"), abs=1e-6)
    step_mm = 1000 * named(evaluation, "ins_step")
    assert named(evaluation, "res_first_ok_mm") - step_mm < named(evaluation, "res_x_touch_mm") <= \
        named(evaluation, "res_first_ok_mm")
    # a bare surface within the limit needs none
    assert named(evaluate_template(NAME, touch_limit=200), "res_x_touch_mm") == 0.0


@pytest.mark.parametrize("geometry", hot_surface.GEOMETRIES)
def test_in_a_wind_the_results_equal_the_engine(geometry):
    """The bare coefficient, the thickness table and the exact thickness with a wind (mixed
    convection: a pipe in cross-flow, a face with the wind along its width) equal the engine."""
    evaluation = evaluate_template(NAME, geometry=geometry, wind_speed=2.5)
    h_conv, _, q_bare, result = _engine_case(evaluation)
    assert named(evaluation, "res_h_conv_bare") == pytest.approx(h_conv, rel=1e-9)
    assert named(evaluation, "res_q_bare") == pytest.approx(q_bare, rel=1e-9)
    for k, (surface, heat) in _table(evaluation).items():
        assert surface == pytest.approx(result.temperatures[f"surf_{k}"], rel=1e-9)
        assert heat == pytest.approx(result.heat[f"ins_{k}"], rel=1e-9)
    thickness, surface = _exact_case(evaluation, named(evaluation, "touch_limit"))
    assert named(evaluation, "res_x_touch_mm") == pytest.approx(1000 * thickness, rel=1e-9)
    assert surface == pytest.approx(named(evaluation, "touch_limit"), abs=1e-6)
    still = evaluate_template(NAME, geometry=geometry)
    assert named(evaluation, "res_h_conv_bare") > named(still, "res_h_conv_bare")
    assert named(evaluate_template(NAME, geometry=geometry, wind_speed=0.0), "res_q_bare") == named(still, "res_q_bare")


def _unit_beside(evaluation, name):
    """The unit cell beside a named result (the column after its value)."""
    from openpyxl.utils.cell import column_index_from_string, get_column_letter

    sheet, ref = next(n.text for n in evaluation.book.names if n.name == name).replace("$", "").split("!")
    column = "".join(ch for ch in ref if ch.isalpha())
    unit_ref = get_column_letter(column_index_from_string(column) + 1) + ref[len(column):]
    return {**evaluation.book.sheet(sheet).values, **evaluation.values[sheet]}[unit_ref]


@pytest.mark.parametrize("geometry", hot_surface.GEOMETRIES)
def test_the_per_unit_loss_shows_the_unit_of_its_geometry(geometry):
    """Per metre of pipe for the cylinder, per square metre for a face: never "W/m or W/m²"."""
    evaluation = evaluate_template(NAME, geometry=geometry)
    pipe = geometry == "horizontal cylinder"
    assert _unit_beside(evaluation, "res_q_bare_unit") == ("W/m" if pipe else "W/m²")
    assert _unit_beside(evaluation, "unit_size") == ("m" if pipe else "m²")
    assert _unit_beside(evaluation, "res_q_dry_unit") == ("W/m" if pipe else "W/m²")
    size = named(evaluation, "pipe_length") if pipe else named(evaluation, "face_height") * named(evaluation, "face_width")
    assert named(evaluation, "res_q_bare_unit") == pytest.approx(named(evaluation, "res_q_bare") / size, rel=1e-12)
